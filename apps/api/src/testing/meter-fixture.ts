import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { meterImports, meterIntervals, ratePlans } from '../db/schema';
import type { createDepot } from './depot-fixture';

type Fixture = Awaited<ReturnType<typeof createDepot>>;

/**
 * Puts a depot's rate plan on an 80 % / 11-month demand ratchet and imports November's meter
 * readings for it (one import), as the costs specs read a ratchet from earlier months' peaks.
 */
export async function withNovemberRatchet(
  db: Db,
  organisationId: string,
  { depot, ratePlan }: Pick<Fixture, 'depot' | 'ratePlan'>,
  november: { startsAt: Date; minutes: number; kwh: number }[],
): Promise<void> {
  await db
    .update(ratePlans)
    .set({ definition: { ...ratePlan.definition, demandRatchet: { percent: 80, months: 11 } } })
    .where(eq(ratePlans.id, ratePlan.id));
  const [imp] = await db
    .insert(meterImports)
    .values({
      organisationId,
      depotId: depot.id,
      fileName: 'nov.csv',
      format: 'csv',
      billingPeriodStart: '2026-11-01',
      intervals: november.length,
      duplicates: 0,
      gaps: [],
    })
    .returning();
  await db
    .insert(meterIntervals)
    .values(november.map((r) => ({ organisationId, depotId: depot.id, importId: imp!.id, ...r })));
}
