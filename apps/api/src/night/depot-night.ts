import { sql } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { addDays, depotDate, type DateNight, type DepotNight } from '@nightyard/contracts';
import { nightAmong, nightsOfDays, type ServiceDayTimes, type ServiceNight } from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { runs } from '../db/schema';
import type { AuthUser } from '../auth/auth-user';
import { depotOf } from '../depots/depot-access';

/** Runs this far either side of today are enough to find the night in force and the next one (a long school break falls back to calendar nights). */
const WINDOW_DAYS = 21;

/**
 * Which night it is at a depot at `now`, from the runs around it (the one night model of the
 * scheduling library). Every "tonight" in the API comes from here.
 */
export async function nightOfDepot(db: Db, depot: { id: string; timezone: string }, now: Date): Promise<DepotNight> {
  const zone = depot.timezone;
  const t = now.getTime();
  let known = serviceDaysCache.get(depot.id);
  // The depot's date is worked out (zone arithmetic, dear on every request) only when `now` has left the remembered day.
  if (!known || known.zone !== zone || t < known.dayStartMs || t >= known.dayEndMs) {
    const today = depotDate(now, zone);
    const day = DateTime.fromISO(today, { zone });
    const days = await serviceDaysAround(db, depot.id, today);
    known = {
      zone,
      dayStartMs: day.toMillis(),
      dayEndMs: day.plus({ days: 1 }).toMillis(),
      nights: nightsOfDays(days, zone),
    };
    serviceDaysCache.set(depot.id, known);
  }
  const night = nightAmong(known.nights, zone, now);
  // The depot-time instant is written out only when read (most callers want the night alone).
  return Object.defineProperty({ timezone: zone, ...night }, 'now', {
    enumerable: true,
    get: () => DateTime.fromJSDate(now, { zone }).toISO()!,
  }) as DepotNight;
}

/**
 * Each depot's nights around a date (worked out from its service-day times), remembered per local
 * date and zone: Tonight and the Yard ask on every request, and the runs change only through the
 * service day's one write (which forgets them).
 * One API process serves requests; the job workers never ask.
 */
const serviceDaysCache = new Map<
  string,
  { zone: string; dayStartMs: number; dayEndMs: number; nights: ServiceNight[] }
>();

/** After a depot's runs change. */
export function forgetServiceDays(depotId: string): void {
  serviceDaysCache.delete(depotId);
}

export async function serviceDaysAround(db: Db, depotId: string, today: string): Promise<ServiceDayTimes[]> {
  // Summed up in the database: one row per service day (first pull-in, last bus's first pull-out).
  const { rows } = await db.execute<{ service_date: string; first_in: Date; last_first_out: Date }>(sql`
    select service_date::text as service_date, min(first_in) as first_in, max(first_out) as last_first_out
    from (
      select ${runs.serviceDate} as service_date, min(${runs.pullIn}) as first_in, min(${runs.pullOut}) as first_out
      from ${runs}
      where ${runs.depotId} = ${depotId}
        and ${runs.serviceDate} between ${addDays(today, -WINDOW_DAYS)} and ${addDays(today, WINDOW_DAYS)}
      group by ${runs.serviceDate}, ${runs.busId}
    ) per_bus
    group by service_date`);
  return rows.map((r) => ({
    serviceDate: r.service_date,
    firstPullIn: new Date(r.first_in),
    lastFirstPullOut: new Date(r.last_first_out),
  }));
}

export async function depotNight(db: Db, caller: AuthUser, depotId: string, now: Date): Promise<DepotNight> {
  return nightOfDepot(db, await depotOf(db, caller, depotId), now);
}

/** Where `date` stands among the depot's service days (see `dateNightSchema`), for the caller. */
export async function dateNight(db: Db, caller: AuthUser, depotId: string, date: string): Promise<DateNight> {
  await depotOf(db, caller, depotId);
  return datePlace(db, depotId, date);
}

/** Where `date` stands among a depot's service days: the days with runs either side of it. */
export async function datePlace(db: Db, depotId: string, date: string): Promise<DateNight> {
  const { rows } = await db.execute<{ on: boolean; previous: string | null; next: string | null }>(sql`
    select
      exists (select 1 from ${runs} where ${runs.depotId} = ${depotId} and ${runs.serviceDate} = ${date}) as on,
      (select max(${runs.serviceDate})::text from ${runs} where ${runs.depotId} = ${depotId} and ${runs.serviceDate} < ${date}) as previous,
      (select min(${runs.serviceDate})::text from ${runs} where ${runs.depotId} = ${depotId} and ${runs.serviceDate} > ${date}) as next`);
  const row = rows[0]!;
  return {
    date,
    serviceDay: row.on,
    within: !row.on && row.previous && row.next ? row.previous : null,
    previous: row.previous,
    next: row.next,
  };
}
