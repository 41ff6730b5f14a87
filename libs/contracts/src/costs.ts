import { z } from 'zod';
import { isoDate } from './dates';
import { text } from './text';

export const billLineSchema = z.object({
  name: z.string(),
  quantity: z.number(),
  unit: z.enum(['kWh', 'kW', 'day', 'month']),
  rate: z.number(),
  /** Full precision: shown rounded with `footedCents`, so a table's lines add up to its total. */
  amount: z.number(),
  /** Where the quantity comes from when not simply the intervals (a demand ratchet, a peak entered in Depot). */
  note: z.string().optional(),
});
export const billSchema = z.object({
  currency: z.string(),
  energy: z.array(billLineSchema),
  demand: z.array(billLineSchema.extend({ peakAt: z.number().nullable() })),
  fixed: z.array(billLineSchema),
  energyTotal: z.number(),
  demandTotal: z.number(),
  fixedTotal: z.number(),
  total: z.number(),
  kwh: z.number(),
});
export type BillView = z.infer<typeof billSchema>;

export const planCostsSchema = z.object({
  planId: z.uuid(),
  serviceDate: z.string(),
  currency: z.string(),
  energy: z.number(),
  demand: z.number(),
  total: z.number(),
  /** The baseline the saving is counted against (kind null: a plan made before the baselines). */
  baseline: z.object({
    kind: z.enum(['arrival', 'timer']).nullable(),
    energy: z.number(),
    demand: z.number(),
    total: z.number(),
    peakKw: z.number(),
    /** kWh it leaves undelivered against the plan (valued at the plan's average price, in `total`). */
    shortfallKwh: z.number(),
  }),
  /** The other baseline, shown beside it (`energy`: its charging energy, a shortfall valued as in `baseline`). */
  otherBaseline: z
    .object({
      kind: z.enum(['arrival', 'timer']),
      total: z.number(),
      energy: z.number(),
      peakKw: z.number(),
      shortfallKwh: z.number(),
    })
    .nullable(),
  /** The plan's highest site load of the night. */
  peakKw: z.number(),
  /**
   * The night's charging energy saving against its baseline (baseline energy with its shortfall
   * valued, minus the plan's energy). Demand is billed once a period: the period's saving is in
   * the month's costs, never a night's marginal demand.
   */
  savings: z.number(),
  /** `savings` as a share of the baseline's charging energy. */
  savingsShare: z.number(),
  chargingKwh: z.number(),
  miles: z.number(),
  costPerMile: z.number().nullable(),
  perBus: z.array(
    z.object({
      bus: z.string(),
      kwh: z.number(),
      cost: z.number(),
      miles: z.number(),
      costPerMile: z.number().nullable(),
    }),
  ),
});
export type PlanCosts = z.infer<typeof planCostsSchema>;

export const emissionsSchema = z.object({
  miles: z.number(),
  dieselMpg: z.number(),
  dieselGallonsAvoided: z.number(),
  co2KgAvoided: z.number(),
  source: z.string(),
});

/**
 * The billing period's demand target: the facility and per-period peaks that minimise the bill of
 * the nights left in the period (one LP over them all), why it is that number, and what a kW
 * either side of it is worth. Nights without runs take the latest entered night of their weekday.
 */
export const periodTargetSchema = z.object({
  currency: z.string(),
  /** The nights it covers: the first is the night it was computed from. */
  nights: z.array(z.object({ date: z.string(), basis: z.enum(['runs', 'typical-weekday']) })),
  /** The facility target (kW; null without a facility demand charge) and each demand period's. */
  facilityKw: z.number().nullable(),
  targets: z.array(z.object({ name: z.string(), kw: z.number(), peakSoFarKw: z.number(), rate: z.number() })),
  /** The remaining nights' charging energy and the demand charges above the peaks so far, at the target. */
  cost: z.object({ energy: z.number(), demand: z.number(), total: z.number() }),
  /** The night and interval that set the target, in words (null: the peaks so far already cover every night). */
  binding: z
    .object({
      name: z.string(),
      night: z.string(),
      at: z.string(),
      buses: z.number(),
      needKwh: z.number(),
      sentence: z.string(),
    })
    .nullable(),
  /** Per target: energy saved by a kW above it, energy added (or kWh left short) by a kW below. */
  marginal: z.array(
    z.object({
      name: z.string(),
      rate: z.number(),
      aboveSavesPerKw: z.number(),
      belowCostsPerKw: z.number().nullable(),
      belowShortKwhPerKw: z.number(),
      sentence: z.string(),
    }),
  ),
  /** Nights no target can serve (the runs need more than the service limit allows), explained. */
  impossible: z.array(
    z.object({
      night: z.string(),
      shortKwh: z.number(),
      cause: z.enum(['service limit', 'chargers or time at the depot']),
      sentence: z.string(),
    }),
  ),
  solveMs: z.number(),
  /**
   * The facility demand the rate plan's ratchet bills at least this period (a share of an earlier
   * period's peak): a floor of the facility target like the peaks so far, but not a peak of this
   * period, so the target may stand above the facility peak so far. Null: no ratchet, or below them.
   */
  ratchet: z
    .object({ kw: z.number(), percent: z.number(), baseKw: z.number(), source: z.string() })
    .nullable()
    .default(null),
});
export type PeriodTargetView = z.infer<typeof periodTargetSchema>;

export const monthCostsSchema = z.object({
  currency: z.string(),
  period: z.object({ start: z.string(), end: z.string(), days: z.number() }),
  ratePlanName: z.string(),
  /**
   * The whole billing period: actual intervals where imported, published plans, forecast nights,
   * building load elsewhere. A forecast night gone by bills its energy but sets no peak (see `peaks`).
   */
  projected: billSchema,
  /**
   * The projected bill's range while some nights are forecast (null when none is). Each forecast
   * night puts back the next service day's runs. A night still to come, where there is a demand
   * target (`target`), draws that energy in the intervals the target's own calculation charged it
   * (bus by bus from battery, under the target): its charging, with what it leaves in the
   * cheapest room under the target, is one end of the range; the same energy spread evenly over
   * the intervals with a bus at the depot the other. Any other night draws it between the last
   * bus home and the first out, in its cheapest intervals or spread evenly (under the target where
   * there is one). The projected bill itself takes the even spread.
   */
  projectedRange: z.object({ low: z.number(), high: z.number() }).nullable(),
  /** Nights without a published plan, forecast from the service calendar. */
  forecast: z.array(z.object({ date: z.string(), needKwh: z.number(), basis: z.enum(['runs', 'typical-weekday']) })),
  /** From the period's start to now, from the same sources. */
  monthToDate: billSchema,
  /**
   * The period's saving: its bill with each published night charged as its baseline would
   * (the cheaper of charge on arrival and timer that delivers the plan's energy) minus its bill
   * with the plans, each with its own peaks (demand is billed once a period, never per night).
   * The bill with the plans is the projected bill (`planBill` = `projected.total`); the other is
   * the same bill with each compared night's charging as its baseline's instead, on the same
   * peaks so far, entered peaks and ratchet. `planPeakKw`/`baselinePeakKw`: their facility demand.
   */
  savings: z.object({
    total: z.number(),
    planBill: z.number(),
    baselineBill: z.number(),
    /** Published nights compared (plans made before the baselines existed are left out). */
    nightsCompared: z.number(),
    planPeakKw: z.number(),
    baselinePeakKw: z.number(),
  }),
  /**
   * Peaks so far: the highest intervals begun by now that were recorded (meter data, published
   * plans, the building's own load) and the peaks entered in Depot; a forecast night gone by sets
   * none. The month to date bills these; a ratchet's floor is not among them.
   */
  peaks: z.object({
    facility: z.object({
      kw: z.number(),
      at: z.string().nullable(),
      source: z.enum(['actual', 'entered', 'planned', 'forecast', 'building']),
    }),
    periods: z.array(z.object({ name: z.string(), kw: z.number(), at: z.string().nullable() })),
  }),
  nights: z.array(
    z.object({
      date: z.string(),
      planId: z.uuid(),
      version: z.number(),
      /** The night's charging energy cost under the plan and under its baseline (demand is the period's, see `savings`). */
      planEnergyCost: z.number(),
      baselineEnergyCost: z.number().nullable(),
      baselineKind: z.enum(['arrival', 'timer']).nullable(),
      /** Highest site load of the night under the baseline (the plan's is `projectedPeakKw`). */
      baselinePeakKw: z.number().nullable(),
      /** Site energy (charging and building) over the plan's hours, as planned and as metered. */
      projectedSiteEnergyCost: z.number(),
      actualSiteEnergyCost: z.number().nullable(),
      /**
       * The projected site energy over the intervals that have meter data only, to set beside
       * `actualSiteEnergyCost` on a partly metered night (null without meter data).
       */
      projectedMeteredSiteEnergyCost: z.number().nullable().default(null),
      projectedPeakKw: z.number(),
      actualPeakKw: z.number().nullable(),
      /** Share of the night's intervals with metered data (0-1). */
      actualCoverage: z.number(),
      /**
       * A night across a billing period's edge: every figure of the row is this period's part of it
       * (`end`: the night runs on into the next period; `start`: it began in the one before). Null:
       * the whole night is in this period.
       */
      periodPart: z.enum(['start', 'end']).nullable().default(null),
    }),
  ),
  sources: z.object({
    actualIntervals: z.number(),
    plannedNights: z.number(),
    forecastNights: z.number(),
    schoolNightsWithoutPlan: z.number(),
  }),
  emissions: emissionsSchema,
  /** The demand target over the nights left in the period (null: none left, or no demand charge). */
  target: periodTargetSchema.nullable().default(null),
});
export type MonthCosts = z.infer<typeof monthCostsSchema>;

export const meterImportRequestSchema = z.strictObject({
  fileName: text('The file name').trim().min(1, 'Name the file').max(200),
  content: text('The file').min(1, 'The file is empty').max(20_000_000, 'The file is too large (20 MB at most)'),
  billingPeriodStart: isoDate(),
});

export const meterImportResultSchema = z.object({
  id: z.uuid(),
  format: z.string(),
  intervals: z.number().int(),
  minutes: z.number(),
  duplicates: z.number().int(),
  gaps: z.array(z.object({ from: z.string(), to: z.string() })),
  kwh: z.number(),
  peaks: z.object({ facilityKw: z.number(), periods: z.record(z.string(), z.number()) }),
});
export type MeterImportResult = z.infer<typeof meterImportResultSchema>;
