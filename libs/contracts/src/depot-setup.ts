import { z } from 'zod';
import { lower, text } from './text';
import { isoDate, localDateTimeSchema } from './dates';
import { yardCrewSchema } from './yard-crew';
import { liveStatusSchema } from './live';

export { localDateTimeSchema };

/** The largest power any depot figure may have: 100 MW is far above a bus depot's connection. */
export const MAX_KW = 100_000;

const kw = (what: string) =>
  z
    .number({ error: `Enter ${lower(what)} in kW` })
    .min(0, `${what} cannot be negative`)
    .max(MAX_KW, `${what} looks too large (at most ${MAX_KW.toLocaleString('en-US')} kW)`);

export const CONNECTOR_STANDARDS = [
  'SAE J1772 CCS1',
  'SAE J3105 pantograph',
  'SAE J3068',
  'CCS2',
  'CHAdeMO',
  'Other',
] as const;

export const depotSettingsSchema = z.strictObject({
  name: text('The depot name').trim().min(1, 'Name the depot').max(120),
  timezone: text('The time zone').max(64).refine(isTimeZone, 'Choose an IANA time zone such as America/Chicago'),
  serviceLimitKw: kw('The service limit').refine((v) => v > 0, 'The service limit must be above 0 kW'),
  /** One value (flat) or 24 values (kW for each local hour). */
  otherLoadKw: z
    .array(kw('The other load'))
    .max(24, 'Give one flat value or 24 hourly values')
    .refine((a) => a.length === 1 || a.length === 24, 'Give one flat value or 24 hourly values'),
  billingStartDay: z.number().int().min(1, 'Day 1 to 28').max(28, 'Day 1 to 28, so every month has it'),
});
export type DepotSettings = z.infer<typeof depotSettingsSchema>;

export function isTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: tz });
    return tz.includes('/') || tz === 'UTC';
  } catch {
    return false;
  }
}

export const cabinetInputSchema = z.strictObject({
  label: text('The cabinet label').trim().min(1, 'Label the cabinet').max(40),
  limitKw: kw('The cabinet limit').refine((v) => v > 0, 'The cabinet limit must be above 0 kW'),
});
export const cabinetSchema = cabinetInputSchema.extend({ id: z.uuid(), chargerCount: z.number().int() });
export type Cabinet = z.infer<typeof cabinetSchema>;

export const chargerStatusSchema = z.enum(['in_service', 'out_of_service']);

export const chargerInputSchema = z
  .strictObject({
    label: text('The charger label').trim().min(1, 'Label the charger').max(40),
    maxKw: kw("The charger's maximum").refine((v) => v > 0, 'The maximum must be above 0 kW'),
    connector: text('The connector').trim().min(1, 'Choose the connector standard').max(60),
    cabinetId: z.uuid('Choose a cabinet of this depot').nullable().default(null),
    status: chargerStatusSchema.default('in_service'),
    statusReason: text('The reason').trim().max(300).nullable().default(null),
    /** Out of service from / until (depot time, either open); none: until put back in service. */
    outFrom: localDateTimeSchema.nullable().default(null),
    outUntil: localDateTimeSchema.nullable().default(null),
  })
  .refine((c) => c.status === 'in_service' || (c.statusReason ?? '').length > 0, {
    message: 'Say why the charger is out of service',
    path: ['statusReason'],
  })
  .refine((c) => !c.outFrom || !c.outUntil || c.outUntil > c.outFrom, {
    message: 'The end of the period must be after its start',
    path: ['outUntil'],
  });
export type ChargerInput = z.infer<typeof chargerInputSchema>;

export const chargerSchema = z.object({
  id: z.uuid(),
  label: z.string(),
  maxKw: z.number(),
  connector: z.string(),
  cabinetId: z.uuid().nullable(),
  cabinetLabel: z.string().nullable(),
  status: chargerStatusSchema,
  statusReason: z.string().nullable(),
  statusSince: z.iso.datetime({ offset: true }).nullable(),
  /** The out-of-service period in depot time (YYYY-MM-DDTHH:mm), either end open. */
  outFrom: z.string().nullable(),
  outUntil: z.string().nullable(),
  /** OCPP charge point identity, when the charger is connected to Nightyard. */
  ocppIdentity: z.string().nullable(),
  /** What the charger itself last reported over OCPP. */
  live: z
    .object({
      status: liveStatusSchema,
      powerKw: z.number().nullable(),
      seenAt: z.iso.datetime({ offset: true }).nullable(),
    })
    .nullable(),
});
export type Charger = z.infer<typeof chargerSchema>;

export const loadReductionWindowInputSchema = z
  .strictObject({
    start: localDateTimeSchema,
    end: localDateTimeSchema,
    limitKw: kw('The reduced limit'),
    note: text('The note').trim().max(300).default(''),
  })
  .refine((w) => w.end > w.start, { message: 'The end must be after the start', path: ['end'] });
export const loadReductionWindowSchema = z.object({
  id: z.uuid(),
  start: z.string(),
  end: z.string(),
  limitKw: z.number(),
  note: z.string(),
});
export type LoadReductionWindow = z.infer<typeof loadReductionWindowSchema>;

/** The billing period's highest 15-minute demands so far: a plan below them adds no demand cost. */
export const peaksSoFarSchema = z.strictObject({
  billingPeriodStart: isoDate(),
  facilityKw: kw('The facility peak'),
  periods: z
    .record(text('The period name').min(1).max(60), kw('A period peak'))
    .refine((p) => Object.keys(p).length <= 20, 'At most 20 periods')
    .default({}),
});
export type PeaksSoFar = z.infer<typeof peaksSoFarSchema>;

export const depotDetailSchema = depotSettingsSchema.extend({
  id: z.uuid(),
  cabinets: z.array(cabinetSchema),
  chargers: z.array(chargerSchema),
  loadReductionWindows: z.array(loadReductionWindowSchema),
  peaksSoFar: peaksSoFarSchema.nullable(),
  /** The yard crew plans keep to (null: not set; plans then assume drivers plug in and no minimum). */
  yardCrew: yardCrewSchema.nullable(),
  ratePlans: z.array(z.object({ ratePlanId: z.uuid(), name: z.string(), effectiveFrom: z.string() })),
});
export type DepotDetail = z.infer<typeof depotDetailSchema>;

export const depotIdParamsSchema = z.strictObject({ depotId: z.uuid('Not a depot id') });
export const depotItemParamsSchema = z.strictObject({ depotId: z.uuid('Not a depot id'), id: z.uuid('Not an id') });
