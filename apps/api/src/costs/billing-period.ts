import { and, desc, eq, lte } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { ratePlanDefinitionSchema, type RatePlanDefinition } from '@nightyard/contracts';
import type { Db } from '../db/client';
import { depotRatePlans, ratePlans } from '../db/schema';
import { DomainError } from '../http/errors';

/** The billing period holding `date`: from the depot's billing start day to the same day a month on. */
export function billingPeriodOf(date: string, billingStartDay: number, zone: string): BillingPeriod {
  // Asked on every costs request; luxon's zone arithmetic is the dearest part of it.
  const key = `${date}|${billingStartDay}|${zone}`;
  const known = periods.get(key);
  if (known) return known;
  let start = DateTime.fromISO(date, { zone }).startOf('day').set({ day: billingStartDay });
  if (start > DateTime.fromISO(date, { zone })) start = start.minus({ months: 1 });
  const end = start.plus({ months: 1 });
  const period = { start, end, days: Math.round(end.diff(start, 'days').days) };
  periods.set(key, period);
  if (periods.size > 1000) periods.delete(periods.keys().next().value!);
  return period;
}

export interface BillingPeriod {
  readonly start: DateTime;
  readonly end: DateTime;
  readonly days: number;
}

const periods = new Map<string, BillingPeriod>();

/** The rate plan that applies to the depot on a date, or a message saying none does. */
export async function ratePlanOn(
  db: Db,
  depot: { id: string; name: string },
  date: string,
): Promise<{ name: string; definition: RatePlanDefinition }> {
  const [row] = await db
    .select({ name: ratePlans.name, definition: ratePlans.definition })
    .from(depotRatePlans)
    .innerJoin(ratePlans, eq(ratePlans.id, depotRatePlans.ratePlanId))
    .where(and(eq(depotRatePlans.depotId, depot.id), lte(depotRatePlans.effectiveFrom, date)))
    .orderBy(desc(depotRatePlans.effectiveFrom))
    .limit(1);
  if (!row)
    throw new DomainError(
      'validation_failed',
      `No rate plan applies to ${depot.name} on ${date}: assign one under Rates`,
      { date: 'No rate plan' },
    );
  return { name: row.name, definition: ratePlanDefinitionSchema.parse(row.definition) };
}
