import { z } from 'zod';

/**
 * The district overview (GET /district, administrators and finance): every depot of the
 * organisation the caller may see, tonight and the billing period, side by side. Figures come
 * from the same services as each depot's own pages (one bill engine), so they reconcile.
 */
export const districtDepotSchema = z.object({
  depot: z.object({ id: z.uuid(), name: z.string(), timezone: z.string() }),
  /** Tonight at that depot (its own night model: depots may sit in different time zones). */
  tonight: z.object({
    serviceDate: z.iso.date(),
    /** published: the yard works from it; draft: generated, not yet published; none: no plan yet. */
    planState: z.enum(['published', 'draft', 'none']),
    planVersion: z.number().int().nullable(),
    busesOut: z.number().int(),
    /** Buses the plan leaves short of their runs' energy, and by how much in all. */
    shortBuses: z.number().int(),
    shortKwh: z.number(),
    /** The plan's highest site load, against the service limit. */
    peakKw: z.number().nullable(),
    serviceLimitKw: z.number(),
    /**
     * The night's charging energy cost under the plan, as Costs shows the night (demand is billed
     * once a billing period: it is in `period`, never a night's); null without a plan.
     */
    cost: z.number().nullable(),
  }),
  /** The billing period in force at the depot (null without a rate plan). */
  period: z
    .object({
      start: z.iso.date(),
      end: z.iso.date(),
      ratePlanName: z.string(),
      /** The bill from the period's start to now, and the whole period as projected. */
      billToDate: z.number(),
      projectedBill: z.number(),
      /** The facility peak so far and the period's demand target, where one is set. */
      peakKw: z.number(),
      targetKw: z.number().nullable(),
    })
    .nullable(),
});
export type DistrictDepot = z.infer<typeof districtDepotSchema>;

export const districtOverviewSchema = z.object({
  currency: z.string(),
  depots: z.array(districtDepotSchema),
  /** Sums over the depots shown (from unrounded figures). */
  totals: z.object({
    tonightCost: z.number(),
    shortBuses: z.number().int(),
    billToDate: z.number(),
    projectedBill: z.number(),
  }),
});
export type DistrictOverview = z.infer<typeof districtOverviewSchema>;
