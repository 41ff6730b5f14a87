import { z } from 'zod';

export const depotSummarySchema = z.object({
  id: z.uuid(),
  name: z.string(),
  timezone: z.string(),
  serviceLimitKw: z.number(),
  chargerCount: z.number().int(),
  chargersInService: z.number().int(),
  busCount: z.number().int(),
  ratePlanName: z.string().nullable(),
  /** The rate plan's currency (amounts on the depot's pages are in it); null without a rate plan. */
  currency: z.string().nullable(),
  nextServiceDay: z
    .object({
      date: z.iso.date(),
      firstPullOut: z.string().nullable(),
      lastPullOut: z.string().nullable(),
      /** Buses with runs on the service day, less those reported absent tonight. */
      busesOut: z.number().int(),
      /** Bus numbers the yard reported absent tonight (not counted in busesOut). */
      absentBuses: z.array(z.string()),
      lastPullInToday: z.string().nullable(),
    })
    .nullable(),
});
export type DepotSummary = z.infer<typeof depotSummarySchema>;
/**
 * The depots the caller may see (administrators: every depot of the organisation; everyone else:
 * the depots assigned to them), and the one they last chose (remembered per person; null until
 * they choose, when the app takes the first).
 */
export const depotListSchema = z.object({
  depots: z.array(depotSummarySchema),
  chosenDepotId: z.uuid().nullable(),
});
export type DepotList = z.infer<typeof depotListSchema>;

/** PUT /me/depot: remember the depot the person works on (one of theirs, else 404). */
export const chooseDepotRequestSchema = z.strictObject({ depotId: z.uuid('Not a depot id') });
export const chosenDepotSchema = z.object({ chosenDepotId: z.uuid() });
