import { FormArray, FormControl, FormGroup, type ValidatorFn } from '@angular/forms';
import {
  DAY_TYPES,
  clockTimeSchema,
  demandRatchetSchema,
  energyBlockSchema,
  fixedChargeSchema,
  minimumChargeSchema,
  isoDate,
  ratePlanDefinitionSchema,
  saveRatePlanSchema,
  seasonSchema,
  touPeriodSchema,
  type DayType,
  type RatePlanDefinition,
  type Season,
  type TouPeriod,
  type TouWindow,
  fieldPath,
} from '@nightyard/contracts';
import { z } from 'zod';
import { applyServerErrors, zodValidator, type FieldProblem } from '../shared/form-paths';

// The rate plan editor's form mirrors the definition's shape, so the API's field paths
// (definition.seasons[0].periods[1].windows[0].to) name its controls directly.

const season = seasonSchema.shape;
const period = touPeriodSchema.shape;
const fixed = fixedChargeSchema.shape;
const block = energyBlockSchema.shape;
const ratchet = demandRatchetSchema.shape;
const minimum = minimumChargeSchema.shape;

const atLeastOneDay: ValidatorFn = (group) =>
  Object.values(group.value as Record<string, boolean>).some(Boolean) ? null : { zod: 'Choose at least one day type' };

/** A window's own rules, on the window: an end different from the start. */
const differentEnds: ValidatorFn = (group) => {
  const from = group.get('from')?.value as string;
  const to = group.get('to')?.value as string;
  const same = from && to && from === to;
  return same ? { zod: 'A window needs an end different from its start' } : null;
};

const notAt24: ValidatorFn = (c) => (c.value === '24:00' ? { zod: 'A window cannot start at 24:00' } : null);

export function windowGroup(w?: TouWindow) {
  const days = w?.dayTypes ?? ['weekday'];
  return new FormGroup(
    {
      dayTypes: new FormGroup(
        Object.fromEntries(
          DAY_TYPES.map((d) => [d, new FormControl(days.includes(d), { nonNullable: true })]),
        ) as Record<DayType, FormControl<boolean>>,
        { validators: atLeastOneDay },
      ),
      from: new FormControl(w?.from ?? '', {
        nonNullable: true,
        validators: [zodValidator(clockTimeSchema, 'Enter the start as HH:mm'), notAt24],
      }),
      to: new FormControl(w?.to ?? '', {
        nonNullable: true,
        validators: zodValidator(clockTimeSchema, 'Enter the end as HH:mm'),
      }),
    },
    { validators: differentEnds },
  );
}
export type WindowGroup = ReturnType<typeof windowGroup>;

export function periodGroup(p?: TouPeriod) {
  return new FormGroup({
    name: new FormControl(p?.name ?? '', {
      nonNullable: true,
      validators: zodValidator(period.name, 'Name the period, e.g. on-peak'),
    }),
    price: new FormControl<number | null>(
      p?.price ?? null,
      zodValidator(period.price, 'Enter the energy price per kWh'),
    ),
    demandCharge: new FormControl<number | null>(
      p?.demandCharge ?? 0,
      zodValidator(period.demandCharge, 'Enter the demand charge per kW (0 if none)'),
    ),
    windows: new FormArray((p?.windows ?? [undefined]).map((w) => windowGroup(w))),
  });
}
export type PeriodGroup = ReturnType<typeof periodGroup>;

export function seasonGroup(s?: Season) {
  return new FormGroup({
    name: new FormControl(s?.name ?? '', {
      nonNullable: true,
      validators: zodValidator(season.name, 'Name the season'),
    }),
    fromMonth: new FormControl<number>(s?.fromMonth ?? 1, { nonNullable: true }),
    toMonth: new FormControl<number>(s?.toMonth ?? 12, { nonNullable: true }),
    offPeakPrice: new FormControl<number | null>(
      s?.offPeakPrice ?? null,
      zodValidator(season.offPeakPrice, 'Enter the off-peak price per kWh'),
    ),
    facilityDemandCharge: new FormControl<number | null>(
      s?.facilityDemandCharge ?? 0,
      zodValidator(season.facilityDemandCharge, 'Enter the facility demand charge per kW (0 if none)'),
    ),
    periods: new FormArray((s?.periods ?? []).map((p) => periodGroup(p))),
    energyBlocks: new FormArray((s?.energyBlocks ?? []).map((b) => energyBlockGroup(b))),
  });
}
export type SeasonGroup = ReturnType<typeof seasonGroup>;

/** One block of tiered energy: where it ends (empty on the last block) and its price change per kWh. */
export function energyBlockGroup(b?: Season['energyBlocks'][number]) {
  return new FormGroup({
    uptoKwh: new FormControl<number | null>(b?.uptoKwh ?? null, zodValidator(block.uptoKwh.unwrap())),
    adder: new FormControl<number | null>(
      b?.adder ?? 0,
      zodValidator(block.adder, 'Enter the price change per kWh (0 for the first block)'),
    ),
  });
}
export type EnergyBlockGroup = ReturnType<typeof energyBlockGroup>;

export function fixedChargeGroup(f?: RatePlanDefinition['fixedCharges'][number]) {
  return new FormGroup({
    name: new FormControl(f?.name ?? '', {
      nonNullable: true,
      validators: zodValidator(fixed.name, 'Name the charge, e.g. customer charge'),
    }),
    amount: new FormControl<number | null>(f?.amount ?? null, zodValidator(fixed.amount, 'Enter the amount')),
    per: new FormControl<'day' | 'month'>(f?.per ?? 'month', { nonNullable: true }),
  });
}
export type FixedChargeGroup = ReturnType<typeof fixedChargeGroup>;

export function holidayControl(date = '') {
  return new FormControl(date, {
    nonNullable: true,
    validators: zodValidator(isoDate('Write dates as YYYY-MM-DD'), 'Enter the date'),
  });
}

/** A new plan starts with one all-year season and no periods (every hour off-peak). */
export const BLANK_DEFINITION: RatePlanDefinition = {
  currency: 'USD',
  seasons: [
    {
      name: 'All year',
      fromMonth: 1,
      toMonth: 12,
      offPeakPrice: 0,
      facilityDemandCharge: 0,
      periods: [],
      energyBlocks: [],
    },
  ],
  fixedCharges: [],
  holidays: [],
  demandRatchet: null,
  minimumCharge: null,
};

export function ratePlanForm(name: string, def: RatePlanDefinition = BLANK_DEFINITION) {
  return new FormGroup({
    name: new FormControl(name, {
      nonNullable: true,
      validators: zodValidator(saveRatePlanSchema.shape.name, 'Name the rate plan'),
    }),
    currency: new FormControl(def.currency, {
      nonNullable: true,
      validators: zodValidator(
        z.string().regex(/^[A-Z]{3}$/, 'Use a three-letter currency code such as USD'),
        'Enter the currency code, e.g. USD',
      ),
    }),
    seasons: new FormArray(def.seasons.map((s) => seasonGroup(s))),
    fixedCharges: new FormArray(def.fixedCharges.map((f) => fixedChargeGroup(f))),
    holidays: new FormArray(def.holidays.map((d) => holidayControl(d))),
    // An empty percentage or amount: no ratchet, no minimum bill.
    demandRatchet: new FormGroup({
      percent: new FormControl<number | null>(def.demandRatchet?.percent ?? null, zodValidator(ratchet.percent)),
      months: new FormControl<number | null>(def.demandRatchet?.months ?? 11, zodValidator(ratchet.months)),
    }),
    minimumCharge: new FormGroup({
      amount: new FormControl<number | null>(def.minimumCharge?.amount ?? null, zodValidator(minimum.amount)),
      per: new FormControl<'day' | 'month'>(def.minimumCharge?.per ?? 'month', { nonNullable: true }),
    }),
  });
}
export type RatePlanForm = ReturnType<typeof ratePlanForm>;

/** The definition the form describes (numbers left empty count as 0; validation catches them first). */
export function definitionOf(form: RatePlanForm): RatePlanDefinition {
  const v = form.getRawValue();
  return {
    currency: v.currency.trim().toUpperCase(),
    seasons: v.seasons.map((s) => ({
      name: s.name.trim(),
      fromMonth: Number(s.fromMonth),
      toMonth: Number(s.toMonth),
      offPeakPrice: s.offPeakPrice ?? 0,
      facilityDemandCharge: s.facilityDemandCharge ?? 0,
      periods: s.periods.map((p) => ({
        name: p.name.trim(),
        price: p.price ?? 0,
        demandCharge: p.demandCharge ?? 0,
        windows: p.windows.map((w) => ({
          dayTypes: DAY_TYPES.filter((d) => w.dayTypes[d]),
          from: w.from.trim(),
          to: w.to.trim(),
        })),
      })),
      energyBlocks: s.energyBlocks.map((b, i) => ({
        uptoKwh: i === s.energyBlocks.length - 1 && b.uptoKwh === null ? null : (b.uptoKwh ?? 0),
        adder: b.adder ?? 0,
      })),
    })),
    fixedCharges: v.fixedCharges.map((f) => ({ name: f.name.trim(), amount: f.amount ?? 0, per: f.per })),
    holidays: v.holidays.map((d) => d.trim()),
    demandRatchet:
      v.demandRatchet.percent === null
        ? null
        : { percent: v.demandRatchet.percent, months: v.demandRatchet.months ?? 11 },
    minimumCharge:
      v.minimumCharge.amount === null ? null : { amount: v.minimumCharge.amount, per: v.minimumCharge.per },
  };
}

/**
 * The contract's whole-plan checks (seasons cover the year once, windows of a day type do not
 * overlap), run before sending: their messages land on the same controls the API's would.
 */
export function checkDefinition(form: RatePlanForm): FieldProblem[] {
  const result = ratePlanDefinitionSchema.safeParse(definitionOf(form));
  if (result.success) return [];
  const fields: Record<string, string> = {};
  for (const issue of result.error.issues) fields[fieldPath(issue.path) || 'seasons'] ??= issue.message;
  return applyServerErrors(form, fields);
}

/** Which rows a field path is in, in words ("Season 1, period 2, window 1"); empty for plan-level fields. */
export function describePath(path: string): string {
  const words: string[] = [];
  const re = /(seasons|periods|windows|fixedCharges|holidays|energyBlocks)\[(\d+)\]/g;
  const names: Record<string, string> = {
    seasons: 'Season',
    periods: 'period',
    windows: 'window',
    fixedCharges: 'Fixed charge',
    holidays: 'Holiday',
    energyBlocks: 'energy block',
  };
  for (const m of path.matchAll(re)) words.push(`${names[m[1]!]} ${Number(m[2]) + 1}`);
  return words.join(', ');
}
