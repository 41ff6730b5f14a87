import { DateTime } from 'luxon';
import { eq, sql } from 'drizzle-orm';
import { parseScenario } from '@nightyard/scheduling';
import { runInPool } from '../workers/pool';
import { buildNightScenario } from '../plans/night-scenario';
import type { Db } from '../db/client';
import {
  billingPeaks,
  buses,
  chargers,
  depotRatePlans,
  depots,
  organisations,
  plans,
  powerCabinets,
  ratePlans,
  runs,
  serviceDays,
  userDepots,
  users,
  yardConfirmations,
} from '../db/schema';
import { hashPassword } from '../auth/secrets';
import { nightOfDepot } from '../night/depot-night';
import { yardSteps } from '../yard/yard-steps';
import {
  DEMO_CHARGER_PASSWORD,
  DEMO_PASSWORD,
  demoBuses,
  demoChargerIdentity,
  demoCabinets,
  demoChargers,
  demoDepot,
  demoForecastLowF,
  demoOrganisation,
  demoRatePlan,
  demoRunsForBus,
  demoUsers,
} from '@nightyard/demo';

/** True when no organisation exists yet: a new database. */
export async function isEmpty(db: Db): Promise<boolean> {
  const [row] = await db.select({ n: sql<number>`count(*)::int` }).from(organisations);
  return (row?.n ?? 0) === 0;
}

/** Who and what a seeded demo district is, for the start-up banner and the browser tests. */
export interface SeededDemo {
  organisationId: string;
  depotId: string;
  /** Sign-in e-mail per demo role key (admin, facilities, supervisor, yard, finance, lead). */
  emails: Record<string, string>;
  /** OCPP identities of the depot's chargers by label. */
  chargerIdentities: Record<string, string>;
  /** The service dates whose plans were published. */
  publishedNights: string[];
}

/** The demo's e-mail for a role key; a tag gives a district of its own (tests seed one each). */
export const demoEmail = (email: string, tag?: string) => (tag ? email.replace('@demo.', `@${tag}.demo.`) : email);

/**
 * Writes the invented demo district in one transaction: its people, one depot with chargers and
 * a shared power cabinet, a rate plan, 24 buses and the runs of the school days around `now`;
 * then publishes the night in progress at `now` (if any) and the next one, as the night model
 * names them. `tag` makes the e-mails and charger identities unique, so several districts can
 * live in one database (each browser test seeds its own).
 */
export async function seedDemo(db: Db, now: Date, tag?: string): Promise<SeededDemo> {
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const zone = demoDepot.timezone;
  const ids = await db.transaction(async (tx) => {
    const [org] = await tx.insert(organisations).values(demoOrganisation).returning();
    const organisationId = org!.id;
    const people = await tx
      .insert(users)
      .values(
        demoUsers.map((u) => ({
          organisationId,
          email: demoEmail(u.email, tag),
          name: u.name,
          roles: [...u.roles],
          passwordHash,
          status: 'active' as const,
        })),
      )
      .returning({ id: users.id, roles: users.roles });
    const [depot] = await tx
      .insert(depots)
      .values({
        organisationId,
        name: demoDepot.name,
        timezone: zone,
        serviceLimitKw: demoDepot.serviceLimitKw,
        otherLoadKw: demoDepot.otherLoadProfileKw,
        billingStartDay: demoDepot.billingStartDay,
        yardCrew: demoDepot.yardCrew,
      })
      .returning();
    const depotId = depot!.id;
    const assigned = people.filter((p) => !p.roles.includes('admin'));
    if (assigned.length) await tx.insert(userDepots).values(assigned.map((p) => ({ userId: p.id, depotId })));
    const cabinets = await tx
      .insert(powerCabinets)
      .values(demoCabinets.map((c) => ({ organisationId, depotId, label: c.label, limitKw: c.limitKw })))
      .returning();
    const chargerPasswordHash = await hashPassword(DEMO_CHARGER_PASSWORD);
    await tx.insert(chargers).values(
      demoChargers.map((c) => ({
        organisationId,
        depotId,
        label: c.label,
        maxKw: c.maxKw,
        connector: c.connector,
        ocppIdentity: demoChargerIdentity(c.label, tag),
        ocppPasswordHash: chargerPasswordHash,
        cabinetId: c.cabinet ? cabinets.find((k) => k.label === c.cabinet)!.id : null,
      })),
    );
    const [plan] = await tx
      .insert(ratePlans)
      .values({
        organisationId,
        name: demoRatePlan.name,
        currency: demoRatePlan.definition.currency,
        definition: demoRatePlan.definition,
      })
      .returning();
    const today = DateTime.fromJSDate(now, { zone }).startOf('day');
    await tx.insert(depotRatePlans).values({
      organisationId,
      depotId,
      ratePlanId: plan!.id,
      effectiveFrom: today.minus({ months: 6 }).startOf('month').toISODate()!,
    });
    const fleet = await tx
      .insert(buses)
      .values(demoBuses.map((b) => ({ organisationId, depotId, ...b })))
      .returning({ id: buses.id, number: buses.number });
    // School days from three days back to a week ahead, so any night around `now` has its runs.
    const rows: (typeof runs.$inferInsert)[] = [];
    const days: (typeof serviceDays.$inferInsert)[] = [];
    for (let d = -3; d <= 7; d++) {
      const day = today.plus({ days: d });
      if (day.weekday > 5) continue;
      days.push({ organisationId, depotId, serviceDate: day.toISODate()!, forecastLowF: demoForecastLowF(d) });
      fleet.forEach((bus, i) => {
        for (const run of demoRunsForBus(i)) {
          const at = (hhmm: string) => DateTime.fromISO(`${day.toISODate()}T${hhmm}`, { zone }).toJSDate();
          const pullIn = at(run.pullIn);
          rows.push({
            organisationId,
            depotId,
            busId: bus.id,
            serviceDate: day.toISODate()!,
            pullOut: at(run.pullOut),
            pullIn,
            miles: run.miles,
            // Buses already back have a reading; later arrivals are estimated from miles.
            ...(pullIn <= now && run.arrivalSocPct !== undefined
              ? { arrivalSocPct: run.arrivalSocPct, arrivalSocSource: 'typed' as const }
              : {}),
          });
        }
      });
    }
    await tx.insert(runs).values(rows);
    if (days.length) await tx.insert(serviceDays).values(days);
    // Earlier nights and the working days of this billing period already set these peaks.
    await tx.insert(billingPeaks).values({
      organisationId,
      depotId,
      billingPeriodStart: today.startOf('month').toISODate()!,
      facilityKw: 185,
      periodsKw: { 'on-peak': 48 },
    });
    return { organisationId, depotId };
  });
  const publishedNights = await publishDemoNights(db, ids.organisationId, ids.depotId, now, tag);
  return {
    ...ids,
    emails: Object.fromEntries(demoUsers.map((u) => [u.email.split('@')[0]!, demoEmail(u.email, tag)])),
    chargerIdentities: Object.fromEntries(demoChargers.map((c) => [c.label, demoChargerIdentity(c.label, tag)])),
    publishedNights,
  };
}

/**
 * Plans and publishes the night in progress at `now` (if any) and the next one, so the yard and
 * finance see plans from the start. The night in progress was published before it began, and the
 * yard has confirmed its steps due so far, as a night crew would have.
 */
async function publishDemoNights(
  db: Db,
  organisationId: string,
  depotId: string,
  now: Date,
  tag?: string,
): Promise<string[]> {
  const [supervisor] = await db
    .select()
    .from(users)
    .where(eq(users.email, demoEmail('supervisor@demo.nightyard.example', tag)));
  const [yard] = await db
    .select()
    .from(users)
    .where(eq(users.email, demoEmail('yard@demo.nightyard.example', tag)));
  const [depot] = await db.select().from(depots).where(eq(depots.id, depotId));
  const caller = {
    id: supervisor!.id,
    organisationId,
    email: supervisor!.email,
    name: supervisor!.name,
    roles: supervisor!.roles,
    depotIds: [depotId],
  };
  const night = await nightOfDepot(db, depot!, now);
  const published: string[] = [];
  for (const n of [night.inForce, night.next]) {
    if (!n || !n.fromRuns || published.includes(n.serviceDate)) continue;
    const { scenario, notes } = await buildNightScenario(db, caller, depotId, n.serviceDate, false);
    const parsed = parseScenario(scenario);
    if (!parsed.ok) throw new Error(`Demo scenario is not valid: ${JSON.stringify(parsed.problems)}`);
    const result = await runInPool({ kind: 'plan', scenario: parsed.scenario });
    const underWay = n === night.inForce;
    const publishedAt = underWay ? new Date(Math.min(now.getTime(), Date.parse(n.start)) - 30 * 60_000) : now;
    const [row] = await db
      .insert(plans)
      .values({
        organisationId,
        depotId,
        serviceDate: n.serviceDate,
        version: 1,
        kind: 'generated',
        state: 'published',
        status: 'done',
        stage: 'Done',
        includesMidday: false,
        scenario,
        notes,
        result,
        createdBy: caller.id,
        createdAt: publishedAt,
        publishedBy: caller.id,
        publishedAt,
      })
      .returning({ id: plans.id });
    if (underWay) {
      // The crew kept up until ten minutes ago.
      const due = yardSteps(result, now, new Map()).filter((s) => Date.parse(s.at) <= now.getTime() - 10 * 60_000);
      if (due.length) {
        await db.insert(yardConfirmations).values(
          due.map((s) => ({
            organisationId,
            depotId,
            serviceDate: n.serviceDate,
            stepKey: s.key,
            planId: row!.id,
            confirmedBy: yard!.id,
            confirmedAt: new Date(Date.parse(s.at) + 3 * 60_000),
          })),
        );
      }
    }
    published.push(n.serviceDate);
  }
  return published;
}
