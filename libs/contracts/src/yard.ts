import { z } from 'zod';
import { localDateTimeSchema } from './dates';
import { text } from './text';
import { planDetailSchema, planSummarySchema } from './plans';

export const yardStepSchema = z.object({
  /** Stable across revisions of the night: `connect|bus|charger|start`. */
  key: z.string(),
  action: z.enum(['connect', 'disconnect']),
  bus: z.string(),
  charger: z.string(),
  at: z.string(),
  /** Planned energy of the session (kWh into the bus's battery, grid side). */
  kwh: z.number(),
  status: z.enum(['done', 'overdue', 'upcoming']),
  confirmedAt: z.string().nullable(),
  confirmedBy: z.string().nullable(),
});
export type YardStep = z.infer<typeof yardStepSchema>;

export const tonightSchema = z.object({
  depot: z.object({ id: z.uuid(), name: z.string(), timezone: z.string() }),
  now: z.string(),
  plan: planDetailSchema.nullable(),
  steps: z.array(yardStepSchema),
  /** Has the caller acknowledged the high-voltage cautions for this night? */
  acknowledged: z.boolean(),
  reports: z.array(z.object({
    kind: z.string(), bus: z.string().nullable(), charger: z.string().nullable(), reason: z.string().nullable(),
    reportedAt: z.string(), reportedBy: z.string().nullable(), revisionVersion: z.number().nullable(),
  })),
});
export type Tonight = z.infer<typeof tonightSchema>;

export const confirmStepSchema = z.strictObject({
  planId: z.uuid('Not a plan id'),
  stepKey: text('The step').min(1, 'Choose the step').max(200),
});

export const yardConfirmationSchema = z.object({
  stepKey: z.string(),
  confirmedAt: z.string(),
  confirmedBy: z.string().nullable(),
});

const planRef = { planId: z.uuid('Not a plan id') };
const busRef = text('The bus').trim().min(1, 'Choose the bus').max(20);

export const yardReportSchema = z.discriminatedUnion('kind', [
  z.strictObject({ ...planRef, kind: z.literal('bus_late'), bus: busRef, expectedAt: localDateTimeSchema }),
  z.strictObject({ ...planRef, kind: z.literal('bus_absent'), bus: busRef, reason: text('The reason').trim().max(300).default('') }),
  z.strictObject({ ...planRef, kind: z.literal('charger_out'), charger: text('The charger').trim().min(1, 'Choose the charger').max(40),
    reason: text('The reason').trim().min(1, 'Say what is wrong with the charger').max(300) }),
  z.strictObject({ ...planRef, kind: z.literal('soc_reading'), bus: busRef,
    socPct: z.number({ error: 'Enter the state of charge in %' }).min(0, 'A state of charge is 0 to 100 %').max(100, 'A state of charge is 0 to 100 %') }),
], { error: 'Choose what to report: bus_late, bus_absent, charger_out or soc_reading' });
export type YardReport = z.infer<typeof yardReportSchema>;

export const yardReportResultSchema = z.object({
  revision: planSummarySchema,
  moved: z.array(z.object({ bus: z.string(), before: z.string(), after: z.string() })),
  replanMs: z.number(),
  notified: z.number().int(),
});
export type YardReportResult = z.infer<typeof yardReportResultSchema>;
