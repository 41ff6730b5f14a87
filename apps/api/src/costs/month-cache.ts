import { and, eq, getTableColumns, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { prepared } from '../db/prepared';
import { depots } from '../db/schema';

/**
 * Remembers the heavy part of a billing period's costs (the bills over ~3,000 intervals) per
 * depot and period. Each entry carries the version of the rows it was computed from; a request
 * reads the current version with one cheap query and recomputes only when it differs, so every
 * API process sees a change as soon as it is written.
 */
export class MonthCostsCache<T> {
  private readonly entries = new Map<string, { version: string; value: T }>();
  /** Counted for tests and the bench. */
  hits = 0;
  misses = 0;

  constructor(private readonly maxEntries = 200) {}

  get(key: string, version: string): T | undefined {
    const hit = this.entries.get(key);
    if (!hit || hit.version !== version) {
      this.misses++;
      return undefined;
    }
    this.hits++;
    // Most recently used last, so the oldest is dropped first.
    this.entries.delete(key);
    this.entries.set(key, hit);
    return hit.value;
  }

  set(key: string, version: string, value: T): void {
    this.entries.delete(key);
    this.entries.set(key, { version, value });
    while (this.entries.size > this.maxEntries) this.entries.delete(this.entries.keys().next().value!);
  }

  clear(): void {
    this.entries.clear();
  }
}

const p = (name: string) => sql.placeholder(name);
// Qualified by hand: in a one-table select Drizzle writes a column bare, and inside the
// subqueries below a bare "id" would be the subquery's own.
const depotIdColumn = sql.raw('"depots"."id"');

/**
 * The version of everything a period's costs are computed from: the published plans of its
 * nights (a published plan never changes; a revision is a new row), the meter readings and
 * imports, the earlier published plans (a demand ratchet looks back at their peaks), the runs
 * (the forecast's service calendar), the peaks entered or measured so far, the rate plan that applies (its row's xmin changes with every update of its definition); the
 * depot's own settings are added from its row.
 */
const inputsVersion = sql<string>`concat_ws('|',
  coalesce((select string_agg(id::text, ',' order by id) from plans
    where depot_id = ${depotIdColumn} and state = 'published' and service_date >= ${p('plansFrom')} and service_date < ${p('periodEnd')}), '-'),
  (select count(*) || ':' || coalesce(sum(kwh), 0) || ':' || coalesce(sum(minutes), 0) from meter_intervals
    where depot_id = ${depotIdColumn} and starts_at >= ${p('fromAt')} and starts_at < ${p('toAt')}),
  (select count(*) || ':' || coalesce(max(created_at)::text, '') from meter_imports where depot_id = ${depotIdColumn}),
  (select count(*) || ':' || coalesce(max(published_at)::text, '') from plans
    where depot_id = ${depotIdColumn} and state = 'published' and service_date < ${p('plansFrom')}),
  coalesce((select billing_period_start || ':' || facility_kw || ':' || periods_kw::text || ':' || updated_at from billing_peaks
    where depot_id = ${depotIdColumn}), '-'),
  (select count(*) || ':' || coalesce(max(created_at)::text, '') from runs
    where depot_id = ${depotIdColumn} and service_date >= (${p('plansFrom')}::date - 24) and service_date < (${p('periodEnd')}::date + 7)),
  coalesce((select r.id || ':' || r.xmin || ':' || d.effective_from || ':' || d.xmin from depot_rate_plans d
    join rate_plans r on r.id = d.rate_plan_id
    where d.depot_id = ${depotIdColumn} and d.effective_from <= ${p('periodStart')} order by d.effective_from desc limit 1), '-'))`;

/**
 * Everything a costs-month request reads before its (remembered) bills, in one round trip: the
 * caller's depot, the inputs' version, the period's service days, and the miles driven by now
 * (as driven, else the energy used over the bus's kWh per mile). The hottest finance page asks
 * on every load; each extra query is a round trip and a write to the database's socket.
 * A named statement: PostgreSQL plans it once per connection.
 */
const monthInputsQuery = (db: Db, name: string) =>
  db
    .select({
      depot: getTableColumns(depots),
      version: inputsVersion,
      serviceDays: sql<string[]>`coalesce((select array_agg(distinct r.service_date::text) from runs r
      where r.depot_id = ${depotIdColumn} and r.service_date >= ${p('periodStart')} and r.service_date < ${p('periodEnd')}), '{}'::text[])`,
      // Each run's pull-in (epoch ms) and miles, in pull-in order: the miles driven by a moment are
      // summed from these, so the inputs hold for every moment of the period.
      runMiles: sql<[number, number][]>`coalesce((select json_agg(json_build_array(
          (extract(epoch from r.pull_in) * 1000)::float8, coalesce(r.miles, coalesce(r.kwh, 0) / b.kwh_per_mile))
        order by r.pull_in) from runs r
      join buses b on b.id = r.bus_id
      where r.depot_id = ${depotIdColumn} and r.service_date >= ${p('periodStart')} and r.service_date < ${p('periodEnd')}), '[]'::json)`,
    })
    .from(depots)
    .where(and(eq(depots.id, p('depotId')), eq(depots.organisationId, p('organisationId'))))
    .prepare(name);

export interface MonthInputsWindow {
  /** Four days before the period: a night that began then may still fall in it. */
  plansFrom: string;
  periodStart: string;
  periodEnd: string;
  fromAt: Date;
  toAt: Date;
}

/** The caller's depot with the period's inputs, or null when the depot is not theirs. */
export async function monthInputs(db: Db, organisationId: string, depotId: string, window: MonthInputsWindow) {
  const [row] = await prepared(db, 'month_costs_inputs', monthInputsQuery).execute({
    depotId,
    organisationId,
    plansFrom: window.plansFrom,
    periodStart: window.periodStart,
    periodEnd: window.periodEnd,
    fromAt: window.fromAt.toISOString(),
    toAt: window.toAt.toISOString(),
  });
  if (!row) return null;
  const { depot } = row;
  return {
    depot,
    version: `${depot.timezone}|${depot.billingStartDay}|${depot.serviceLimitKw}|${JSON.stringify(depot.otherLoadKw)}|${row.version}`,
    serviceDays: row.serviceDays,
    milesBy: milesByMoment(row.runMiles),
  };
}

export type MonthInputs = NonNullable<Awaited<ReturnType<typeof monthInputs>>>;

/** Miles driven by a moment (runs pulled in by then), from the runs' pull-ins in time order. */
function milesByMoment(runMiles: readonly [number, number][]): (nowMs: number) => number {
  const pullIns = runMiles.map(([at]) => at);
  const upTo: number[] = [0];
  for (const [, miles] of runMiles) upTo.push(upTo.at(-1)! + miles);
  return (nowMs) => {
    let lo = 0;
    let hi = pullIns.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (pullIns[mid]! <= nowMs) lo = mid + 1;
      else hi = mid;
    }
    return upTo[lo]!;
  };
}
