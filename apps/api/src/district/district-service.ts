import { eq, sql } from 'drizzle-orm';
import type { Pool } from 'pg';
import { depotDate, type DistrictDepot, type DistrictOverview } from '@nightyard/contracts';
import type { Db } from '../db/client';
import { prepared } from '../db/prepared';
import { plans } from '../db/schema';
import type { AuthUser } from '../auth/auth-user';
import { monthCosts, type CostsInputs } from '../costs/costs-service';
import { visibleDepots } from '../depots/depots-service';
import { DomainError } from '../http/errors';
import { nightOfDepot } from '../night/depot-night';

type Depot = Awaited<ReturnType<typeof visibleDepots>>[number];

/**
 * A plan's figures for the overview, read in the database (a plan's result holds every slot and
 * session: only these few numbers cross the wire). The same figures as the Plans and Costs pages:
 * the cost is the night's charging energy under the plan (the engine's bill, what the Costs page's
 * night shows as its energy cost; demand is billed once a period, so it is the period's, never a
 * night's), a bus is short beyond 1e-6 kWh, the peak is the highest site load of its slots.
 */
const figuresQuery = (db: Db, name: string) =>
  db
    .select({
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
    .where(eq(plans.id, sql.placeholder('planId')))
    .prepare(name);

type PlanFigures = { cost: number | null; peakKw: number | null; shortBuses: number; shortKwh: number };

/**
 * Figures of finished plans, by plan id: a finished plan's result never changes (a revision or a
 * new draft is a new row), so they are read from its result once; the overview then costs one
 * light query per depot for its night's plan. Bounded; the oldest go first.
 */
const finishedFigures = new Map<string, PlanFigures>();
const MAX_KEPT_FIGURES = 500;

async function figuresOf(db: Db, plan: { id: string; status: string }): Promise<PlanFigures> {
  const kept = finishedFigures.get(plan.id);
  if (kept) return kept;
  const [row] = await prepared(db, 'district_plan_figures', figuresQuery).execute({ planId: plan.id });
  const figures = row ?? { cost: null, peakKw: null, shortBuses: 0, shortKwh: 0 };
  if (plan.status === 'done') {
    finishedFigures.set(plan.id, figures);
    while (finishedFigures.size > MAX_KEPT_FIGURES) finishedFigures.delete(finishedFigures.keys().next().value!);
  }
  return figures;
}

/**
 * Each depot's night's plan (the published one, else the latest draft: what-ifs are studies,
 * never the night's plan) and the buses the night's charging serves (those with runs on the next
 * service day), for every depot at once: one round trip whatever the district's size.
 */
async function nightsOf(
  db: Db,
  nights: readonly { depotId: string; serviceDate: string; nextServiceDate: string | null }[],
) {
  const client = (db as unknown as { $client: Pool }).$client;
  const { rows } = await client.query<{
    depot_id: string;
    buses_out: number;
    id: string | null;
    state: 'published' | 'draft' | null;
    version: number | null;
    status: string | null;
  }>(
    `select n.depot_id::text,
       coalesce((select count(distinct r.bus_id)::int from runs r join buses b on b.id = r.bus_id
         where r.depot_id = n.depot_id and r.service_date = n.next_date
           -- as on the depot's own card: a bus reported absent tonight does not leave from here
           and not exists (select 1 from yard_reports y where y.depot_id = n.depot_id
             and y.service_date = n.service_date and y.kind = 'bus_absent' and y.bus = b.number)), 0) as buses_out,
       p.id, p.state, p.version, p.status
     from unnest($1::uuid[], $2::date[], $3::date[]) as n(depot_id, service_date, next_date)
     left join lateral (
       select id, state, version, status from plans
       where depot_id = n.depot_id and service_date = n.service_date
         and kind <> 'what-if' and state in ('published', 'draft')
       order by state = 'published' desc, version desc limit 1) p on true`,
    [nights.map((n) => n.depotId), nights.map((n) => n.serviceDate), nights.map((n) => n.nextServiceDate)],
  );
  return new Map(rows.map((r) => [r.depot_id, r]));
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
        // The same target the costs month shows (and the night's plans are made under).
        targetKw: month.target?.facilityKw ?? null,
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
  // Each depot's own night (its zone, its runs: the night model's, kept per depot and day).
  const nights = await Promise.all(depots.map(async (d) => (await nightOfDepot(db, d, now)).tonight));
  const [plansOf, periods] = await Promise.all([
    nightsOf(
      db,
      depots.map((d, i) => ({
        depotId: d.id,
        serviceDate: nights[i]!.serviceDate,
        nextServiceDate: nights[i]!.fromRuns ? nights[i]!.nextServiceDate : null,
      })),
    ),
    Promise.all(depots.map((d) => periodOf(db, caller, d, now, costsInputs))),
  ]);
  const rows = await Promise.all(
    depots.map(async (depot, i) => {
      const found = plansOf.get(depot.id);
      const plan = found?.id ? { ...found, ...(await figuresOf(db, { id: found.id, status: found.status! })) } : null;
      const tonight: DistrictDepot['tonight'] = {
        serviceDate: nights[i]!.serviceDate,
        planState: plan ? plan.state! : 'none',
        planVersion: plan?.version ?? null,
        busesOut: found?.buses_out ?? 0,
        shortBuses: plan?.shortBuses ?? 0,
        shortKwh: plan?.shortKwh ?? 0,
        peakKw: plan?.peakKw ?? null,
        serviceLimitKw: depot.serviceLimitKw,
        cost: plan?.cost ?? null,
      };
      return { depot, tonight, ...periods[i]! };
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
