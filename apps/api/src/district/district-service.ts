import { and, countDistinct, eq, sql } from 'drizzle-orm';
import { depotDate, type DistrictDepot, type DistrictOverview } from '@nightyard/contracts';
import type { Db } from '../db/client';
import { plans, runs } from '../db/schema';
import type { AuthUser } from '../auth/auth-user';
import { monthCosts, type CostsInputs } from '../costs/costs-service';
import { visibleDepots } from '../depots/depots-service';
import { DomainError } from '../http/errors';
import { nightOfDepot } from '../night/depot-night';

type Depot = Awaited<ReturnType<typeof visibleDepots>>[number];

/**
 * Tonight's plan of a depot in figures, read in the database (a plan's result holds every slot and
 * session: only these few numbers cross the wire): the night's published plan, else its latest
 * draft (what-ifs are studies, never the night's plan). The same figures as the Plans and Costs
 * pages: the cost is the night's charging energy under the plan (the engine's bill, what the Costs
 * page's night shows as its energy cost; demand is billed once a period, so it is the period's,
 * never a night's), a bus is short beyond 1e-6 kWh, the peak is the highest site load of its slots.
 */
async function tonightsPlan(db: Db, depotId: string, serviceDate: string) {
  const [row] = await db
    .select({
      state: plans.state,
      version: plans.version,
      cost: sql<number | null>`(${plans.result}->'cost'->>'energy')::float8`,
      peakKw: sql<
        number | null
      >`(select max((s->>'loadKw')::float8) from jsonb_array_elements(${plans.result}->'slots') s)`,
      shortBuses: sql<number>`coalesce((select count(*)::int from jsonb_array_elements(${plans.result}->'buses') b
        where (b->>'shortfallKwh')::float8 > 1e-6), 0)`,
      shortKwh: sql<number>`coalesce((select sum((b->>'shortfallKwh')::float8) from jsonb_array_elements(${plans.result}->'buses') b
        where (b->>'shortfallKwh')::float8 > 1e-6), 0)`,
    })
    .from(plans)
    .where(
      and(
        eq(plans.depotId, depotId),
        eq(plans.serviceDate, serviceDate),
        sql`${plans.kind} <> 'what-if'`,
        sql`${plans.state} in ('published', 'draft')`,
      ),
    )
    .orderBy(sql`${plans.state} = 'published' desc`, sql`${plans.version} desc`)
    .limit(1);
  return row ?? null;
}

async function busesOut(db: Db, depotId: string, serviceDate: string): Promise<number> {
  const [row] = await db
    .select({ n: countDistinct(runs.busId) })
    .from(runs)
    .where(and(eq(runs.depotId, depotId), eq(runs.serviceDate, serviceDate)));
  return row?.n ?? 0;
}

async function tonightOf(db: Db, depot: Depot, now: Date): Promise<DistrictDepot['tonight']> {
  const { tonight } = await nightOfDepot(db, depot, now);
  const [plan, out] = await Promise.all([
    tonightsPlan(db, depot.id, tonight.serviceDate),
    // The buses the night's charging serves: those with runs on the next service day.
    tonight.fromRuns ? busesOut(db, depot.id, tonight.nextServiceDate) : Promise.resolve(0),
  ]);
  return {
    serviceDate: tonight.serviceDate,
    planState: plan ? (plan.state as 'published' | 'draft') : 'none',
    planVersion: plan?.version ?? null,
    busesOut: out,
    shortBuses: plan?.shortBuses ?? 0,
    shortKwh: plan?.shortKwh ?? 0,
    peakKw: plan?.peakKw ?? null,
    serviceLimitKw: depot.serviceLimitKw,
    cost: plan?.cost ?? null,
  };
}

/** The billing period in force at the depot from the costs month (kept reads), null without a rate plan. */
async function periodOf(
  db: Db,
  caller: AuthUser,
  depot: Depot,
  now: Date,
  costsInputs?: CostsInputs,
): Promise<{ period: DistrictDepot['period']; currency: string | null }> {
  try {
    const month = await monthCosts(
      db,
      caller,
      depot.id,
      depotDate(now, depot.timezone),
      now,
      undefined,
      undefined,
      costsInputs,
    );
    return {
      currency: month.currency,
      period: {
        start: month.period.start,
        end: month.period.end,
        ratePlanName: month.ratePlanName,
        billToDate: month.monthToDate.total,
        projectedBill: month.projected.total,
        peakKw: month.peaks.facility.kw,
        // The period's demand target is planned elsewhere (issue 18, part 2): none yet.
        targetKw: null,
      },
    };
  } catch (err) {
    // A depot without a rate plan has no bill: shown without its period, not refused.
    if (err instanceof DomainError && err.fields?.date === 'No rate plan') return { period: null, currency: null };
    throw err;
  }
}

/**
 * Every depot the caller may see, tonight and the billing period side by side, from the same
 * services as each depot's own pages (the night model, the plans, the costs month with its kept
 * reads), so the figures reconcile. Totals are sums of the unrounded figures.
 */
export async function districtOverview(
  db: Db,
  caller: AuthUser,
  now: Date,
  costsInputs?: CostsInputs,
): Promise<DistrictOverview> {
  const depots = await visibleDepots(db, caller);
  const rows = await Promise.all(
    depots.map(async (depot) => {
      const [tonight, period] = await Promise.all([
        tonightOf(db, depot, now),
        periodOf(db, caller, depot, now, costsInputs),
      ]);
      return { depot, tonight, ...period };
    }),
  );
  const shown: DistrictDepot[] = rows.map((r) => ({
    depot: { id: r.depot.id, name: r.depot.name, timezone: r.depot.timezone },
    tonight: r.tonight,
    period: r.period,
  }));
  const sum = (f: (d: DistrictDepot) => number) => shown.reduce((a, d) => a + f(d), 0);
  return {
    currency: rows.find((r) => r.currency)?.currency ?? 'USD',
    depots: shown,
    totals: {
      tonightCost: sum((d) => d.tonight.cost ?? 0),
      shortBuses: sum((d) => d.tonight.shortBuses),
      billToDate: sum((d) => d.period?.billToDate ?? 0),
      projectedBill: sum((d) => d.period?.projectedBill ?? 0),
    },
  };
}
