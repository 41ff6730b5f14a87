import type { Pool } from 'pg';
import type { Db } from '../db/client';

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

/**
 * The version of everything a period's costs are computed from, in one query: the published
 * plans of its nights (a published plan never changes; a revision is a new row), the meter
 * readings and imports, the runs (the forecast's service calendar), the peaks entered or measured so far, the earlier published plans (a demand ratchet looks back at
 * their peaks), the rate plan that applies (its
 * row's xmin changes with every update of its definition), and the depot's own settings.
 * A named statement: PostgreSQL plans it once per connection, not on every request.
 */
const VERSION_QUERY = {
  name: 'month-costs-inputs-version',
  text: `
    select concat_ws('|',
      coalesce((select string_agg(id::text, ',' order by id) from plans
        where depot_id = $1 and state = 'published' and service_date >= $2 and service_date < $3), '-'),
      (select count(*) || ':' || coalesce(sum(kwh), 0) || ':' || coalesce(sum(minutes), 0) from meter_intervals
        where depot_id = $1 and starts_at >= $4 and starts_at < $5),
      (select count(*) || ':' || coalesce(max(created_at)::text, '') from meter_imports where depot_id = $1),
      (select count(*) || ':' || coalesce(max(published_at)::text, '') from plans
        where depot_id = $1 and state = 'published' and service_date < $2),
      coalesce((select billing_period_start || ':' || facility_kw || ':' || periods_kw::text || ':' || updated_at from billing_peaks
        where depot_id = $1), '-'),
      (select count(*) || ':' || coalesce(max(created_at)::text, '') from runs
        where depot_id = $1 and service_date >= ($2::date - 24) and service_date < ($3::date + 7)),
      coalesce((select r.id || ':' || r.xmin || ':' || d.effective_from || ':' || d.xmin from depot_rate_plans d
        join rate_plans r on r.id = d.rate_plan_id
        where d.depot_id = $1 and d.effective_from <= $6 order by d.effective_from desc limit 1), '-')
    ) as v`,
};

export async function monthInputsVersion(
  db: Db,
  depot: { id: string; timezone: string; billingStartDay: number; otherLoadKw: number[]; serviceLimitKw: number },
  window: { plansFrom: string; plansTo: string; periodStart: string; fromAt: Date; toAt: Date },
): Promise<string> {
  // Drizzle keeps the pg pool it was made with as $client; a named statement is a pg feature.
  const client = (db as unknown as { $client: Pool }).$client;
  const result = await client.query<{ v: string | null }>({
    ...VERSION_QUERY,
    values: [depot.id, window.plansFrom, window.plansTo, window.fromAt.toISOString(), window.toAt.toISOString(), window.periodStart],
  });
  const row = result.rows[0];
  return `${depot.timezone}|${depot.billingStartDay}|${depot.serviceLimitKw}|${JSON.stringify(depot.otherLoadKw)}|${row?.v ?? ''}`;
}
