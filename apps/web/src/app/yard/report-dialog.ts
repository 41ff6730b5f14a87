import {
  ChangeDetectionStrategy,
  Component,
  ElementRef,
  afterRenderEffect,
  computed,
  inject,
  signal,
  viewChild,
} from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, type ValidatorFn } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatRadioModule } from '@angular/material/radio';
import { MatSelectModule } from '@angular/material/select';
import { yardReportSchema, type YardReportResult } from '@nightyard/contracts';
import type { ZodType } from 'zod';
import { applyFieldErrors, toApiProblem } from '../core/api-error';
import { CLOCK_TIME, pastMidnightAt } from '@nightyard/contracts/depot-time';
import { ClockTimeInput, clockTimeValidator } from '../shared/clock-time-input';
import { YardApi, type YardReportRequest } from './yard-api';
import { day, clock, expectedAtFor } from './yard-format';
import { movedLines } from './yard-store';

export type ReportKind = YardReportRequest['kind'];

/** What a charger card or a live fault fills in before the form opens. */
export interface ReportPreset {
  kind?: ReportKind;
  bus?: string;
  charger?: string;
  reason?: string;
}

export interface ReportDialogData {
  depotId: string;
  planId: string;
  timezone: string;
  /** Server time now (ms), for a late bus's new time. */
  now: number;
  buses: readonly string[];
  chargers: readonly string[];
  /** When the night's plan starts (ms): before it, the API cannot re-plan yet. */
  nightStart?: number;
  preset?: ReportPreset;
}

export type ReportOutcome = { result: YardReportResult } | { reload: true };

export const REPORT_KINDS: readonly { kind: ReportKind; label: string; icon: string }[] = [
  { kind: 'charger_out', label: 'Charger out of service', icon: 'power_off' },
  { kind: 'bus_late', label: 'Bus late', icon: 'schedule' },
  { kind: 'bus_absent', label: 'Bus absent tonight', icon: 'no_transfer' },
  { kind: 'soc_reading', label: 'State of charge reading', icon: 'battery_charging_50' },
];

/** The contract's schema for one field of one kind of report, so the form says what the API says. */
function fieldSchema(kind: ReportKind, field: string): ZodType {
  const option = yardReportSchema.options.find((o) => o.shape.kind.value === kind);
  const schema = (option?.shape as Record<string, ZodType> | undefined)?.[field];
  if (!schema) throw new Error(`No field ${field} in a ${kind} report`);
  return schema;
}

function contract(kind: ReportKind, field: string, empty?: string): ValidatorFn {
  const schema = fieldSchema(kind, field);
  return (control) => {
    const value: unknown = control.value;
    if (empty && (value === null || value === undefined || value === '')) return { contract: empty };
    const result = schema.safeParse(typeof value === 'string' ? value.trim() : value);
    return result.success ? null : { contract: result.error.issues[0]?.message ?? 'Check this value' };
  };
}

const timeValidator = clockTimeValidator('Enter the time the bus is now expected', 'contract');

/** Which controls each kind of report uses (the others are disabled). */
const FIELDS: Record<ReportKind, readonly string[]> = {
  bus_late: ['bus', 'expectedTime'],
  bus_absent: ['bus', 'reason'],
  charger_out: ['charger', 'reason'],
  soc_reading: ['bus', 'socPct'],
};

/**
 * Report what differs from the plan. Sending it re-plans the rest of the night and publishes a
 * revision; the dialog shows progress, then the new version and which buses moved.
 */
@Component({
  selector: 'ny-report-dialog',
  imports: [
    ClockTimeInput,
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatRadioModule,
    MatSelectModule,
    ReactiveFormsModule,
  ],
  templateUrl: './report-dialog.html',
  styleUrl: './report-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReportDialog {
  private readonly api = inject(YardApi);
  private readonly ref = inject<MatDialogRef<ReportDialog, ReportOutcome>>(MatDialogRef);
  protected readonly data = inject<ReportDialogData>(MAT_DIALOG_DATA);
  protected readonly kinds = REPORT_KINDS;

  protected readonly form = new FormGroup({
    kind: new FormControl<ReportKind>(this.data.preset?.kind ?? 'charger_out', { nonNullable: true }),
    bus: new FormControl(this.data.preset?.bus ?? '', {
      nonNullable: true,
      validators: contract('soc_reading', 'bus'),
    }),
    charger: new FormControl(this.data.preset?.charger ?? '', {
      nonNullable: true,
      validators: contract('charger_out', 'charger'),
    }),
    expectedTime: new FormControl('', { nonNullable: true, validators: timeValidator }),
    reason: new FormControl(this.data.preset?.reason ?? '', { nonNullable: true }),
    socPct: new FormControl<number | null>(null, {
      validators: contract('soc_reading', 'socPct', 'Enter the state of charge in %'),
    }),
  });

  protected readonly kind = toSignal(this.form.controls.kind.valueChanges, {
    initialValue: this.form.controls.kind.value,
  });
  private readonly expectedTime = toSignal(this.form.controls.expectedTime.valueChanges, { initialValue: '' });

  protected readonly phase = signal<'form' | 'sending' | 'done' | 'conflict'>('form');
  protected readonly problems = signal<string[]>([]);
  private readonly problemBox = viewChild<ElementRef<HTMLElement>>('problemBox');
  /**
   * A refusal is brought into view: on a phone the form is taller than the dialog, and a message
   * below the fold left a yard user who had just tagged out a charger with no visible answer.
   */
  private readonly showProblems = afterRenderEffect(() => {
    if (this.problems().length) this.problemBox()?.nativeElement.scrollIntoView?.({ block: 'nearest' });
  });
  protected readonly result = signal<YardReportResult | null>(null);
  protected readonly moved = computed(() => {
    const r = this.result();
    return r ? movedLines(r) : [];
  });

  /** "Tue 1 Dec 23:40 at the depot" under the time field. */
  protected readonly expectedHint = computed(() => {
    const time = this.expectedTime();
    const morning = pastMidnightAt(this.data.now, this.data.timezone);
    if (!time || !CLOCK_TIME.test(time))
      return morning ? 'Depot time, later than now' : 'Depot time; after midnight means tomorrow morning';
    const at = expectedAtFor(time, this.data.now, this.data.timezone);
    if (morning && time <= clock(this.data.now, this.data.timezone))
      return `${time} has passed: give a time later than now`;
    const [date] = at.split('T');
    const sameDay = date === expectedAtFor('23:59', this.data.now, this.data.timezone).split('T')[0];
    return `${sameDay ? 'Today' : 'Tomorrow'}, ${time} at the depot`;
  });

  protected readonly reasonLabel = computed(() =>
    this.kind() === 'charger_out' ? 'What is wrong with the charger' : 'Reason (optional)',
  );

  constructor() {
    this.applyKind(this.form.controls.kind.value);
    this.form.controls.kind.valueChanges.pipe(takeUntilDestroyed()).subscribe((k) => this.applyKind(k));
  }

  private applyKind(kind: ReportKind): void {
    const used = FIELDS[kind];
    for (const [name, control] of Object.entries(this.form.controls)) {
      if (name === 'kind') continue;
      if (used.includes(name)) control.enable({ emitEvent: false });
      else control.disable({ emitEvent: false });
    }
    this.form.controls.reason.setValidators(
      kind === 'charger_out' ? contract('charger_out', 'reason') : contract('bus_absent', 'reason'),
    );
    this.form.controls.reason.updateValueAndValidity({ emitEvent: false });
    this.problems.set([]);
  }

  /** The request body for the current kind, as the API wants it. */
  body(): YardReportRequest {
    const v = this.form.getRawValue();
    const planId = this.data.planId;
    switch (v.kind) {
      case 'bus_late':
        return {
          planId,
          kind: v.kind,
          bus: v.bus,
          expectedAt: expectedAtFor(v.expectedTime, this.data.now, this.data.timezone),
        };
      case 'bus_absent':
        return { planId, kind: v.kind, bus: v.bus, reason: v.reason.trim() };
      case 'charger_out':
        return { planId, kind: v.kind, charger: v.charger, reason: v.reason.trim() };
      case 'soc_reading':
        return { planId, kind: v.kind, bus: v.bus, socPct: v.socPct as number };
    }
  }

  protected async send(): Promise<void> {
    this.problems.set([]);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.phase.set('sending');
    try {
      this.result.set(await this.api.report(this.data.depotId, this.body()));
      this.phase.set('done');
    } catch (err) {
      const problem = toApiProblem(err);
      if (problem.status === 409) {
        this.problems.set([problem.message]);
        this.phase.set('conflict');
        return;
      }
      this.phase.set('form');
      const fields = { ...problem.fields };
      if (fields['expectedAt']) fields['expectedTime'] = fields['expectedAt'];
      delete fields['expectedAt'];
      const early = 'now' in fields && this.data.nightStart !== undefined && this.data.now < this.data.nightStart;
      if (early) delete fields['now'];
      const leftOver = applyFieldErrors(this.form, fields);
      if (early) leftOver.unshift(this.notStartedYet());
      this.problems.set([problem.message, ...leftOver.filter((m) => m !== problem.message)]);
    }
  }

  protected errorOf(name: keyof ReportDialog['form']['controls']): string | null {
    const errors = this.form.controls[name].errors;
    return (errors?.['server'] as string | undefined) ?? (errors?.['contract'] as string | undefined) ?? null;
  }

  /** The engine re-plans from now within the night: before the night starts it cannot. */
  private notStartedYet(): string {
    const start = this.data.nightStart;
    const when = start ? ` (it starts ${day(start, this.data.timezone)} at ${clock(start, this.data.timezone)})` : '';
    return `The night has not started yet${when}: it can be re-planned once it has. Tell the supervisor, who can generate and publish a new plan before then.`;
  }

  protected finish(): void {
    const r = this.result();
    this.ref.close(r ? { result: r } : undefined);
  }

  protected reload(): void {
    this.ref.close({ reload: true });
  }

  protected seconds(ms: number): string {
    return new Intl.NumberFormat(undefined, { maximumFractionDigits: 1 }).format(ms / 1000);
  }

  protected publishedAt(): string {
    const at = this.result()?.revision.publishedAt;
    return at ? `${day(at, this.data.timezone)} ${clock(at, this.data.timezone)}` : '';
  }
}
