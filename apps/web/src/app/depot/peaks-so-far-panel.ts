import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal, untracked } from '@angular/core';
import { FormArray, FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { peaksSoFarSchema, type PeaksSoFar } from '@nightyard/contracts';
import { z } from 'zod';
import { toApiProblem } from '../core/api-error';
import { Clock } from '../core/clock';
import { applyServerErrors, errorText, zodValidator } from '../shared/form-paths';
import { ProblemSummary, type ProblemItem } from '../shared/problem-summary';
import { DepotApi } from './depot-api';
import { formatDate, formatKw } from './depot-setup-format';
import { trackUnsaved } from '../core/unsaved-edits';

const shape = peaksSoFarSchema.shape;
const periodKw = z.number().min(0, 'A period peak cannot be negative').max(100_000, 'A period peak looks too large');

function periodGroup(name = '', kw: number | null = null) {
  return new FormGroup({
    name: new FormControl(name, {
      nonNullable: true,
      validators: zodValidator(z.string().trim().min(1).max(60), 'Name the period, e.g. on-peak'),
    }),
    kw: new FormControl<number | null>(kw, zodValidator(periodKw, 'Enter the period peak in kW')),
  });
}

/** The start of the billing period that holds `today`, for a billing period starting on `day`. */
export function billingPeriodStart(today: string, day: number): string {
  const [y, m, d] = today.split('-').map(Number) as [number, number, number];
  const start = d >= day ? new Date(Date.UTC(y, m - 1, day)) : new Date(Date.UTC(y, m - 2, day));
  return start.toISOString().slice(0, 10);
}

/** The billing period's highest 15-minute demands so far, entered by hand until meter data is imported. */
@Component({
  selector: 'ny-peaks-so-far-panel',
  imports: [
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    ProblemSummary,
    ReactiveFormsModule,
  ],
  templateUrl: './peaks-so-far-panel.html',
  styleUrls: ['../shared/panel.scss', './peaks-so-far-panel.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PeaksSoFarPanel {
  private readonly api = inject(DepotApi);
  private readonly snackBar = inject(MatSnackBar);
  private readonly clock = inject(Clock);

  readonly depotId = input.required<string>();
  readonly peaks = input.required<PeaksSoFar | null>();
  readonly billingStartDay = input(1);
  readonly timezone = input('UTC');
  readonly canEdit = input(false);
  readonly saved = output<PeaksSoFar>();

  protected readonly error = errorText;
  protected readonly kw = formatKw;
  protected readonly date = formatDate;
  protected readonly periods = computed(() =>
    Object.entries(this.peaks()?.periods ?? {}).map(([name, kw]) => ({ name, kw })),
  );

  /** The current billing period's start when the peaks shown are of an earlier one, else null. */
  protected readonly laterPeriod = computed(() => {
    const entered = this.peaks()?.billingPeriodStart;
    if (!entered) return null;
    const current = billingPeriodStart(this.clock.todayAt(this.timezone()), this.billingStartDay());
    return entered < current ? current : null;
  });

  protected readonly form = signal<ReturnType<PeaksSoFarPanel['buildForm']> | null>(null);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly problemItems = signal<ProblemItem[]>([]);

  constructor() {
    trackUnsaved(
      () => this.canEdit() && !!this.form()?.dirty,
      () => 'the peaks so far',
    );
  }

  private buildForm(p: PeaksSoFar | null) {
    const start =
      p?.billingPeriodStart ??
      billingPeriodStart(
        untracked(() => this.clock.todayAt(this.timezone())),
        this.billingStartDay(),
      );
    return new FormGroup({
      billingPeriodStart: new FormControl(start, {
        nonNullable: true,
        validators: zodValidator(shape.billingPeriodStart, 'Enter the date the billing period started'),
      }),
      facilityKw: new FormControl<number | null>(
        p?.facilityKw ?? null,
        zodValidator(shape.facilityKw, 'Enter the facility peak in kW (0 if none yet)'),
      ),
      periods: new FormArray(Object.entries(p?.periods ?? {}).map(([name, kw]) => periodGroup(name, kw))),
    });
  }

  protected edit(): void {
    this.problem.set(null);
    this.problemItems.set([]);
    this.form.set(this.buildForm(this.peaks()));
  }

  protected cancel(): void {
    this.problem.set(null);
    this.problemItems.set([]);
    this.form.set(null);
  }

  protected addPeriod(arr: FormArray<ReturnType<typeof periodGroup>>): void {
    arr.push(periodGroup(arr.length === 0 ? 'on-peak' : ''));
  }

  protected async save(form: NonNullable<ReturnType<PeaksSoFarPanel['form']>>): Promise<void> {
    this.problem.set(null);
    this.problemItems.set([]);
    const names = new Map<string, number>();
    form.controls.periods.controls.forEach((g, i) => {
      const name = g.controls.name.value.trim();
      if (name && names.has(name))
        g.controls.name.setErrors({ server: `"${name}" is already in row ${names.get(name)! + 1}` });
      names.set(name, i);
    });
    if (form.invalid) {
      form.markAllAsTouched();
      this.problem.set('Check the fields marked in red. Nothing was saved.');
      return;
    }
    const v = form.getRawValue();
    const body: PeaksSoFar = {
      billingPeriodStart: v.billingPeriodStart,
      facilityKw: v.facilityKw ?? 0,
      periods: Object.fromEntries(v.periods.map((p) => [p.name.trim(), p.kw ?? 0])),
    };
    this.busy.set(true);
    try {
      const saved = await this.api.savePeaksSoFar(this.depotId(), body);
      this.form.set(null);
      this.saved.emit(saved);
      this.snackBar.open('Peaks so far saved', 'OK');
    } catch (err) {
      const p = toApiProblem(err);
      // Period peaks come back by name (periods.on-peak): show them on that row.
      const fields: Record<string, string> = {};
      for (const [path, message] of Object.entries(p.fields)) {
        const m = /^periods\.(.+)$/.exec(path);
        const row = m ? v.periods.findIndex((r) => r.name.trim() === m[1]) : -1;
        fields[row >= 0 ? `periods[${row}].kw` : path] = message;
      }
      this.problem.set(p.message);
      this.problemItems.set(applyServerErrors(form, fields).map((r) => ({ where: r.path, message: r.message })));
    } finally {
      this.busy.set(false);
    }
  }
}
