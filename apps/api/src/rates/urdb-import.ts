import { z } from 'zod';
import {
  ratePlanDefinitionSchema,
  text,
  type RatePlanDefinition,
  type Season,
  type TouPeriod,
  type TouWindow,
  type UrdbImportResult,
  fieldPath,
} from '@nightyard/contracts';
import { DomainError } from '../http/errors';

// Field meanings follow the OpenEI Utility Rate Database (URDB) documentation; the structural
// rules (12 x 24 schedules, 12 flat-demand months, indices present, `max` on every tier but the
// last) are the ones NREL's REopt applies to URDB records.

/** A price in the physical range of its unit ($/kWh for energy, $/kW for demand). */
const price = (lo: number, hi: number, unit: string) =>
  z
    .number({ error: `Give the price in ${unit} as a number` })
    .min(lo, `Prices are ${lo} to ${hi.toLocaleString('en-US')} ${unit}`)
    .max(hi, `Prices are ${lo} to ${hi.toLocaleString('en-US')} ${unit}`);
const tierSchema = (lo: number, hi: number, unit: string) =>
  z.looseObject({
    rate: price(lo, hi, unit).optional(),
    adj: price(-hi, hi, unit).optional(),
    max: z.number().min(0, 'A tier limit cannot be negative').max(1e9, 'A tier limit looks too large').optional(),
    unit: text('The unit').max(20).optional(),
    sell: price(-hi, hi, unit).optional(),
  });
const structureSchema = (lo: number, hi: number, unit: string) =>
  z
    .array(
      z
        .array(tierSchema(lo, hi, unit))
        .min(1, 'A period needs at least one tier')
        .max(20),
    )
    .max(100);
const energyStructure = structureSchema(-10, 100, '$/kWh');
const demandStructure = structureSchema(0, 10_000, '$/kW');
const scheduleSchema = z
  .array(
    z
      .array(z.number().int().min(0, 'Period indices start at 0'), {
        error: 'Each month is a list of 24 period indices',
      })
      .length(24, 'Each month needs 24 hourly entries (hours 0-23)'),
  )
  .length(12, 'A schedule has 12 months');

const recordSchema = z.looseObject({
  name: text('The name').max(200).optional(),
  utility: text('The utility').max(200).optional(),
  label: text('The label').max(200).optional(),
  energyratestructure: energyStructure.optional(),
  energyweekdayschedule: scheduleSchema.optional(),
  energyweekendschedule: scheduleSchema.optional(),
  demandratestructure: demandStructure.optional(),
  demandweekdayschedule: scheduleSchema.optional(),
  demandweekendschedule: scheduleSchema.optional(),
  flatdemandstructure: demandStructure.optional(),
  flatdemandmonths: z
    .array(z.number().int().min(0))
    .length(12, 'flatdemandmonths needs 12 entries, one per month')
    .optional(),
  fixedchargefirstmeter: z
    .number()
    .min(0, 'A fixed charge cannot be negative')
    .max(10_000_000, 'The fixed charge looks too large')
    .optional(),
  fixedchargeunits: text('The unit').max(20).optional(),
  mincharge: z
    .number()
    .min(0, 'A minimum charge cannot be negative')
    .max(10_000_000, 'The minimum charge looks too large')
    .optional(),
  minchargeunits: text('The unit').max(20).optional(),
  demandratchetpercentage: z
    .array(z.number().min(0, 'A ratchet percentage cannot be negative').max(100, 'A ratchet percentage is at most 100'))
    .length(12, 'demandratchetpercentage needs 12 entries, one per month')
    .optional(),
  lookbackrange: z.number().int().min(0).max(36, 'A look-back of at most 36 months').optional(),
  demandwindow: z.number().min(1).max(1440).optional(),
  demandunits: text('The unit').max(20).optional(),
  flatdemandunit: text('The unit').max(20).optional(),
});
type UrdbRecord = z.infer<typeof recordSchema>;
type Tier = z.infer<ReturnType<typeof tierSchema>>;

const IGNORED_FIELDS: Record<string, string> = {
  coincidentratestructure: 'coincident demand charges',
  energyattrs: 'energy attributes',
  demandattrs: 'demand attributes',
  fueladjustmentsmonthly: 'monthly fuel adjustments',
  annualmincharge: 'the annual minimum charge',
  fixedchargeeaaddl: 'additional meter charges',
  lookbackpercent: 'demand look-back',
};

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

function fail(fields: Record<string, string>): never {
  const names = Object.keys(fields);
  throw new DomainError(
    'validation_failed',
    `This URDB record cannot be imported: check ${names.slice(0, 5).join(', ')}${names.length > 5 ? ', ...' : ''}`,
    fields,
  );
}

/** Accepts one record or the API's `{ items: [record] }` envelope. */
function unwrap(input: unknown): unknown {
  if (input && typeof input === 'object' && 'items' in input && Array.isArray((input as { items: unknown[] }).items)) {
    const items = (input as { items: unknown[] }).items;
    if (items.length !== 1)
      fail({ items: `The file holds ${items.length} rate records: export just the one to import` });
    return items[0];
  }
  return input;
}

const tierPrice = (t: Tier) => (t.rate ?? 0) + (t.adj ?? 0);

/** $/unit of a period: the first tier's rate plus adjustment; notes when other tiers were ignored. */
function periodRate(tiers: Tier[], what: string, notes: string[], tiersImported = false): number {
  const first = tiers[0]!;
  const rate = tierPrice(first);
  if (tiers.length > 1 && !tiersImported) {
    notes.push(
      `${what} has ${tiers.length} tiers; tiered prices are not supported, so the first tier's price (${rate}) applies to all use.`,
    );
  }
  return rate;
}

function checkStructure(
  rec: UrdbRecord,
  structureKey: 'energyratestructure' | 'demandratestructure' | 'flatdemandstructure',
  errors: Record<string, string>,
) {
  const structure = rec[structureKey];
  structure?.forEach((tiers, p) =>
    tiers.forEach((t, i) => {
      if (i < tiers.length - 1 && t.max === undefined)
        errors[`${structureKey}[${p}][${i}].max`] = 'Every tier but the last needs a max';
      if (t.rate === undefined && t.adj === undefined)
        errors[`${structureKey}[${p}][${i}].rate`] = 'A tier needs a rate';
      else if (i === 0 && (t.rate ?? 0) + (t.adj ?? 0) < 0) {
        errors[`${structureKey}[${p}][${i}].rate`] =
          `The price with its adjustment is ${(t.rate ?? 0) + (t.adj ?? 0)}: Nightyard needs prices of 0 or more`;
      }
      if (structureKey === 'energyratestructure' && t.unit !== undefined && t.unit !== 'kWh') {
        errors[`${structureKey}[${p}][${i}].unit`] =
          `Unit "${t.unit}" is not supported: only kWh prices can be imported`;
      }
    }),
  );
}

function checkIndices(
  rec: UrdbRecord,
  scheduleKey: keyof UrdbRecord,
  structureKey: keyof UrdbRecord,
  errors: Record<string, string>,
) {
  const schedule = rec[scheduleKey] as number[][] | undefined;
  const structure = rec[structureKey] as unknown[] | undefined;
  if (!schedule) return;
  if (!structure) {
    errors[String(structureKey)] ??= `${String(scheduleKey)} is given but ${String(structureKey)} is missing`;
    return;
  }
  schedule.forEach((row, m) =>
    row.forEach((idx, h) => {
      if (idx >= structure.length) {
        errors[`${String(scheduleKey)}[${m}][${h}]`] ??=
          `Period ${idx} is not in ${String(structureKey)} (it has periods 0-${structure.length - 1})`;
      }
    }),
  );
}

interface HourKey {
  e: number;
  d: number | null;
}
const keyOf = (k: HourKey) => `${k.e}/${k.d ?? '-'}`;

/** Maps a URDB record to a Nightyard rate plan, with notes on everything that was simplified. */
export function importUrdb(input: unknown): UrdbImportResult {
  const parsed = recordSchema.safeParse(unwrap(input));
  if (!parsed.success) {
    const fields: Record<string, string> = {};
    for (const i of parsed.error.issues) fields[fieldPath(i.path) || 'record'] ??= i.message;
    fail(fields);
  }
  const rec = parsed.data;
  const errors: Record<string, string> = {};
  if (!rec.energyratestructure || !rec.energyweekdayschedule || !rec.energyweekendschedule) {
    for (const k of ['energyratestructure', 'energyweekdayschedule', 'energyweekendschedule'] as const) {
      if (!rec[k]) errors[k] = 'Required: Nightyard plans against time-of-use energy prices';
    }
  }
  if (rec.demandratestructure && (!rec.demandweekdayschedule || !rec.demandweekendschedule)) {
    errors.demandweekdayschedule = 'demandratestructure needs both demand schedules';
  }
  if (rec.flatdemandstructure && !rec.flatdemandmonths)
    errors.flatdemandmonths = 'flatdemandstructure needs flatdemandmonths';
  if (rec.demandunits && rec.demandunits !== 'kW')
    errors.demandunits = `Demand in "${rec.demandunits}" is not supported: only kW`;
  if (rec.flatdemandunit && rec.flatdemandunit !== 'kW')
    errors.flatdemandunit = `Flat demand in "${rec.flatdemandunit}" is not supported: only kW`;
  checkStructure(rec, 'energyratestructure', errors);
  checkStructure(rec, 'demandratestructure', errors);
  checkStructure(rec, 'flatdemandstructure', errors);
  checkIndices(rec, 'energyweekdayschedule', 'energyratestructure', errors);
  checkIndices(rec, 'energyweekendschedule', 'energyratestructure', errors);
  checkIndices(rec, 'demandweekdayschedule', 'demandratestructure', errors);
  checkIndices(rec, 'demandweekendschedule', 'demandratestructure', errors);
  rec.flatdemandmonths?.forEach((idx, m) => {
    if (!rec.flatdemandstructure || idx >= rec.flatdemandstructure.length) {
      errors[`flatdemandmonths[${m}]`] = `Period ${idx} is not in flatdemandstructure`;
    }
  });
  let fixed: RatePlanDefinition['fixedCharges'] = [];
  if (rec.fixedchargefirstmeter !== undefined && rec.fixedchargefirstmeter > 0) {
    const units = rec.fixedchargeunits ?? '$/month';
    if (units === '$/day') fixed = [{ name: 'Fixed charge', amount: rec.fixedchargefirstmeter, per: 'day' }];
    else if (units === '$/month') fixed = [{ name: 'Fixed charge', amount: rec.fixedchargefirstmeter, per: 'month' }];
    else if (units === '$/year')
      fixed = [
        {
          name: 'Fixed charge (yearly, spread over months)',
          amount: Math.round((rec.fixedchargefirstmeter / 12) * 100) / 100,
          per: 'month',
        },
      ];
    else errors.fixedchargeunits = `"${units}" is not supported: use $/day, $/month or $/year`;
  }
  if (Object.keys(errors).length) fail(errors);

  const notes: string[] = [];
  const energyBlocks = energyBlocksOf(rec.energyratestructure!, notes);
  const energyPrice = rec.energyratestructure!.map((t, i) =>
    periodRate(t, `Energy period ${i}`, notes, energyBlocks !== null),
  );
  const demandRatchet = ratchetOf(rec, notes);
  let minimumCharge: RatePlanDefinition['minimumCharge'] = null;
  if (rec.mincharge !== undefined && rec.mincharge > 0) {
    const units = rec.minchargeunits ?? '$/month';
    if (units === '$/month') minimumCharge = { amount: rec.mincharge, per: 'month' };
    else if (units === '$/day') minimumCharge = { amount: rec.mincharge, per: 'day' };
    else if (units === '$/year') {
      minimumCharge = { amount: Math.round((rec.mincharge / 12) * 100) / 100, per: 'month' };
      notes.push(`The yearly minimum charge of ${rec.mincharge} is applied as ${minimumCharge.amount} a month.`);
    } else notes.push(`Not supported, left out: a minimum charge in "${units}" (mincharge).`);
  }
  if (rec.demandwindow !== undefined && rec.demandwindow !== 15) {
    notes.push(
      `The record measures demand over ${rec.demandwindow} minutes; Nightyard bills the highest 15-minute demand.`,
    );
  }
  const demandPrice = (rec.demandratestructure ?? []).map((t, i) => periodRate(t, `Demand period ${i}`, notes));
  const flatPrice = (rec.flatdemandstructure ?? []).map((t, i) => periodRate(t, `Flat demand period ${i}`, notes));
  if (fixed[0]?.name.includes('yearly'))
    notes.push(`The yearly fixed charge of ${rec.fixedchargefirstmeter} is spread as ${fixed[0].amount} a month.`);
  for (const [field, what] of Object.entries(IGNORED_FIELDS)) {
    if (field in rec && rec[field] !== null && rec[field] !== undefined)
      notes.push(`Not supported, left out: ${what} (${field}).`);
  }
  if (rec.energyratestructure!.some((tiers) => tiers.some((t) => t.sell !== undefined && t.sell !== 0))) {
    notes.push('Sell (export) prices are left out: depots do not export energy.');
  }
  notes.push('URDB has no holiday schedule: holidays use the weekend hours (common practice).');

  const hourKey = (m: number, h: number, weekend: boolean): HourKey => ({
    e: (weekend ? rec.energyweekendschedule! : rec.energyweekdayschedule!)[m]![h]!,
    d: rec.demandratestructure ? (weekend ? rec.demandweekendschedule! : rec.demandweekdayschedule!)[m]![h]! : null,
  });
  const monthSignature = (m: number) =>
    JSON.stringify([
      Array.from({ length: 24 }, (_, h) => keyOf(hourKey(m, h, false))),
      Array.from({ length: 24 }, (_, h) => keyOf(hourKey(m, h, true))),
      rec.flatdemandmonths?.[m] ?? null,
    ]);

  // Runs of consecutive months (cyclically) with the same hours and prices become seasons.
  const sig = Array.from({ length: 12 }, (_, m) => monthSignature(m));
  let first = 0;
  while (first < 12 && sig[(first + 11) % 12] === sig[first]) first++;
  if (first === 12) first = 0;
  const ranges: [number, number][] = [];
  for (let i = 0; i < 12;) {
    const start = (first + i) % 12;
    let len = 1;
    while (i + len < 12 && sig[(start + len) % 12] === sig[start]) len++;
    ranges.push([start, (start + len - 1) % 12]);
    i += len;
  }

  const seasons: Season[] = ranges.map(([from, to]) => buildSeason(from, to));

  function buildSeason(from: number, to: number): Season {
    const hours = new Map<string, { key: HourKey; count: number }>();
    for (const weekend of [false, true]) {
      for (let h = 0; h < 24; h++) {
        const k = hourKey(from, h, weekend);
        const entry = hours.get(keyOf(k)) ?? { key: k, count: 0 };
        entry.count += weekend ? 2 : 5;
        hours.set(keyOf(k), entry);
      }
    }
    const price = (k: HourKey) => energyPrice[k.e]!;
    const demand = (k: HourKey) => (k.d === null ? 0 : demandPrice[k.d]!);
    // The most common hours become off-peak, if they carry no demand charge of their own.
    const byCount = [...hours.values()].sort((a, b) => b.count - a.count || price(a.key) - price(b.key));
    const offPeak = byCount.find((x) => demand(x.key) === 0)?.key ?? null;
    const named = [...hours.values()].map((x) => x.key).filter((k) => !offPeak || keyOf(k) !== keyOf(offPeak));
    named.sort((a, b) => price(b) - price(a) || demand(b) - demand(a));
    const names = periodNames(named.length, offPeak !== null);
    const periods: TouPeriod[] = named.map((k, i) => ({
      name: names[i]!,
      price: price(k),
      demandCharge: demand(k),
      windows: windowsFor(from, k),
    }));
    const flatIdx = rec.flatdemandmonths?.[from];
    const label = from === to ? MONTHS[from]! : `${MONTHS[from]}-${MONTHS[to]}`;
    return {
      name: ranges.length === 1 ? 'All year' : label,
      fromMonth: from + 1,
      toMonth: to + 1,
      offPeakPrice: offPeak ? price(offPeak) : Math.min(...named.map(price)),
      facilityDemandCharge: flatIdx === undefined ? 0 : flatPrice[flatIdx]!,
      periods,
      energyBlocks: energyBlocks ?? [],
    };
  }

  function windowsFor(month: number, k: HourKey): TouWindow[] {
    const runs = (weekend: boolean) => {
      const out: [number, number][] = [];
      for (let h = 0; h < 24; h++) {
        if (keyOf(hourKey(month, h, weekend)) !== keyOf(k)) continue;
        const last = out.at(-1);
        if (last && last[1] === h) last[1] = h + 1;
        else out.push([h, h + 1]);
      }
      return out;
    };
    const hhmm = (h: number) => `${String(h).padStart(2, '0')}:00`;
    const weekday = runs(false);
    const weekend = runs(true);
    const same = JSON.stringify(weekday) === JSON.stringify(weekend);
    const toWindows = (r: [number, number][], dayTypes: TouWindow['dayTypes']) =>
      r.map(([a, b]) => ({ dayTypes, from: hhmm(a), to: hhmm(b) }));
    return same
      ? toWindows(weekday, ['weekday', 'weekend', 'holiday'])
      : [...toWindows(weekday, ['weekday']), ...toWindows(weekend, ['weekend', 'holiday'])];
  }

  // What the record maps to must still be a valid plan (e.g. a yearly charge within range).
  const mapped = ratePlanDefinitionSchema.safeParse({
    currency: 'USD',
    seasons,
    fixedCharges: fixed,
    holidays: [],
    demandRatchet,
    minimumCharge,
  });
  if (!mapped.success) {
    const fields: Record<string, string> = {};
    for (const i of mapped.error.issues) fields[`plan.${fieldPath(i.path)}`] ??= i.message;
    fail(fields);
  }
  const definition = mapped.data;
  const name = [rec.utility, rec.name].filter(Boolean).join(': ') || 'Imported URDB rate';
  return { name, definition, notes };
}

/**
 * Energy tiers as monthly kWh blocks: URDB gives each period its own tiers, each with `max` (the
 * tier's upper kWh limit in the month) and `rate` + `adj`. Nightyard's blocks are one set of limits
 * with a price change on top of each period's first-tier price, so they import when every period
 * has the same limits and the same changes (a flat or a uniformly tiered rate); otherwise the first
 * tier's price applies and a note says so. Null when no period has more than one tier.
 */
function energyBlocksOf(structure: Tier[][], notes: string[]): { uptoKwh: number | null; adder: number }[] | null {
  if (!structure.some((tiers) => tiers.length > 1)) return null;
  const shape = (tiers: Tier[]) =>
    tiers.map((t, i) => ({
      uptoKwh: i === tiers.length - 1 ? null : t.max!,
      adder: Math.round((tierPrice(t) - tierPrice(tiers[0]!)) * 1e9) / 1e9,
    }));
  const first = JSON.stringify(shape(structure[0]!));
  if (
    structure.some((tiers) => JSON.stringify(shape(tiers)) !== first) ||
    structure[0]!.some((t) => t.unit !== undefined && t.unit !== 'kWh')
  ) {
    notes.push(
      "The energy tiers differ between periods: they are not imported, each period's first tier's price applies to all use.",
    );
    return null;
  }
  const blocks = shape(structure[0]!);
  notes.push(
    `Energy tiers imported as ${blocks.length} monthly kWh blocks, each priced as a change on the period's first-tier price.`,
  );
  return blocks;
}

/**
 * URDB's demand ratchet: `demandratchetpercentage` holds 12 values, one per month (fractions
 * such as 0.8 or percentages such as 80; both are read, from memory of records seen), and
 * `lookbackrange` the months looked back over. Nightyard keeps one percentage: the highest.
 */
function ratchetOf(rec: UrdbRecord, notes: string[]): RatePlanDefinition['demandRatchet'] {
  const values = rec.demandratchetpercentage;
  if (!values || values.every((v) => v === 0)) return null;
  const asPercent = values.map((v) => (values.every((x) => x <= 1) ? v * 100 : v));
  const percent = Math.max(...asPercent);
  if (asPercent.some((v) => v !== percent)) {
    notes.push(
      `The demand ratchet varies by month (${asPercent.join(', ')} %): Nightyard applies the highest, ${percent} %, in every month.`,
    );
  }
  const months = rec.lookbackrange && rec.lookbackrange > 0 ? rec.lookbackrange : 11;
  if (!rec.lookbackrange)
    notes.push(
      'The record gives no look-back range: the ratchet looks back over the previous 11 months (common practice).',
    );
  return { percent: Math.round(percent * 1e6) / 1e6, months };
}

function periodNames(n: number, hasOffPeak: boolean): string[] {
  if (n === 0) return [];
  if (n === 1) return [hasOffPeak ? 'on-peak' : 'all hours'];
  if (n === 2) return hasOffPeak ? ['on-peak', 'mid-peak'] : ['on-peak', 'off-peak'];
  if (n === 3 && !hasOffPeak) return ['on-peak', 'mid-peak', 'off-peak'];
  return Array.from({ length: n }, (_, i) => (i === 0 ? 'on-peak' : `period ${i + 1}`));
}
