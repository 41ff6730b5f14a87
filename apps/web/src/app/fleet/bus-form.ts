import { FormControl, FormGroup, type AbstractControl, type ValidationErrors, type ValidatorFn } from '@angular/forms';
import type { Bus, BusInput } from '@nightyard/contracts';

/**
 * A number in a range, with the message the API would give (libs/contracts fleet.ts). `above`
 * makes the lower end exclusive. Empty passes unless `required` names what to enter.
 */
export function numberIn(
  what: string,
  min: number,
  max: number,
  opts: { above?: boolean; required?: string } = {},
): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const v: unknown = control.value;
    if (v === null || v === undefined || v === '') return opts.required ? { message: opts.required } : null;
    const n = typeof v === 'number' ? v : Number(v);
    if (!Number.isFinite(n)) return { message: `Enter ${what.toLowerCase()} as a number` };
    if (opts.above ? n <= min : n < min)
      return { message: opts.above ? `${what} must be above ${min}` : `${what} is ${min} to ${max}` };
    if (n > max)
      return { message: opts.above ? `${what} looks too large (at most ${max})` : `${what} is ${min} to ${max}` };
    return null;
  };
}

/** Text that must be there, at most `max` characters. */
export function textIn(required: string, max: number): ValidatorFn {
  return (control) => {
    const v = typeof control.value === 'string' ? control.value.trim() : '';
    if (!v) return { message: required };
    if (v.length > max) return { message: `Use at most ${max} characters` };
    return null;
  };
}

/** The reserve must stay below the departure ceiling (checked on the reserve control). */
const reserveBelowCeiling: ValidatorFn = (control) => {
  const ceiling = control.parent?.get('ceilingPct')?.value as number | null | undefined;
  const reserve = control.value as number | null;
  if (reserve === null || ceiling === null || ceiling === undefined) return null;
  return reserve >= ceiling ? { message: 'The reserve must be below the departure ceiling' } : null;
};

const taperBelowFull: ValidatorFn = (control) =>
  control.value !== null && control.value !== '' && Number(control.value) >= 100
    ? { message: 'Taper from must be below 100 % state of charge' }
    : null;

export function busForm(bus: Bus | null) {
  const num = (value: number | null, ...validators: ValidatorFn[]) =>
    new FormControl<number | null>(value, { validators });
  return new FormGroup({
    number: new FormControl(bus?.number ?? '', { nonNullable: true, validators: [textIn('Enter the bus number', 20)] }),
    status: new FormControl<BusInput['status']>(bus?.status ?? 'active', { nonNullable: true }),
    usableKwh: num(
      bus?.usableKwh ?? null,
      numberIn('The usable energy', 0, 2000, { above: true, required: 'Enter the usable energy in kWh' }),
    ),
    maxChargeKw: num(
      bus?.maxChargeKw ?? null,
      numberIn('The maximum charge power', 0, 2000, { above: true, required: 'Enter the maximum charge power in kW' }),
    ),
    connector: new FormControl(bus?.connector ?? '', {
      nonNullable: true,
      validators: [textIn('Choose the connector standard', 60)],
    }),
    kwhPerMile: num(
      bus?.kwhPerMile ?? null,
      numberIn('The consumption', 0, 20, { above: true, required: 'Enter the consumption in kWh per mile' }),
    ),
    ceilingPct: num(
      bus?.ceilingPct ?? 90,
      numberIn('The departure ceiling', 0, 100, { required: 'Enter the departure ceiling in %' }),
    ),
    reservePct: num(
      bus?.reservePct ?? 15,
      numberIn('The reserve', 0, 100, { required: 'Enter the reserve in %' }),
      reserveBelowCeiling,
    ),
    taperStartPct: num(bus?.taperStartPct ?? null, numberIn('Taper from', 0, 100), taperBelowFull),
  });
}
export type BusForm = ReturnType<typeof busForm>;

/** The request body from a valid form. */
export function busInputOf(form: BusForm): BusInput {
  const v = form.getRawValue();
  return {
    number: v.number.trim(),
    status: v.status,
    usableKwh: Number(v.usableKwh),
    maxChargeKw: Number(v.maxChargeKw),
    connector: v.connector.trim(),
    kwhPerMile: Number(v.kwhPerMile),
    ceilingPct: Number(v.ceilingPct),
    reservePct: Number(v.reservePct),
    taperStartPct: v.taperStartPct === null || (v.taperStartPct as unknown) === '' ? null : Number(v.taperStartPct),
  };
}

/** The message under a control: the API's, then the form's own. */
export function messageOf(control: AbstractControl | null): string {
  const e = control?.errors;
  if (!e) return '';
  if (typeof e['server'] === 'string') return e['server'];
  if (typeof e['message'] === 'string') return e['message'];
  if (e['required']) return 'Required';
  return 'Check this value';
}

/** Connector standards offered as suggestions (the field takes any text). */
export const CONNECTOR_SUGGESTIONS = ['SAE J1772 CCS1', 'CCS2', 'SAE J3400 (NACS)', 'CHAdeMO', 'SAE J3105 pantograph'];

/** Battery-electric buses use about 0.5 to 5 kWh a mile (common practice); outside it, likely a slip. */
export const PLAUSIBLE_KWH_PER_MILE = { min: 0.5, max: 5 } as const;

/** Why a consumption figure is unlikely, or null. */
export function consumptionWarning(value: unknown): string | null {
  const v = typeof value === 'number' ? value : typeof value === 'string' && value.trim() ? Number(value) : NaN;
  if (!Number.isFinite(v) || v <= 0) return null;
  const shown = new Intl.NumberFormat(undefined, { maximumFractionDigits: 2 }).format(v);
  if (v > PLAUSIBLE_KWH_PER_MILE.max) {
    return `${shown} kWh per mile is more than a bus uses (about 1 to 3, at most 5 in deep cold): check the figure (kWh per mile, not per km or per 100 miles).`;
  }
  if (v < PLAUSIBLE_KWH_PER_MILE.min)
    return `${shown} kWh per mile is less than a bus uses (about 1 to 3): check the figure.`;
  return null;
}
