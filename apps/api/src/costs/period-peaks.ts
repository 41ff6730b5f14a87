import { and, asc, eq, gte, lt } from 'drizzle-orm';
import { DateTime } from 'luxon';
import type { RatePlanDefinition } from '@nightyard/contracts';
import { peaksOf, quarterHours, ratePlanPeriodAtMs } from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { meterIntervals, plans } from '../db/schema';
import type { BillingPeriod } from './billing-period';
import { ratchetBaseOf } from './ratchet-base';

/** Peaks a billing period has set, by name: the whole facility's and each rate-plan period's. */
export interface PeriodPeaks {
  facility: number;
  /** By the rate plan's own period names. */
  periods: Record<string, number>;
}

/** The facility demand a rate plan's ratchet bills at least this period, and what it is a share of. */
export interface RatchetFloor {
  kw: number;
  percent: number;
  base: { kw: number; source: string };
}

/**
 * The peaks the billing period has set before the night of `fromDate`: what the meter measured in
 * the period (15-minute demand), and where not metered the site load of the period's nights
 * published before that night. The month's bill charges demand on the period's highest, so a
 * night's peak costs only what it adds above these. With a demand ratchet on the facility demand,
 * also its floor: the bill charges at least that (costs-service.ts), so a peak below it adds nothing.
 */
export async function periodPeaksBefore(
  db: Db,
  depot: { id: string; otherLoadKw: number[] },
  zone: string,
  rate: RatePlanDefinition,
  period: BillingPeriod,
  fromDate: string,
): Promise<PeriodPeaks & { ratchet: RatchetFloor | null }> {
  const depotId = depot.id;
  const out: PeriodPeaks = { facility: 0, periods: {} };
  const metered = await db
    .select({ startsAt: meterIntervals.startsAt, kwh: meterIntervals.kwh, minutes: meterIntervals.minutes })
    .from(meterIntervals)
    .where(
      and(
        eq(meterIntervals.depotId, depotId),
        gte(meterIntervals.startsAt, period.start.toJSDate()),
        lt(meterIntervals.startsAt, period.end.toJSDate()),
      ),
    )
    .orderBy(asc(meterIntervals.startsAt));
  const intervals = quarterHours(
    metered.map((m) => ({ startMs: m.startsAt.getTime(), minutes: m.minutes, kwh: m.kwh })),
  );
  const measured = intervals.length ? peaksOf(rate, intervals, { zone, intervalMinutes: 15 }) : null;
  if (measured) {
    out.facility = Math.max(out.facility, measured.facility.kw);
    for (const [name, p] of Object.entries(measured.periods))
      out.periods[name] = Math.max(out.periods[name] ?? 0, p.kw);
  }
  const earlier = await db
    .select({ result: plans.result })
    .from(plans)
    .where(
      and(
        eq(plans.depotId, depotId),
        eq(plans.state, 'published'),
        gte(plans.serviceDate, period.start.minus({ days: 1 }).toISODate()!),
        lt(plans.serviceDate, fromDate),
      ),
    );
  const startMs = period.start.toMillis();
  const fromMs = DateTime.fromISO(fromDate, { zone }).set({ hour: 12 }).toMillis();
  for (const e of earlier) {
    for (const slot of e.result?.slots ?? []) {
      const t = Date.parse(slot.start);
      if (t < startMs || t >= fromMs) continue;
      out.facility = Math.max(out.facility, slot.loadKw);
      const at = ratePlanPeriodAtMs(rate, t, zone);
      if (!at.offPeak && at.demandCharge > 0)
        out.periods[at.period] = Math.max(out.periods[at.period] ?? 0, slot.loadKw);
    }
  }
  const ratchet = rate.demandRatchet;
  const charged = rate.seasons.some((season) => season.facilityDemandCharge > 0);
  const base = ratchet && charged ? await ratchetBaseOf(db, depot, period, ratchet.months) : null;
  const floor =
    ratchet && base
      ? { kw: Math.round((ratchet.percent / 100) * base.kw * 1000) / 1000, percent: ratchet.percent, base }
      : null;
  return { ...out, ratchet: floor };
}
