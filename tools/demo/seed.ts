import { DateTime } from 'luxon';
import { sql } from 'drizzle-orm';
import type { Db } from '../../apps/api/src/db/client';
import {
  buses, chargers, depotRatePlans, depots, organisations, powerCabinets, ratePlans, runs, users,
} from '../../apps/api/src/db/schema';
import { hashPassword } from '../../apps/api/src/auth/secrets';
import {
  DEMO_PASSWORD, demoBuses, demoCabinets, demoChargers, demoDepot, demoOrganisation, demoRatePlan, demoRunsForBus,
  demoUsers,
} from './demo-depot';

/** True when no organisation exists yet: a new database. */
export async function isEmpty(db: Db): Promise<boolean> {
  const [row] = await db.select({ n: sql<number>`count(*)::int` }).from(organisations);
  return (row?.n ?? 0) === 0;
}

/**
 * Writes the invented demo district in one transaction: its people, one depot with chargers and
 * a shared power cabinet, a rate plan, 24 buses and the runs of the school days around `now`.
 */
export async function seedDemo(db: Db, now = new Date()): Promise<void> {
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  await db.transaction(async (tx) => {
    const [org] = await tx.insert(organisations).values(demoOrganisation).returning();
    const organisationId = org!.id;
    await tx.insert(users).values(
      demoUsers.map((u) => ({ organisationId, email: u.email, name: u.name, roles: [...u.roles], passwordHash, status: 'active' as const })),
    );
    const [depot] = await tx
      .insert(depots)
      .values({
        organisationId, name: demoDepot.name, timezone: demoDepot.timezone, serviceLimitKw: demoDepot.serviceLimitKw,
        otherLoadKw: demoDepot.otherLoadProfileKw, billingStartDay: demoDepot.billingStartDay,
      })
      .returning();
    const depotId = depot!.id;
    const cabinets = await tx
      .insert(powerCabinets)
      .values(demoCabinets.map((c) => ({ organisationId, depotId, label: c.label, limitKw: c.limitKw })))
      .returning();
    await tx.insert(chargers).values(
      demoChargers.map((c) => ({
        organisationId, depotId, label: c.label, maxKw: c.maxKw, connector: c.connector,
        cabinetId: c.cabinet ? cabinets.find((k) => k.label === c.cabinet)!.id : null,
      })),
    );
    const [plan] = await tx
      .insert(ratePlans)
      .values({ organisationId, name: demoRatePlan.name, currency: demoRatePlan.definition.currency, definition: demoRatePlan.definition })
      .returning();
    const today = DateTime.fromJSDate(now, { zone: demoDepot.timezone }).startOf('day');
    await tx.insert(depotRatePlans).values({
      organisationId, depotId, ratePlanId: plan!.id, effectiveFrom: today.minus({ months: 6 }).startOf('month').toISODate()!,
    });
    const fleet = await tx
      .insert(buses)
      .values(demoBuses.map((b) => ({ organisationId, depotId, ...b })))
      .returning({ id: buses.id, number: buses.number });
    // School days from yesterday to a week ahead, so tonight always has a morning to plan for.
    const rows: (typeof runs.$inferInsert)[] = [];
    for (let d = -1; d <= 7; d++) {
      const day = today.plus({ days: d });
      if (day.weekday > 5) continue;
      fleet.forEach((bus, i) => {
        for (const run of demoRunsForBus(i)) {
          const at = (hhmm: string) => DateTime.fromISO(`${day.toISODate()}T${hhmm}`, { zone: demoDepot.timezone }).toJSDate();
          rows.push({
            organisationId, depotId, busId: bus.id, serviceDate: day.toISODate()!,
            pullOut: at(run.pullOut), pullIn: at(run.pullIn), miles: run.miles,
          });
        }
      });
    }
    await tx.insert(runs).values(rows);
  });
}
