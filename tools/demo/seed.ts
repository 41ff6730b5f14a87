import { DateTime } from 'luxon';
import { eq, sql } from 'drizzle-orm';
import { parseScenario, planScenario } from '@nightyard/scheduling';
import { buildNightScenario } from '../../apps/api/src/plans/night-scenario';
import type { Db } from '../../apps/api/src/db/client';
import {
  billingPeaks, buses, chargers, depotRatePlans, depots, organisations, plans, powerCabinets, ratePlans, runs, serviceDays, users,
} from '../../apps/api/src/db/schema';
import { hashPassword } from '../../apps/api/src/auth/secrets';
import {
  DEMO_CHARGER_PASSWORD, DEMO_PASSWORD, demoBuses, demoChargerIdentity, demoCabinets, demoChargers, demoDepot, demoForecastLowF, demoOrganisation, demoRatePlan,
  demoRunsForBus, demoUsers,
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
    const chargerPasswordHash = await hashPassword(DEMO_CHARGER_PASSWORD);
    await tx.insert(chargers).values(
      demoChargers.map((c) => ({
        organisationId, depotId, label: c.label, maxKw: c.maxKw, connector: c.connector,
        ocppIdentity: demoChargerIdentity(c.label), ocppPasswordHash: chargerPasswordHash,
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
    const days: (typeof serviceDays.$inferInsert)[] = [];
    for (let d = -3; d <= 7; d++) {
      const day = today.plus({ days: d });
      if (day.weekday > 5) continue;
      days.push({ organisationId, depotId, serviceDate: day.toISODate()!, forecastLowF: demoForecastLowF(d) });
      fleet.forEach((bus, i) => {
        for (const run of demoRunsForBus(i)) {
          const at = (hhmm: string) => DateTime.fromISO(`${day.toISODate()}T${hhmm}`, { zone: demoDepot.timezone }).toJSDate();
          rows.push({
            organisationId, depotId, busId: bus.id, serviceDate: day.toISODate()!,
            pullOut: at(run.pullOut), pullIn: at(run.pullIn), miles: run.miles,
            // Yesterday's and today's afternoon arrivals have readings; later days are estimated.
            ...(d <= 0 && run.arrivalSocPct !== undefined ? { arrivalSocPct: run.arrivalSocPct, arrivalSocSource: 'typed' as const } : {}),
          });
        }
      });
    }
    await tx.insert(runs).values(rows);
    if (days.length) await tx.insert(serviceDays).values(days);
    // Earlier nights and the working days of this billing period already set these peaks.
    await tx.insert(billingPeaks).values({
      organisationId, depotId, billingPeriodStart: today.startOf('month').toISODate()!, facilityKw: 185, periodsKw: { 'on-peak': 48 },
    });
  });
  await seedTonightPlan(db, now);
}

/**
 * Plans and publishes the current night, so the yard and finance see a plan from the start. The
 * night belongs to the latest school day up to today (a Friday plan runs to Monday morning).
 */
async function seedTonightPlan(db: Db, now: Date): Promise<void> {
  const [supervisor] = await db.select().from(users).where(eq(users.email, 'supervisor@demo.nightyard.example'));
  const [depot] = await db.select().from(depots).where(eq(depots.organisationId, supervisor!.organisationId));
  const caller = { id: supervisor!.id, organisationId: supervisor!.organisationId, email: supervisor!.email, name: supervisor!.name, roles: supervisor!.roles };
  let day = DateTime.fromJSDate(now, { zone: depot!.timezone }).startOf('day');
  while (day.weekday > 5) day = day.minus({ days: 1 });
  const serviceDate = day.toISODate()!;
  const { scenario, notes } = await buildNightScenario(db, caller, depot!.id, serviceDate, false);
  const parsed = parseScenario(scenario);
  if (!parsed.ok) throw new Error(`Demo scenario is not valid: ${JSON.stringify(parsed.problems)}`);
  const result = await planScenario(parsed.scenario);
  await db.insert(plans).values({
    organisationId: caller.organisationId, depotId: depot!.id, serviceDate, version: 1, kind: 'generated', state: 'published',
    status: 'done', stage: 'Done', includesMidday: false, scenario: scenario as unknown as Record<string, unknown>, notes,
    result: result as unknown as Record<string, unknown>, createdBy: caller.id, publishedBy: caller.id, publishedAt: now,
  });
}
