import { z } from 'zod';
import { lower, text } from './text';
import { isTimeZone } from './depot-setup';
import { isoDate } from './dates';

/** Local wall-clock time `HH:mm`; `24:00` is the end of the day. */
export const clockTimeSchema = z
  .string()
  .regex(/^(([01]\d|2[0-3]):[0-5]\d|24:00)$/, 'Write the time as HH:mm, 00:00 to 24:00');

export const DAY_TYPES = ['weekday', 'weekend', 'holiday'] as const;
export const dayTypeSchema = z.enum(DAY_TYPES);
export type DayType = z.infer<typeof dayTypeSchema>;

const money = (what: string, max: number, unit: string) =>
  z
    .number({ error: `Enter ${lower(what)} as a number` })
    .min(0, `${what} cannot be negative`)
    .max(max, `${what} looks too large (at most ${max.toLocaleString('en-US')} ${unit})`);
/** Physical ranges: an energy price above $100/kWh or a demand charge above $10,000/kW is a typo. */
const energyPrice = (what: string) => money(what, 100, 'per kWh');
const demandCharge = (what: string) => money(what, 10_000, 'per kW');

/**
 * A time-of-use window. It belongs to the day it starts on; a `to` earlier than `from` runs past
 * midnight into the next day.
 */
export const touWindowSchema = z
  .strictObject({
    dayTypes: z
      .array(dayTypeSchema)
      .min(1, 'Choose at least one day type')
      .refine((d) => new Set(d).size === d.length, 'Each day type once'),
    from: clockTimeSchema,
    to: clockTimeSchema,
  })
  .refine((w) => w.from !== w.to, { message: 'A window needs an end different from its start', path: ['to'] })
  .refine((w) => w.from !== '24:00', { message: 'A window cannot start at 24:00', path: ['from'] });
export type TouWindow = z.infer<typeof touWindowSchema>;

export const touPeriodSchema = z.strictObject({
  name: text('The period name').trim().min(1, 'Name the period, e.g. on-peak').max(60),
  /** Energy price per kWh. */
  price: energyPrice('The energy price'),
  /** Demand charge per kW on the highest 15-minute demand inside this period's windows. */
  demandCharge: demandCharge('The demand charge').default(0),
  windows: z.array(touWindowSchema).min(1, 'A period needs at least one window').max(48),
});
export type TouPeriod = z.infer<typeof touPeriodSchema>;

const month = z
  .number()
  .int()
  .min(1, 'Months are 1 (January) to 12 (December)')
  .max(12, 'Months are 1 (January) to 12 (December)');

/**
 * A block of the billing period's energy (tiered energy): the kWh of the period from the previous
 * block's end up to `uptoKwh` (null: every kWh above) cost `adder` per kWh more than the
 * time-of-use price (negative for a declining block). Blocks are consumed in time order.
 */
export const energyBlockSchema = z.strictObject({
  uptoKwh: z
    .number({ error: "Enter the block's end in kWh as a number" })
    .positive('A block ends above 0 kWh')
    .max(100_000_000, 'A block ends at most at 100,000,000 kWh a month')
    .nullable(),
  adder: z
    .number({ error: "Enter the block's price change as a number" })
    .min(-100, "A block's price change is at least -$100 per kWh")
    .max(100, "A block's price change is at most $100 per kWh"),
});
export type EnergyBlock = z.infer<typeof energyBlockSchema>;

const energyBlocksSchema = z
  .array(energyBlockSchema)
  .max(12, 'At most 12 energy blocks')
  .superRefine((blocks, ctx) => {
    blocks.forEach((b, i) => {
      const last = i === blocks.length - 1;
      if (!last && b.uptoKwh === null)
        ctx.addIssue({ code: 'custom', path: [i, 'uptoKwh'], message: 'Only the last block can be open-ended' });
      if (last && b.uptoKwh !== null)
        ctx.addIssue({
          code: 'custom',
          path: [i, 'uptoKwh'],
          message: 'The last block covers every kWh above the one before: leave its end empty',
        });
      const prev = blocks[i - 1]?.uptoKwh;
      if (i > 0 && prev != null && b.uptoKwh !== null && b.uptoKwh <= prev) {
        ctx.addIssue({
          code: 'custom',
          path: [i, 'uptoKwh'],
          message: `Each block ends above the previous one (${prev} kWh)`,
        });
      }
    });
  });

export const seasonSchema = z.strictObject({
  name: text('The season name').trim().min(1, 'Name the season').max(60),
  /** First and last month of the season; a range may wrap past December (10 to 5). */
  fromMonth: month,
  toMonth: month,
  /** Price of every hour outside the periods' windows. */
  offPeakPrice: energyPrice('The off-peak price'),
  /** Demand charge per kW on the highest 15-minute demand of the billing period, at any hour. */
  facilityDemandCharge: demandCharge('The facility demand charge').default(0),
  periods: z.array(touPeriodSchema).max(24),
  /** Tiered energy: monthly kWh blocks with a price change each (empty: one price per period). */
  energyBlocks: energyBlocksSchema.default([]),
});
export type Season = z.infer<typeof seasonSchema>;

export const fixedChargeSchema = z.strictObject({
  name: text('The charge name').trim().min(1, 'Name the charge').max(80),
  amount: money('The fixed charge', 1_000_000, 'per day or month'),
  per: z.enum(['day', 'month']),
});

/**
 * A demand ratchet: the facility demand billed is at least `percent` of the highest facility
 * demand of the previous `months` billing periods.
 */
export const demandRatchetSchema = z.strictObject({
  percent: z
    .number({ error: 'Enter the ratchet percentage as a number' })
    .gt(0, 'The ratchet is above 0 %')
    .max(100, 'The ratchet is at most 100 %'),
  months: z
    .number({ error: "Enter the ratchet's months as a number" })
    .int('Whole months')
    .min(1, 'At least 1 previous month')
    .max(36, 'At most 36 previous months'),
});
export type DemandRatchet = z.infer<typeof demandRatchetSchema>;

/** A minimum bill: a period's bill is at least this much (per month, or per day of the period). */
export const minimumChargeSchema = z.strictObject({
  amount: money('The minimum bill', 1_000_000, 'per day or month'),
  per: z.enum(['day', 'month']),
});

export const ratePlanDefinitionSchema = z
  .strictObject({
    currency: text('The currency').regex(/^[A-Z]{3}$/, 'Use a three-letter currency code such as USD'),
    seasons: z.array(seasonSchema).min(1, 'A rate plan needs at least one season').max(12),
    fixedCharges: z.array(fixedChargeSchema).max(20).default([]),
    /** Dates priced as holidays (ISO `YYYY-MM-DD`). */
    holidays: z.array(isoDate('Write dates as YYYY-MM-DD')).max(400).default([]),
    demandRatchet: demandRatchetSchema.nullable().default(null),
    minimumCharge: minimumChargeSchema.nullable().default(null),
  })
  .superRefine((plan, ctx) => {
    checkSeasonsCoverYear(plan.seasons, ctx);
    plan.seasons.forEach((s, i) => checkWindowsDoNotOverlap(s, i, ctx));
    // A date typed over another's is one holiday lost without a word (New Year's Day over Christmas).
    plan.holidays.forEach((date, i) => {
      const first = plan.holidays.indexOf(date);
      if (first < i)
        ctx.addIssue({
          code: 'custom',
          path: ['holidays', i],
          message: `${date} is already holiday ${first + 1}: remove one, or give the date you meant`,
        });
    });
  });
export type RatePlanDefinition = z.infer<typeof ratePlanDefinitionSchema>;

export function seasonMonths(s: { fromMonth: number; toMonth: number }): number[] {
  const out: number[] = [];
  // The plan's own checks may run beside a month already refused (13, 1.5): walk none then,
  // rather than round the year for ever.
  const isMonth = (m: number) => Number.isInteger(m) && m >= 1 && m <= 12;
  if (!isMonth(s.fromMonth) || !isMonth(s.toMonth)) return out;
  for (let m = s.fromMonth; ; m = (m % 12) + 1) {
    out.push(m);
    if (m === s.toMonth) return out;
  }
}

/** Month names, January first (seasons, their checks and the rate screens). */
export const MONTH_NAMES = [
  'January',
  'February',
  'March',
  'April',
  'May',
  'June',
  'July',
  'August',
  'September',
  'October',
  'November',
  'December',
] as const;

function checkSeasonsCoverYear(seasons: Season[], ctx: z.RefinementCtx) {
  const owner = new Map<number, number>();
  seasons.forEach((s, i) => {
    for (const m of seasonMonths(s)) {
      if (owner.has(m)) {
        ctx.addIssue({
          code: 'custom',
          path: ['seasons', i, 'fromMonth'],
          message: `${MONTH_NAMES[m - 1]} is already in season "${seasons[owner.get(m)!]!.name}"`,
        });
      } else owner.set(m, i);
    }
  });
  const missing = MONTH_NAMES.filter((_, m) => !owner.has(m + 1));
  if (missing.length && owner.size) {
    ctx.addIssue({ code: 'custom', path: ['seasons'], message: `No season covers ${missing.join(', ')}` });
  }
}

const minutes = (t: string) => Number(t.slice(0, 2)) * 60 + Number(t.slice(3));
const clock = (m: number) => `${String(Math.floor(m / 60) % 24).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`;

/** Minute ranges a window covers, measured from the start of its own day (may exceed 1440). */
export function windowMinutes(w: { from: string; to: string }): [number, number] {
  const from = minutes(w.from);
  let to = minutes(w.to);
  if (to <= from) to += 1440;
  return [from, to];
}

function checkWindowsDoNotOverlap(season: Season, si: number, ctx: z.RefinementCtx) {
  // Two windows of one day type clash when their minute ranges meet, also across midnight.
  for (const dayType of DAY_TYPES) {
    const taken: { range: [number, number]; where: string }[] = [];
    season.periods.forEach((p, pi) =>
      p.windows.forEach((w, wi) => {
        if (!w.dayTypes.includes(dayType)) return;
        const [a, b] = windowMinutes(w);
        for (const t of taken) {
          for (const shift of [-1440, 0, 1440]) {
            const lo = Math.max(a, t.range[0] + shift);
            const hi = Math.min(b, t.range[1] + shift);
            if (lo < hi) {
              ctx.addIssue({
                code: 'custom',
                path: ['seasons', si, 'periods', pi, 'windows', wi],
                message: `Overlaps ${t.where} on ${dayType}s from ${clock(lo)} to ${clock(hi)}`,
              });
              return;
            }
          }
        }
        taken.push({ range: [a, b], where: `"${p.name}" ${w.from}-${w.to}` });
      }),
    );
  }
}

export const ratePlanSchema = z.object({
  id: z.uuid(),
  name: z.string(),
  definition: ratePlanDefinitionSchema,
  createdAt: z.iso.datetime({ offset: true }),
});
export type RatePlan = z.infer<typeof ratePlanSchema>;

export const saveRatePlanSchema = z.strictObject({
  name: text('The rate plan name').trim().min(1, 'Name the rate plan').max(120),
  definition: ratePlanDefinitionSchema,
});
export type SaveRatePlan = z.infer<typeof saveRatePlanSchema>;

export const assignRatePlanSchema = z.strictObject({
  ratePlanId: z.uuid('Choose a rate plan'),
  effectiveFrom: isoDate(),
});

export const previewQuerySchema = z.strictObject({
  date: isoDate(),
  timezone: text('The time zone')
    .max(64)
    .refine(isTimeZone, 'Choose an IANA time zone such as America/Chicago')
    .optional(),
});

/** One hour (or part, on clock-change days) of a previewed day. */
export const previewIntervalSchema = z.object({
  start: z.string(),
  end: z.string(),
  period: z.string(),
  price: z.number(),
  demandCharge: z.number(),
});
export const ratePreviewSchema = z.object({
  date: z.string(),
  dayType: dayTypeSchema,
  season: z.string(),
  currency: z.string(),
  facilityDemandCharge: z.number(),
  intervals: z.array(previewIntervalSchema),
});
export type RatePreview = z.infer<typeof ratePreviewSchema>;

export const urdbImportResultSchema = z.object({
  name: z.string(),
  definition: ratePlanDefinitionSchema,
  notes: z.array(z.string()),
});
export type UrdbImportResult = z.infer<typeof urdbImportResultSchema>;
