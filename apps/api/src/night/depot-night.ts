import { and, between, eq } from 'drizzle-orm';
import { DateTime } from 'luxon';
import type { DepotNight } from '@nightyard/contracts';
import { nightAt } from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { buses, runs } from '../db/schema';
import type { AuthUser } from '../auth/auth-user';
import { depotOf } from '../depots/depot-access';

/** Runs this far either side of today are enough to find the night in force and the next one (a long school break falls back to calendar nights). */
const WINDOW_DAYS = 21;

/**
 * Which night it is at a depot at `now`, from the runs around it (the one night model of the
 * scheduling library). Every "tonight" in the API comes from here.
 */
export async function nightOfDepot(db: Db, depot: { id: string; timezone: string }, now: Date): Promise<DepotNight> {
  const today = DateTime.fromJSDate(now, { zone: depot.timezone }).startOf('day');
  const rows = await db
    .select({ serviceDate: runs.serviceDate, bus: buses.number, pullOut: runs.pullOut, pullIn: runs.pullIn })
    .from(runs)
    .innerJoin(buses, eq(buses.id, runs.busId))
    .where(and(
      eq(runs.depotId, depot.id),
      between(runs.serviceDate, today.minus({ days: WINDOW_DAYS }).toISODate()!, today.plus({ days: WINDOW_DAYS }).toISODate()!),
    ));
  const night = nightAt(rows, depot.timezone, now);
  return { now: DateTime.fromJSDate(now, { zone: depot.timezone }).toISO()!, timezone: depot.timezone, ...night };
}

export async function depotNight(db: Db, caller: AuthUser, depotId: string, now: Date): Promise<DepotNight> {
  return nightOfDepot(db, await depotOf(db, caller, depotId), now);
}
