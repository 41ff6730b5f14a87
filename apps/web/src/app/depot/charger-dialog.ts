import { ChangeDetectionStrategy, Component, ElementRef, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, type ValidatorFn } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatRadioModule } from '@angular/material/radio';
import { MatSelectModule } from '@angular/material/select';
import {
  CONNECTOR_STANDARDS,
  chargerInputSchema,
  type Cabinet,
  type Charger,
  type ChargerInput,
} from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { applyServerErrors, errorText, zodValidator } from '../shared/form-paths';
import { guardDiscard } from '../shared/discard-guard';
import { LocalDateTimeField } from '../shared/local-date-time-field';
import { PlausibleConfirm } from '../shared/plausible-confirm';
import { ProblemSummary, type ProblemItem } from '../shared/problem-summary';
import { DepotApi } from './depot-api';
import { formatKw } from './depot-setup-format';

export interface ChargerDialogData {
  depotId: string;
  /** The charger to change; absent to add one. */
  charger?: Charger;
  cabinets: readonly Cabinet[];
  chargers: readonly Charger[];
  /** The depot's service limit, to question a charger above it. */
  serviceLimitKw?: number;
}

/** OCPP identity rules (the API checks the same). */
const OCPP_IDENTITY = /^[A-Za-z0-9*\-_=:+|@.]{1,48}$/;
const ocppIdentityCheck: ValidatorFn = (control) => {
  const v = typeof control.value === 'string' ? control.value.trim() : '';
  return v && !OCPP_IDENTITY.test(v) ? { zod: 'Use 1-48 letters, digits or *-_=:+|@. (OCPP identity rules)' } : null;
};
/** A password is needed with a new identity; 16 to 40 characters (OCPP security profile 1). */
function ocppPasswordCheck(current: string | null): ValidatorFn {
  return (control) => {
    const v = typeof control.value === 'string' ? control.value : '';
    const identity = (control.parent?.get('ocppIdentity')?.value as string | undefined)?.trim() ?? '';
    if (!v)
      return identity && identity !== current
        ? { zod: 'Enter the password the charger will use (16 to 40 characters)' }
        : null;
    if (v.length < 16) return { zod: 'Use at least 16 characters' };
    if (v.length > 40) return { zod: 'OCPP limits the password to 40 characters' };
    return null;
  };
}
/** The period ends after it starts. */
const untilAfterFrom: ValidatorFn = (control) => {
  const from = control.parent?.get('outFrom')?.value as string | undefined;
  const until = control.value as string | null;
  return from && until && until <= from ? { zod: 'The end of the period must be after its start' } : null;
};

const shape = chargerInputSchema.shape;
const REASON_NEEDED = 'Say why the charger is out of service';

/** Out of service needs a reason; in service needs none. */
const reasonWhenOut: ValidatorFn = (control) => {
  const out = control.parent?.get('status')?.value === 'out_of_service';
  const text = typeof control.value === 'string' ? control.value.trim() : '';
  if (out && !text) return { zod: REASON_NEEDED };
  if (text.length > 300) return { zod: 'Use at most 300 characters' };
  return null;
};

export function chargerForm(c?: Charger) {
  return new FormGroup({
    label: new FormControl(c?.label ?? '', {
      nonNullable: true,
      validators: zodValidator(shape.label, 'Label the charger'),
    }),
    maxKw: new FormControl<number | null>(
      c?.maxKw ?? null,
      zodValidator(shape.maxKw, "Enter the charger's maximum in kW"),
    ),
    connector: new FormControl(c?.connector ?? CONNECTOR_STANDARDS[0], {
      nonNullable: true,
      validators: zodValidator(shape.connector, 'Choose the connector standard'),
    }),
    cabinetId: new FormControl<string | null>(c?.cabinetId ?? null),
    status: new FormControl<Charger['status']>(c?.status ?? 'in_service', { nonNullable: true }),
    statusReason: new FormControl(c?.statusReason ?? '', { nonNullable: true, validators: reasonWhenOut }),
    outFrom: new FormControl<string | null>(c?.outFrom ?? null),
    outUntil: new FormControl<string | null>(c?.outUntil ?? null, untilAfterFrom),
    ocppIdentity: new FormControl(c?.ocppIdentity ?? '', { nonNullable: true, validators: ocppIdentityCheck }),
    ocppPassword: new FormControl('', { nonNullable: true, validators: ocppPasswordCheck(c?.ocppIdentity ?? null) }),
  });
}
export type ChargerForm = ReturnType<typeof chargerForm>;

/** The body the API takes, from a valid form. */
export function chargerInput(form: ChargerForm): ChargerInput {
  const v = form.getRawValue();
  const out = v.status === 'out_of_service';
  return {
    label: v.label.trim(),
    maxKw: v.maxKw ?? 0,
    connector: v.connector,
    cabinetId: v.cabinetId,
    status: v.status,
    statusReason: out ? v.statusReason.trim() : null,
    outFrom: out ? v.outFrom || null : null,
    outUntil: out ? v.outUntil || null : null,
  };
}

/** Why a charger's maximum is unlikely, or null: above the service, or above its cabinet. */
export function chargerKwWarning(
  maxKw: number | null,
  serviceLimitKw: number | undefined,
  cabinet: Cabinet | undefined,
): string | null {
  if (maxKw === null || !(maxKw > 0)) return null;
  if (serviceLimitKw !== undefined && maxKw > serviceLimitKw) {
    return `${formatKw(maxKw)} is above the depot's ${formatKw(serviceLimitKw)} service: a charger cannot draw more than the site's connection. Check the figure.`;
  }
  if (cabinet && maxKw > cabinet.limitKw) {
    return `${formatKw(maxKw)} is above the ${formatKw(cabinet.limitKw)} of ${cabinet.label}, which feeds it. Check the figure.`;
  }
  return null;
}

/** Add or change a charger: label, maximum kW, connector, power cabinet, in or out of service. */
@Component({
  selector: 'ny-charger-dialog',
  imports: [
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatRadioModule,
    MatSelectModule,
    LocalDateTimeField,
    PlausibleConfirm,
    ProblemSummary,
    ReactiveFormsModule,
  ],
  templateUrl: './charger-dialog.html',
  styleUrl: './depot-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-dense' },
})
export class ChargerDialog {
  private readonly api = inject(DepotApi);
  private readonly ref = inject<MatDialogRef<ChargerDialog, Charger>>(MatDialogRef);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  protected readonly data = inject<ChargerDialogData>(MAT_DIALOG_DATA);

  protected readonly form = chargerForm(this.data.charger);
  protected readonly error = errorText;
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly problemItems = signal<ProblemItem[]>([]);
  protected readonly title = this.data.charger ? `Edit charger ${this.data.charger.label}` : 'Add a charger';

  protected readonly connectors: readonly string[] = (CONNECTOR_STANDARDS as readonly string[]).includes(
    this.form.controls.connector.value,
  )
    ? CONNECTOR_STANDARDS
    : [...CONNECTOR_STANDARDS, this.form.controls.connector.value];
  protected readonly cabinets = this.data.cabinets.map((cab) => ({
    cabinet: cab,
    text: `${cab.label} (${formatKw(cab.limitKw)} shared)`,
  }));

  protected readonly status = toSignal(this.form.controls.status.valueChanges, {
    initialValue: this.form.controls.status.value,
  });
  private readonly cabinetId = toSignal(this.form.controls.cabinetId.valueChanges, {
    initialValue: this.form.controls.cabinetId.value,
  });
  /** Who else shares the chosen cabinet. */
  protected readonly cabinetNote = computed(() => {
    const cab = this.data.cabinets.find((c) => c.id === this.cabinetId());
    if (!cab) return 'Draws straight from the site service';
    const others = this.data.chargers
      .filter((c) => c.cabinetId === cab.id && c.id !== this.data.charger?.id)
      .map((c) => c.label);
    return others.length
      ? `Shares ${formatKw(cab.limitKw)} with ${others.join(', ')}`
      : `Has ${formatKw(cab.limitKw)} to itself for now`;
  });

  private readonly maxKw = toSignal(this.form.controls.maxKw.valueChanges, {
    initialValue: this.form.controls.maxKw.value,
  });
  private readonly maxKwStatus = toSignal(this.form.controls.maxKw.statusChanges, {
    initialValue: this.form.controls.maxKw.status,
  });
  /** A figure the form refuses outright has its error only: no offer to confirm it as right. */
  protected readonly kwWarning = computed(() =>
    this.maxKwStatus() === 'INVALID'
      ? null
      : chargerKwWarning(
          this.maxKw(),
          this.data.serviceLimitKw,
          this.data.cabinets.find((c) => c.id === this.cabinetId()),
        ),
  );
  /** The unlikely figure was confirmed (asked again when it changes). */
  protected readonly kwConfirmed = signal(false);
  protected readonly kwMissing = signal(false);
  protected readonly currentIdentity = this.data.charger?.ocppIdentity ?? null;

  constructor() {
    guardDiscard(this.form, 'the changes to this charger');
    this.form.controls.status.valueChanges.subscribe(() => this.form.controls.statusReason.updateValueAndValidity());
    this.form.controls.outFrom.valueChanges.subscribe(() => this.form.controls.outUntil.updateValueAndValidity());
    this.form.controls.ocppIdentity.valueChanges.subscribe(() =>
      this.form.controls.ocppPassword.updateValueAndValidity(),
    );
    this.form.controls.maxKw.valueChanges.subscribe(() => {
      this.kwConfirmed.set(false);
      this.kwMissing.set(false);
    });
  }

  protected async submit(): Promise<void> {
    this.problem.set(null);
    this.problemItems.set([]);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      queueMicrotask(() =>
        this.host.nativeElement
          .querySelector<HTMLElement>('input.ng-invalid, textarea.ng-invalid, mat-select.ng-invalid')
          ?.focus(),
      );
      return;
    }
    if (this.kwWarning() && !this.kwConfirmed()) {
      this.kwMissing.set(true);
      queueMicrotask(() => this.host.nativeElement.querySelector<HTMLElement>('ny-plausible-confirm input')?.focus());
      return;
    }
    this.busy.set(true);
    const body = chargerInput(this.form);
    const identity = this.form.controls.ocppIdentity.value.trim();
    const password = this.form.controls.ocppPassword.value;
    try {
      let saved = this.data.charger
        ? await this.api.updateCharger(this.data.depotId, this.data.charger.id, body)
        : await this.api.addCharger(this.data.depotId, body);
      if (identity && password) {
        await this.api.setOcpp(this.data.depotId, saved.id, { identity, password });
        saved = { ...saved, ocppIdentity: identity };
      }
      this.ref.close(saved);
    } catch (err) {
      const p = toApiProblem(err);
      const rest = applyServerErrors(this.form, p.fields);
      this.problem.set(p.message);
      this.problemItems.set(rest.map((r) => ({ where: r.path, message: r.message })));
    } finally {
      this.busy.set(false);
    }
  }
}
