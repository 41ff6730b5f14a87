import { ratePlanDefinitionSchema } from '@nightyard/contracts';
import { sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { chargers, depotRatePlans, depots, powerCabinets, ratePlans } from '../db/schema';

/**
 * Assigns a depot to every non-administrator of its organisation, as migration 0016 did for the
 * depots that existed then: the tests written before people had depots keep their meaning.
 * Tests of the per-depot access assign depots themselves.
 */
export async function assignEveryone(db: Db, organisationId: string, depotId: string): Promise<void> {
  await db.execute(sql`insert into user_depots (user_id, depot_id)
    select id, ${depotId}::uuid from users where organisation_id = ${organisationId} and not ('admin' = any(roles))
    on conflict do nothing`);
}

/**
 * A small invented depot for tests: two chargers on a shared cabinet, one alone, a TOU plan;
 * assigned to the organisation's people already there unless `assign` is false.
 */
export async function createDepot(db: Db, organisationId: string, name = 'Test depot', assign = true) {
  const [depot] = await db
    .insert(depots)
    .values({ organisationId, name, timezone: 'America/Chicago', serviceLimitKw: 300, otherLoadKw: [20] })
    .returning();
  if (assign) await assignEveryone(db, organisationId, depot!.id);
  const [cabinet] = await db
    .insert(powerCabinets)
    .values({ organisationId, depotId: depot!.id, label: 'P1', limitKw: 120 })
    .returning();
  const chs = await db
    .insert(chargers)
    .values([
      {
        organisationId,
        depotId: depot!.id,
        cabinetId: cabinet!.id,
        label: 'A',
        maxKw: 60,
        connector: 'SAE J1772 CCS1',
      },
      {
        organisationId,
        depotId: depot!.id,
        cabinetId: cabinet!.id,
        label: 'B',
        maxKw: 60,
        connector: 'SAE J1772 CCS1',
      },
      { organisationId, depotId: depot!.id, label: 'C', maxKw: 30, connector: 'SAE J1772 CCS1' },
    ])
    .returning();
  const definition = ratePlanDefinitionSchema.parse({
    currency: 'USD',
    seasons: [
      {
        name: 'All year',
        fromMonth: 1,
        toMonth: 12,
        offPeakPrice: 0.08,
        facilityDemandCharge: 12,
        periods: [
          {
            name: 'on-peak',
            price: 0.27,
            demandCharge: 9.5,
            windows: [{ dayTypes: ['weekday'], from: '16:00', to: '21:00' }],
          },
        ],
      },
    ],
  });
  const [plan] = await db
    .insert(ratePlans)
    .values({ organisationId, name: 'Test TOU', currency: 'USD', definition })
    .returning();
  await db
    .insert(depotRatePlans)
    .values({ organisationId, depotId: depot!.id, ratePlanId: plan!.id, effectiveFrom: '2026-01-01' });
  return { depot: depot!, cabinet: cabinet!, chargers: chs, ratePlan: plan! };
}
