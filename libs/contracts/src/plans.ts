import { z } from 'zod';
import { isoDate } from './dates';

export const planStateSchema = z.enum(['draft', 'published', 'superseded']);
export type PlanState = z.infer<typeof planStateSchema>;
export const planJobStatusSchema = z.enum(['queued', 'running', 'done', 'failed']);
/**
 * How a version came about. A `what-if` is a study planned from an uploaded scenario file: it is
 * never published, e-mailed or sent to chargers; adopting it makes a normal draft re-checked
 * against the depot as it is then.
 */
export const planKindSchema = z
  .enum(['generated', 'what-if', 'revision'])
  .describe(
    "generated: from the depot's data; revision: re-planned from the yard's reports; what-if: a study from an uploaded scenario file, never published (adopt it instead)",
  );
export type PlanKind = z.infer<typeof planKindSchema>;

export const generatePlanSchema = z.strictObject({
  serviceDate: isoDate(),
  /** Also plan the midday layover between the day's morning and afternoon runs. */
  includeMidday: z.boolean().default(true),
});

export const publishPlanSchema = z.strictObject({
  /** The published plan the supervisor reviewed against (null: none was published). */
  expectedPublishedId: z.uuid().nullable(),
});

export const baselineKindSchema = z.enum(['arrival', 'timer']);
export type BaselineKind = z.infer<typeof baselineKindSchema>;

/** The baselines' names on every screen, e-mail and export ("Unmanaged charging": plans made before them). */
export function baselineName(kind: string | null | undefined): string {
  return kind === 'arrival' ? 'Charge on arrival' : kind === 'timer' ? 'Timer' : 'Unmanaged charging';
}

/**
 * What a baseline (charge on arrival, timer) would cost. `kind`, `shortfallKwh` and
 * `shortfallCost` are absent from plans made before both baselines existed.
 */
const baselineCostSchema = z.looseObject({
  kind: baselineKindSchema.optional(),
  energy: z.number(),
  demand: z.number(),
  total: z.number(),
  peakKw: z.number(),
  exceedsSiteLimit: z.boolean(),
  shortfallKwh: z.number().optional(),
  shortfallCost: z.number().optional(),
});
const baselineWithLoadSchema = baselineCostSchema.extend({ chargingKw: z.array(z.number()) });

/** The engine's plan output (see the scenario format), kept loose here: the engine defines it. */
export const planResultSchema = z.looseObject({
  status: z.enum(['optimal', 'feasible', 'short']),
  cost: z.object({ energy: z.number(), demand: z.number(), total: z.number() }),
  /** The baseline savings are reported against: the cheaper of the two that deliver the plan's energy. */
  baseline: baselineCostSchema,
  baselines: z.object({ arrival: baselineWithLoadSchema, timer: baselineWithLoadSchema }).optional(),
  lowerBound: z.number(),
  gap: z.number(),
  /** False where the night has crew rules and its bound leaves them out (see the engine's `Plan`). */
  boundKeepsCrew: z.boolean().optional(),
  solveMs: z.number(),
  slots: z.array(
    z.object({
      start: z.string(),
      loadKw: z.number(),
      price: z.number(),
      /** The tariff period the slot's price comes from, as the rate plan names it (absent in older plans). */
      period: z.string().optional(),
      limitKw: z.number(),
    }),
  ),
  sessions: z.array(
    z.object({
      bus: z.string(),
      charger: z.string(),
      start: z.string(),
      end: z.string(),
      kwh: z.number(),
      kw: z.array(z.number()),
      /** Who plugs in and who unplugs: the driver on pulling in or out, or the yard crew (absent in older plans). */
      startMove: z.enum(['driver', 'crew']).optional(),
      endMove: z.enum(['driver', 'crew']).optional(),
    }),
  ),
  /** Plug-ins and unplugs the yard crew makes (absent in older plans). */
  crewMoves: z.number().optional(),
  /** Spans in which a charger is out of service, to the slot: no bus is planned on it there (absent in older plans). */
  outOfService: z.array(z.object({ charger: z.string(), from: z.string(), to: z.string() })).optional(),
  /** Crew moves saved against the cheapest plan found, and their cost (within the depot's tolerance). */
  crewTrade: z.object({ fewerMoves: z.number(), extraCost: z.number() }).nullable().optional(),
  /**
   * A re-plan that kept the plan being carried out wherever it could: what that costs over the
   * cheapest plan found, and the kWh it leaves short that the cheapest would serve (shortfall the
   * plan being carried out already had).
   */
  keptPrevious: z.object({ extraCost: z.number(), extraShortKwh: z.number().optional() }).nullable().optional(),
  /**
   * A plan of a night that had one published (generated again, or a revision before the night
   * began): the version it kept wherever it still fits, and the buses whose charging differs from
   * it and why, in words.
   */
  keptFrom: z.object({ version: z.number() }).optional(),
  moved: z.object({ buses: z.array(z.string()), reasons: z.array(z.string()) }).optional(),
  /**
   * A re-plan or a plan made while its night was under way: where it starts (local cut-off), the
   * chargers out of service, the buses kept where they were, and the buses it moved from the
   * cut-off on and why, in words.
   */
  replan: z
    .looseObject({
      from: z.string().optional(),
      outOfService: z.array(z.string()).optional(),
      plugged: z.record(z.string(), z.string()).optional(),
      moved: z.object({ buses: z.array(z.string()), reasons: z.array(z.string()) }).optional(),
      /**
       * The re-plan's own figures, from the cut-off on (the plan's `cost`, `baseline` and
       * `lowerBound` are the whole night's: these plus what the slots before the cut-off cost).
       */
      own: z
        .object({
          cost: z.object({ energy: z.number(), demand: z.number(), total: z.number() }),
          lowerBound: z.number(),
          baselineEnergy: z.object({ arrival: z.number(), timer: z.number() }).optional(),
        })
        .optional(),
    })
    .optional(),
  /**
   * The billing period's demand target the night was planned under (absent in older plans and in
   * what-ifs): each target with the plan's peak beside it, by how much the plan goes above it, and
   * the trade in words when it does.
   */
  target: z
    .object({
      /** Per target ('facility' or a demand period): the plan's peak, the target, its demand charge per kW. */
      peaks: z.array(z.object({ name: z.string(), kw: z.number(), targetKw: z.number(), rate: z.number().optional() })),
      aboveKw: z.number(),
      trade: z
        .object({
          above: z.array(z.object({ name: z.string(), kw: z.number(), rate: z.number() })),
          cost: z.number(),
          keepsServed: z.array(z.object({ bus: z.string(), kwh: z.number() })),
          energySaved: z.number(),
          sentence: z.string(),
        })
        .nullable(),
      binding: z.string().nullable(),
      impossible: z.array(z.string()),
    })
    .optional(),
  buses: z.array(
    z.object({
      id: z.string(),
      departures: z.array(z.object({ at: z.string(), kwh: z.number() })),
      shortfallKwh: z.number(),
      reason: z.string().nullable(),
      /** The cause of a shortfall in words (times, what binds) and whether it is proven necessary. */
      cause: z.string().nullable().optional(),
      causeProven: z.boolean().nullable().optional(),
    }),
  ),
});
/**
 * A stored plan as the API and the web read it: the schema's fields without the loose objects'
 * index signatures, so the engine's `Plan` is assignable to it and a field the engine renames or
 * drops is a compile error where a plan is stored (the schema still checks it at run time).
 */
export type PlanResult = KnownFields<z.infer<typeof planResultSchema>>;
type KnownFields<T> = T extends readonly (infer U)[]
  ? KnownFields<U>[]
  : T extends object
    ? { [K in keyof T as string extends K ? never : K]: KnownFields<T[K]> }
    : T;

export const planSummarySchema = z.object({
  id: z.uuid(),
  depotId: z.uuid(),
  serviceDate: z.iso.date(),
  version: z.number().int(),
  kind: planKindSchema,
  state: planStateSchema,
  status: planJobStatusSchema,
  stage: z.string(),
  error: z.string().nullable(),
  includesMidday: z.boolean(),
  createdAt: z.iso.datetime({ offset: true }),
  createdBy: z.string().nullable(),
  publishedAt: z.iso.datetime({ offset: true }).nullable(),
  publishedBy: z.string().nullable(),
  totalCost: z.number().nullable(),
  shortBuses: z.number().int().nullable(),
});
export type PlanSummary = z.infer<typeof planSummarySchema>;

export const planDetailSchema = planSummarySchema.extend({
  timezone: z.string(),
  currency: z.string(),
  notes: z.array(z.string()),
  result: planResultSchema.nullable(),
  /** Bus number -> battery size, to show states of charge. */
  busCapacityKwh: z.record(z.string(), z.number()),
  /**
   * Set when the plan was made while its night was under way: the local time (YYYY-MM-DDTHH:mm)
   * it plans from. Before it, the night stands as the published plan said (see the notes).
   */
  plannedFrom: z.string().nullable().default(null),
  /**
   * Buses whose runs (pull-ins, pull-outs, the energy they need, their arrival energy) are no
   * longer those the plan was made for: the night should be generated again. Worked out for the
   * night's published plan and drafts, not for superseded versions and what-ifs.
   */
  runsChanged: z.array(z.string()).default([]),
});
export type PlanDetail = z.infer<typeof planDetailSchema>;

export const planComparisonSchema = z.object({
  from: z.object({ id: z.uuid(), version: z.number().int(), kind: planKindSchema }),
  to: z.object({ id: z.uuid(), version: z.number().int(), kind: planKindSchema }),
  moved: z.array(
    z.object({
      bus: z.string(),
      before: z.string(),
      after: z.string(),
    }),
  ),
  costChange: z.number().nullable(),
  /**
   * How the two versions' inputs differ (service limit, peaks so far, demand target, rate plan,
   * chargers out, buses and their arrival energy), one sentence each: the part of the cost change
   * that is not the plan's. Empty when both were planned from the same inputs.
   */
  inputChanges: z.array(z.string()).default([]),
});
export type PlanComparison = z.infer<typeof planComparisonSchema>;

export const planIdParamsSchema = z.strictObject({ id: z.uuid('Not a plan id') });

/**
 * What adopting a what-if would change: the study re-checked against the depot as it is now
 * (chargers in service, service limit, rate plan, buses, runs). Each difference is one sentence.
 */
export const whatIfAdoptionSchema = z.object({
  whatIf: z.object({ id: z.uuid(), version: z.number().int() }),
  serviceDate: z.iso.date(),
  /** The study's choice carried into the draft: plan the midday layover too. */
  includesMidday: z.boolean(),
  differences: z.array(z.string()),
});
export type WhatIfAdoption = z.infer<typeof whatIfAdoptionSchema>;

export const adoptedPlanSchema = z.object({
  /** The new draft (a normal plan, generated from the depot as it is now). */
  plan: planSummarySchema,
  adoption: whatIfAdoptionSchema,
});
export type AdoptedPlan = z.infer<typeof adoptedPlanSchema>;
