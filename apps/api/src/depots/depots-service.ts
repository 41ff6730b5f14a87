import { and, asc, desc, eq, lte, sql } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { depotDate, type DepotList, type DepotSummary } from '@nightyard/contracts';
import type { Db } from '../db/client';
import { buses, chargers, depotRatePlans, depots, ratePlans, runs, users, yardReports } from '../db/schema';
import { depotOf, mayOpenDepot } from './depot-access';
import type { AuthUser } from '../auth/auth-user';
import { nightOfDepot } from '../night/depot-night';

/** The depots of the caller's organisation the caller may see (mayOpenDepot), by name. */
export async function visibleDepots(db: Db, caller: AuthUser) {
  const rows = await db
    .select()
    .from(depots)
    .where(eq(depots.organisationId, caller.organisationId))
    .orderBy(asc(depots.name), asc(depots.id));
  return rows.filter((d) => mayOpenDepot(caller, d.id));
}

/**
 * Each depot the caller may see with counts and the next service day's pull-outs, and the depot
 * they last chose (null when they never chose or may no longer see it).
 */
export async function listDepotSummaries(db: Db, caller: AuthUser, now: Date): Promise<DepotList> {
  const [rows, [me]] = await Promise.all([
    visibleDepots(db, caller),
    db
      .select({ chosen: users.chosenDepotId })
      .from(users)
      .where(and(eq(users.id, caller.id), eq(users.organisationId, caller.organisationId))),
  ]);
  const chosen = me?.chosen ?? null;
  return {
    depots: await Promise.all(rows.map((d) => summarise(db, d, now))),
    chosenDepotId: chosen && rows.some((d) => d.id === chosen) ? chosen : null,
  };
}

/** Remembers the depot the caller works on: one they may see, else "That depot was not found". */
export async function chooseDepot(db: Db, caller: AuthUser, depotId: string): Promise<{ chosenDepotId: string }> {
  const depot = await depotOf(db, caller, depotId);
  await db
    .update(users)
    .set({ chosenDepotId: depot.id })
    .where(and(eq(users.id, caller.id), eq(users.organisationId, caller.organisationId)));
  return { chosenDepotId: depot.id };
}

async function summarise(db: Db, d: typeof depots.$inferSelect, now: Date): Promise<DepotSummary> {
  const today = depotDate(now, d.timezone);
  const [counts] = await db
    .select({
      chargers: sql<number>`(select count(*)::int from ${chargers} where ${chargers.depotId} = ${d.id})`,
      // Out of service for a period: in service outside it.
      inService: sql<number>`(select count(*)::int from ${chargers} where ${chargers.depotId} = ${d.id} and (${chargers.status} = 'in_service' or ${chargers.outFrom} > ${now.toISOString()}::timestamptz or ${chargers.outUntil} <= ${now.toISOString()}::timestamptz))`,
      buses: sql<number>`(select count(*)::int from ${buses} where ${buses.depotId} = ${d.id} and ${buses.status} <> 'retired')`,
    })
    .from(depots)
    .where(eq(depots.id, d.id));
  const [plan] = await db
    .select({ name: ratePlans.name, currency: ratePlans.currency })
    .from(depotRatePlans)
    .innerJoin(ratePlans, eq(ratePlans.id, depotRatePlans.ratePlanId))
    .where(and(eq(depotRatePlans.depotId, d.id), lte(depotRatePlans.effectiveFrom, today)))
    .orderBy(desc(depotRatePlans.effectiveFrom))
    .limit(1);
  // Tonight's charging serves the service day that ends tonight (the one night model decides which).
  const { tonight } = await nightOfDepot(db, d, now);
  const next = tonight.fromRuns ? { date: tonight.nextServiceDate } : null;
  let nextServiceDay: DepotSummary['nextServiceDay'] = null;
  if (next) {
    const local = (t: Date | null) => (t ? DateTime.fromJSDate(t, { zone: d.timezone }).toFormat('HH:mm') : null);
    // A bus the yard reported absent tonight does not leave from the night's charging.
    const absent = await db
      .selectDistinct({ bus: yardReports.bus })
      .from(yardReports)
      .where(
        and(
          eq(yardReports.depotId, d.id),
          eq(yardReports.serviceDate, tonight.serviceDate),
          eq(yardReports.kind, 'bus_absent'),
        ),
      )
      .orderBy(asc(yardReports.bus));
    const absentBuses = absent.flatMap((a) => (a.bus ? [a.bus] : []));
    const [day] = await db
      .select({
        first: sql<Date | null>`min(${runs.pullOut})`.mapWith((v) => (v ? new Date(v) : null)),
        buses: sql<number>`count(distinct ${runs.busId}) filter (where ${buses.number} <> all(${sql.param(absentBuses)}::text[]))::int`,
      })
      .from(runs)
      .innerJoin(buses, eq(buses.id, runs.busId))
      .where(and(eq(runs.depotId, d.id), eq(runs.serviceDate, next.date)));
    // Only the first run of each bus leaves from the night's charging.
    const [lastFirst] = await db
      .execute<{ last: Date | null }>(
        sql`
      select max(first_out) as last from (
        select min(${runs.pullOut}) as first_out from ${runs}
        where ${runs.depotId} = ${d.id} and ${runs.serviceDate} = ${next.date} group by ${runs.busId}) f`,
      )
      .then((r) => r.rows);
    const [pullIns] = await db
      .select({ last: sql<Date | null>`max(${runs.pullIn})`.mapWith((v) => (v ? new Date(v) : null)) })
      .from(runs)
      .where(and(eq(runs.depotId, d.id), eq(runs.serviceDate, tonight.serviceDate)));
    nextServiceDay = {
      date: next.date,
      firstPullOut: local(day?.first ?? null),
      lastPullOut: local(lastFirst?.last ? new Date(lastFirst.last) : null),
      busesOut: day?.buses ?? 0,
      absentBuses,
      lastPullInToday: local(pullIns?.last ?? null),
    };
  }
  return {
    id: d.id,
    name: d.name,
    timezone: d.timezone,
    serviceLimitKw: d.serviceLimitKw,
    chargerCount: counts?.chargers ?? 0,
    chargersInService: counts?.inService ?? 0,
    busCount: counts?.buses ?? 0,
    ratePlanName: plan?.name ?? null,
    currency: plan?.currency ?? null,
    nextServiceDay,
  };
}
