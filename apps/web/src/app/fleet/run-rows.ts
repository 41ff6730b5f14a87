import { FormArray, FormControl, FormGroup, type ValidatorFn } from '@angular/forms';
import type { Run, RunInput } from '@nightyard/contracts';
import { numberIn } from './bus-form';
import { CLOCK_TIME as CLOCK, addDays } from '@nightyard/contracts/depot-time';
import { clockTimeValidator } from '../shared/clock-time-input';
import { SOC_SOURCE_LABELS, clockOf, dateOf } from './fleet-format';

/** What a row shows beside its inputs: where its state of charge came from, as saved. */
export interface RunMeta {
  /** Saved run id; null for a row added here. */
  id: string | null;
  savedSocPct: number | null;
  source: Run['arrivalSocSource'];
  estimatedSocPct: number | null;
  energyKwh: number | null;
}

const clock = (what: string): ValidatorFn =>
  clockTimeValidator(`Enter the ${what}`, 'message', `Write the ${what} as HH:mm, 24-hour (for example 21:30)`);

/** Miles or kWh: at least one of the two (the message goes on miles, as the API puts it). */
const milesOrKwh: ValidatorFn = (c) => {
  const kwh = c.parent?.get('kwh')?.value as number | null | undefined;
  const miles = c.value as number | null;
  const empty = (v: unknown) => v === null || v === undefined || v === '';
  return empty(miles) && empty(kwh) ? { message: "Give the run's miles or its energy (kWh)" } : null;
};

export function runRow(run: Partial<Run> = {}) {
  return new FormGroup({
    busNumber: new FormControl(run.busNumber ?? '', {
      nonNullable: true,
      validators: [(c) => (c.value ? null : { message: 'Choose the bus' })],
    }),
    pullOut: new FormControl(run.pullOut ? clockOf(run.pullOut) : '', {
      nonNullable: true,
      validators: [clock('pull-out time')],
    }),
    pullIn: new FormControl(run.pullIn ? clockOf(run.pullIn) : '', {
      nonNullable: true,
      validators: [clock('pull-in time')],
    }),
    miles: new FormControl<number | null>(run.miles ?? null, { validators: [numberIn('Miles', 0, 1000), milesOrKwh] }),
    kwh: new FormControl<number | null>(run.kwh ?? null, { validators: [numberIn('Energy', 0, 2000)] }),
    arrivalSocPct: new FormControl<number | null>(run.arrivalSocPct ?? null, {
      validators: [numberIn('The state of charge on arrival', 0, 100)],
    }),
    meta: new FormControl<RunMeta>(
      {
        id: run.id ?? null,
        savedSocPct: run.arrivalSocPct ?? null,
        source: run.arrivalSocSource ?? null,
        estimatedSocPct: run.estimatedArrivalSocPct ?? null,
        energyKwh: run.energyKwh ?? null,
      },
      { nonNullable: true },
    ),
  });
}
export type RunRow = ReturnType<typeof runRow>;

export function serviceDayForm() {
  return new FormGroup({
    forecastLowF: new FormControl<number | null>(null, { validators: [numberIn('The forecast low', -80, 130)] }),
    runs: new FormArray<RunRow>([]),
  });
}
export type ServiceDayForm = ReturnType<typeof serviceDayForm>;

/** True when the pull-in (HH:mm) is the next morning: not after the pull-out on the clock. */
export function pullInNextDay(pullOut: string, pullIn: string): boolean {
  return CLOCK.test(pullOut) && CLOCK.test(pullIn) && pullIn <= pullOut;
}

/** A row as the API takes it, on service day `date` (a pull-in before the pull-out is the next day). */
export function runInputOf(row: RunRow, date: string): RunInput {
  const v = row.getRawValue();
  const num = (x: number | null) => (x === null || (x as unknown) === '' ? null : Number(x));
  const pullInDate = pullInNextDay(v.pullOut, v.pullIn) ? addDays(date, 1) : date;
  return {
    busNumber: v.busNumber,
    pullOut: `${date}T${v.pullOut}`,
    pullIn: `${pullInDate}T${v.pullIn}`,
    miles: num(v.miles),
    kwh: num(v.kwh),
    arrivalSocPct: num(v.arrivalSocPct),
  };
}

/** Where a saved run's state of charge came from, or what will be used instead, in words. */
export function socSourceText(row: RunRow): string {
  const { meta, arrivalSocPct } = row.getRawValue();
  const soc = arrivalSocPct === null || (arrivalSocPct as unknown) === '' ? null : Number(arrivalSocPct);
  if (soc === null) {
    // The paragraph above the table says what an estimate is based on.
    return meta.estimatedSocPct === null || meta.id === null
      ? 'Estimated when saved'
      : `Estimated ${formatPct(meta.estimatedSocPct)}`;
  }
  if (meta.id !== null && meta.savedSocPct === soc && meta.source)
    return meta.source === 'estimated' ? 'Typed' : SOC_SOURCE_LABELS[meta.source];
  return 'Typed (not saved yet)';
}

export function formatPct(v: number): string {
  return `${new Intl.NumberFormat(undefined, { maximumFractionDigits: 1 }).format(v)} %`;
}

/** A run's pull-in as shown in a read-only table: its clock, and "next day" when it is. */
export function pullInText(run: Pick<Run, 'pullIn'>, date: string): string {
  return dateOf(run.pullIn) === date ? clockOf(run.pullIn) : `${clockOf(run.pullIn)} next day`;
}
