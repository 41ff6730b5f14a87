import { z } from 'zod';
import { localDateTimeSchema } from './dates';
import { text } from './text';
import { planDetailSchema, planSummarySchema } from './plans';

/**
 * A step confirmed more than this long before its time is asked about once more: crews often plug
 * in a little early, but a tap on a step hours ahead is more likely a slip of the thumb than a bus
 * moved hours before the plan has it.
 */
export const CONFIRM_EARLY_MS = 60 * 60_000;

export const yardStepSchema = z.object({
  /** Stable across revisions of the night: `connect|bus|charger|start`. */
  key: z.string(),
  action: z.enum(['connect', 'disconnect']),
  /**
   * Who makes the move: the bus's `driver` (plugging in on pulling in, unplugging on pulling out)
   * or the yard `crew`. Absent for plans made before the crew rules: count it as the crew's.
   */
  by: z.enum(['crew', 'driver']).optional(),
  bus: z.string(),
  charger: z.string(),
  at: z.string(),
  /** Planned energy of the session (kWh into the bus's battery, grid side). */
  kwh: z.number(),
  /** `missed`: the yard said it did not happen (the night was re-planned from that). */
  status: z.enum(['done', 'overdue', 'upcoming', 'missed']),
  confirmedAt: z.string().nullable(),
  confirmedBy: z.string().nullable(),
  /**
   * What to do, in words, as the card, the run sheet and the e-mail all say it: "Plug in bus 214
   * at charger C3", or after a report "Unplug bus 218 from charger C3 now (out of service), then
   * move it to charger C5 at 23:15".
   */
  text: z.string(),
  /** Why the step is not the plan's own (a charger reported out of service), else null. */
  reason: z.string().nullable(),
  /** After an unplug forced by a report: where the bus goes next (null charger: wait, none is free). */
  moveTo: z.object({ charger: z.string().nullable(), at: z.string().nullable() }).nullable(),
});
export type YardStep = z.infer<typeof yardStepSchema>;

/** A plug-in as the yard sees it: which bus, which charger, from when to when, and how much energy. */
export const yardSessionSchema = z.object({
  bus: z.string(),
  charger: z.string(),
  start: z.string(),
  end: z.string(),
  kwh: z.number(),
  startMove: z.enum(['driver', 'crew']).optional(),
  endMove: z.enum(['driver', 'crew']).optional(),
});
export type YardSession = z.infer<typeof yardSessionSchema>;

/**
 * Tonight's plan as the yard uses it: the plan's facts and its plug-ins, without what only the
 * office reads (the power of every quarter hour, the site load, prices, baselines, every note).
 * The Yard asks for it on every load and refresh, often over a phone's connection; the whole plan
 * is at /plans/{id}.
 */
export const tonightPlanSchema = planDetailSchema.omit({ result: true, notes: true, runsChanged: true }).extend({
  /** The span the plan covers (epoch ms), null while it has no result. */
  horizon: z.object({ start: z.number(), end: z.number(), slotMs: z.number() }).nullable(),
  sessions: z.array(yardSessionSchema),
  /** The newest "Revised at HH:mm: ..." note, null for a plan never revised. */
  revisionNote: z.string().nullable(),
  /**
   * The buses this plan moved and why, in the engine's words: from the cut-off on in a revision
   * (`againstVersion` null), or against the version it kept in a night planned again
   * (`againstVersion`). Null for a first plan.
   */
  moved: z
    .object({
      buses: z.array(z.string()),
      reasons: z.array(z.string()),
      againstVersion: z.number().int().positive().nullable(),
    })
    .nullable(),
});
export type TonightPlan = z.infer<typeof tonightPlanSchema>;

export const tonightSchema = z.object({
  depot: z.object({ id: z.uuid(), name: z.string(), timezone: z.string() }),
  now: z.string(),
  plan: tonightPlanSchema.nullable(),
  steps: z.array(yardStepSchema),
  /** Has the caller acknowledged the high-voltage cautions for this night? */
  acknowledged: z.boolean(),
  reports: z.array(
    z.object({
      kind: z.string(),
      bus: z.string().nullable(),
      charger: z.string().nullable(),
      reason: z.string().nullable(),
      reportedAt: z.string(),
      reportedBy: z.string().nullable(),
      revisionVersion: z.number().nullable(),
    }),
  ),
});
export type Tonight = z.infer<typeof tonightSchema>;

const clockTime = text('The time')
  .trim()
  .regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Enter the time as HH:mm (00:00 to 23:59)');

export const confirmStepSchema = z.strictObject({
  planId: z.uuid('Not a plan id'),
  stepKey: text('The step').min(1, 'Choose the step').max(200),
  /** When it really happened, depot time `HH:mm` (the last such time up to now); absent: now. */
  at: clockTime.optional(),
});

/** A step that did not happen: the rest of the night is re-planned from it, like a report. */
export const missedStepSchema = z.strictObject({
  planId: z.uuid('Not a plan id'),
  stepKey: text('The step').min(1, 'Choose the step').max(200),
});
export type MissedStep = z.infer<typeof missedStepSchema>;

export const yardConfirmationSchema = z.object({
  stepKey: z.string(),
  confirmedAt: z.string(),
  confirmedBy: z.string().nullable(),
});

const planRef = { planId: z.uuid('Not a plan id') };
const busRef = text('The bus').trim().min(1, 'Choose the bus').max(20);

export const yardReportSchema = z.discriminatedUnion(
  'kind',
  [
    z.strictObject({ ...planRef, kind: z.literal('bus_late'), bus: busRef, expectedAt: localDateTimeSchema }),
    z.strictObject({
      ...planRef,
      kind: z.literal('bus_absent'),
      bus: busRef,
      reason: text('The reason').trim().max(300).default(''),
    }),
    z.strictObject({
      ...planRef,
      kind: z.literal('charger_out'),
      charger: text('The charger').trim().min(1, 'Choose the charger').max(40),
      reason: text('The reason').trim().min(1, 'Say what is wrong with the charger').max(300),
    }),
    z.strictObject({
      ...planRef,
      kind: z.literal('soc_reading'),
      bus: busRef,
      socPct: z
        .number({ error: 'Enter the state of charge in %' })
        .min(0, 'A state of charge is 0 to 100 %')
        .max(100, 'A state of charge is 0 to 100 %'),
    }),
  ],
  { error: 'Choose what to report: bus_late, bus_absent, charger_out or soc_reading' },
);
export type YardReport = z.infer<typeof yardReportSchema>;

export const yardReportResultSchema = z.object({
  revision: planSummarySchema,
  moved: z.array(z.object({ bus: z.string(), before: z.string(), after: z.string() })),
  replanMs: z.number(),
  notified: z.number().int(),
  /**
   * What the revision does to the night against the plan followed: projected cost and demand
   * charge (whole nights), peak, and the buses it leaves short (with the cause in words).
   */
  effect: z.object({
    costBefore: z.number(),
    costAfter: z.number(),
    demandBefore: z.number(),
    demandAfter: z.number(),
    peakBeforeKw: z.number(),
    peakAfterKw: z.number(),
    short: z.array(z.object({ bus: z.string(), kwh: z.number(), cause: z.string().nullable() })),
    /** The same in words, as the e-mails say it: the money first, then each short bus. */
    lines: z.array(z.string()),
  }),
});
export type YardReportResult = z.infer<typeof yardReportResultSchema>;
