import type { Pool } from 'pg';
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { billingPeaks } from '../db/schema';
import type { BillingPeriod } from './billing-period';

/** What the ratchet needs of a depot. */
interface RatchetDepot {
  id: string;
  otherLoadKw: number[];
}

/**
 * The highest facility demand of the `months` billing periods before `period`, for a demand
 * ratchet: from the meter readings, the published plans' site load and the peaks entered in
 * Depot for those periods, at least the building's own highest hourly load. Null when none of
 * those months has any data.
 */
export async function ratchetBaseOf(
  db: Db,
  depot: RatchetDepot,
  period: BillingPeriod,
  months: number,
): Promise<{ kw: number; source: string } | null> {
  const from = period.start.minus({ months });
  const client = (db as unknown as { $client: Pool }).$client;
  const { rows } = await client.query<{ metered: number | null; planned: number | null }>(
    `select
       (select max(kw) from (
          -- 15-minute demand, as quarterHours reads the meter: shorter readings added up into their
          -- (complete) quarter hour, longer ones spread evenly.
          select sum(kwh) * 4 as kw from meter_intervals
            where depot_id = $1 and starts_at >= $2 and starts_at < $3 and minutes < 15
            group by date_bin('15 minutes', starts_at, timestamptz '2000-01-01 00:00Z') having sum(minutes) >= 15
          union all
          select kwh * 60.0 / minutes from meter_intervals
            where depot_id = $1 and starts_at >= $2 and starts_at < $3 and minutes >= 15) readings) as metered,
       (select max((s->>'loadKw')::float8) from plans p, jsonb_array_elements(p.result->'slots') s
         where p.depot_id = $1 and p.state = 'published' and p.service_date >= $4 and p.service_date < $5
           and (s->>'start')::timestamptz >= $2 and (s->>'start')::timestamptz < $3) as planned`,
    [depot.id, from.toJSDate(), period.start.toJSDate(), from.minus({ days: 4 }).toISODate(), period.start.toISODate()],
  );
  const metered = rows[0]?.metered === null || rows[0]?.metered === undefined ? 0 : Number(rows[0].metered);
  const planned = rows[0]?.planned === null || rows[0]?.planned === undefined ? 0 : Number(rows[0].planned);
  const [entered] = await db.select().from(billingPeaks).where(eq(billingPeaks.depotId, depot.id));
  const enteredKw =
    entered && entered.billingPeriodStart >= from.toISODate()! && entered.billingPeriodStart < period.start.toISODate()!
      ? entered.facilityKw
      : 0;
  const candidates: [number, string][] = [
    [metered, 'meter readings'],
    [planned, 'published plans'],
    [enteredKw, `peaks entered in Depot for the period from ${entered?.billingPeriodStart}`],
  ];
  const best = candidates.reduce((a, b) => (b[0] > a[0] ? b : a));
  if (best[0] <= 0) return null;
  const building = Math.max(0, ...depot.otherLoadKw);
  return building > best[0]
    ? { kw: building, source: "the building's own load" }
    : { kw: best[0], source: `from ${best[1]}` };
}
