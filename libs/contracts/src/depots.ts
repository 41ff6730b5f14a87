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
  nextServiceDay: z
    .object({
      date: z.iso.date(),
      firstPullOut: z.string().nullable(),
      lastPullOut: z.string().nullable(),
      busesOut: z.number().int(),
      lastPullInToday: z.string().nullable(),
    })
    .nullable(),
});
export type DepotSummary = z.infer<typeof depotSummarySchema>;
export const depotListSchema = z.object({ depots: z.array(depotSummarySchema) });
