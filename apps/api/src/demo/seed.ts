import { DateTime } from 'luxon';
import { eq, inArray, sql } from 'drizzle-orm';
import { parseScenario, type Plan, type Scenario } from '@nightyard/scheduling';
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
  demoChargerIdentity,
  demoChargers,
  demoDistrictDepots,
  demoForecastLowF,
  demoOrganisation,
  demoUsers,
  mainDemoDepot,
  type DemoDistrictDepot,
} from '@nightyard/demo';
import { billingPeriodOf } from '../costs/billing-period';

/** True when no organisation exists yet: a new database. */
export async function isEmpty(db: Db): Promise<boolean> {
  const [row] = await db.select({ n: sql<number>`count(*)::int` }).from(organisations);
  return (row?.n ?? 0) === 0;
}

/** Who and what a seeded demo district is, for the start-up banner and the browser tests. */
export interface SeededDemo {
  organisationId: string;
  /** The original demo depot (the one the browser tests and the charger simulator use). */
  depotId: string;
  /** Every depot seeded, the original first. */
  depots: { key: string; id: string; name: string }[];
  /** Sign-in e-mail per demo role key (admin, facilities, supervisor, yard, finance, lead; yard2, yard3 with the district). */
  emails: Record<string, string>;
  /** OCPP identities of the depot's chargers by label. */
  chargerIdentities: Record<string, string>;
  /** The service dates whose plans were published (at the original depot). */
  publishedNights: string[];
}

/** The demo's e-mail for a role key; a tag gives a district of its own (tests seed one each). */
export const demoEmail = (email: string, tag?: string) => (tag ? email.replace('@demo.', `@${tag}.demo.`) : email);

/** Which depots a seed writes: the original one alone (the default, quick), or the whole district. */
export type DemoDepots = 'main' | 'district';

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

/**
 * Writes the invented demo district in one transaction: its people, the original depot (chargers,
 * a shared power cabinet, a rate plan, 24 buses) and, with `depots: 'district'`, two more depots
 * of other sizes, charger mixes and utilities, each with the runs of the school days around
 * `now`; people hold depots as a district's would (admin: every depot by role; facilities,
 * supervisor and finance: all; the yard staff: one each). Then publishes each depot's night in
 * progress at `now` (if any) and the next one, as the night model names them. `tag` makes the
 * e-mails and charger identities unique, so several districts can live in one database (each
 * browser test seeds its own).
 */
export async function seedDemo(
  db: Db,
  now: Date,
  tag?: string,
  options: { depots?: DemoDepots } = {},
): Promise<SeededDemo> {
  const [passwordHash, chargerPasswordHash] = await demoHashes();
  const seeded = options.depots === 'district' ? demoDistrictDepots : [mainDemoDepot];
  const extraUsers = seeded.flatMap((d) => (d.yardUser ? [{ ...d.yardUser, roles: ['yard'] as const }] : []));
  const ids = await db.transaction(async (tx) => {
    const [org] = await tx.insert(organisations).values(demoOrganisation).returning();
    const organisationId = org!.id;
    const people = await tx
      .insert(users)
      .values(
        [...demoUsers, ...extraUsers].map((u) => ({
          organisationId,
          email: demoEmail(u.email, tag),
          name: u.name,
          roles: [...u.roles],
          passwordHash,
          status: 'active' as const,
        })),
      )
      .returning({ id: users.id, email: users.email });
    const depotIds: Record<string, string> = {};
    for (const d of seeded) {
      depotIds[d.key] = await seedDepot(tx, organisationId, d, now, chargerPasswordHash, tag);
    }
    // Who holds which depot: the yard staff their own, the office every depot seeded.
    const holds = (email: string): string[] => {
      const key = email.split('@')[0]!;
      if (key === 'admin') return [];
      if (key === 'yard' || key === 'lead') return [depotIds.main!];
      const own = seeded.find((d) => d.yardUser?.email.split('@')[0] === key);
      return own ? [depotIds[own.key]!] : Object.values(depotIds);
    };
    const byEmail = new Map(people.map((p) => [p.email, p.id]));
    const assignments = [...demoUsers, ...extraUsers].flatMap((u) =>
      holds(u.email).map((depotId) => ({ userId: byEmail.get(demoEmail(u.email, tag))!, depotId })),
    );
    if (assignments.length) await tx.insert(userDepots).values(assignments);
    // Everyone who may open the original depot starts on it (the README's and the tour's depot),
    // not on the first of the list by name; a switch is remembered as usual from then on.
    const onMain = [...demoUsers, ...extraUsers]
      .filter((u) => u.email.split('@')[0] === 'admin' || holds(u.email).includes(depotIds.main!))
      .map((u) => byEmail.get(demoEmail(u.email, tag))!);
    if (seeded.length > 1 && onMain.length)
      await tx.update(users).set({ chosenDepotId: depotIds.main! }).where(inArray(users.id, onMain));
    return { organisationId, depotIds };
  });
  const publishedNights: string[] = [];
  for (const d of seeded) {
    const yardEmail = d.yardUser?.email ?? 'yard@demo.nightyard.example';
    const nights = await publishDemoNights(db, ids.organisationId, ids.depotIds[d.key]!, now, yardEmail, tag);
    if (d.key === 'main') publishedNights.push(...nights);
  }
  return {
    organisationId: ids.organisationId,
    depotId: ids.depotIds.main!,
    depots: seeded.map((d) => ({ key: d.key, id: ids.depotIds[d.key]!, name: d.depot.name })),
    emails: Object.fromEntries(
      [...demoUsers, ...extraUsers].map((u) => [u.email.split('@')[0]!, demoEmail(u.email, tag)]),
    ),
    chargerIdentities: Object.fromEntries(demoChargers.map((c) => [c.label, demoChargerIdentity(c.label, tag)])),
    publishedNights,
  };
}

/**
 * The demo's password hashes, made once per process: bcrypt is slow on purpose, and any hash of
 * the password serves (the people of one seed already share one).
 */
let hashes: Promise<[string, string]> | undefined;
function demoHashes(): Promise<[string, string]> {
  hashes ??= Promise.all([hashPassword(DEMO_PASSWORD), hashPassword(DEMO_CHARGER_PASSWORD)]);
  hashes.catch(() => (hashes = undefined));
  return hashes;
}

/**
 * The engine's plans of seeded nights, by scenario (its JSON). The engine is deterministic, so a
 * seed of the same depot at the same instant (every browser test seeds a district of its own, most
 * at one of a few instants) takes the plan solved before instead of solving it again: the same
 * plan, without a second or more of engine time. The last few are kept.
 */
const demoPlans = new Map<string, Promise<Plan>>();
const DEMO_PLANS_KEPT = 24;
async function planDemoNight(key: string, scenario: Scenario): Promise<Plan> {
  let plan = demoPlans.get(key);
  if (!plan) {
    plan = runInPool({ kind: 'plan', scenario });
    demoPlans.set(key, plan);
    plan.catch(() => demoPlans.delete(key));
    if (demoPlans.size > DEMO_PLANS_KEPT) demoPlans.delete(demoPlans.keys().next().value!);
  }
  // A copy each time: the caller's plan is its own.
  return structuredClone(await plan);
}

/** One depot of the district: its chargers and cabinets, rate plan, buses, runs and peaks so far. */
async function seedDepot(
  tx: Tx,
  organisationId: string,
  d: DemoDistrictDepot,
  now: Date,
  chargerPasswordHash: string,
  tag?: string,
): Promise<string> {
  const zone = d.depot.timezone;
  const [depot] = await tx
    .insert(depots)
    .values({
      organisationId,
      name: d.depot.name,
      timezone: zone,
      serviceLimitKw: d.depot.serviceLimitKw,
      otherLoadKw: d.depot.otherLoadProfileKw,
      billingStartDay: d.depot.billingStartDay,
      yardCrew: d.depot.yardCrew,
    })
    .returning();
  const depotId = depot!.id;
  const cabinets = await tx
    .insert(powerCabinets)
    .values(d.cabinets.map((c) => ({ organisationId, depotId, label: c.label, limitKw: c.limitKw })))
    .returning();
  await tx.insert(chargers).values(
    d.chargers.map((c) => ({
      organisationId,
      depotId,
      label: c.label,
      maxKw: c.maxKw,
      connector: c.connector,
      ocppIdentity: d.chargerIdentity(c.label, tag),
      ocppPasswordHash: chargerPasswordHash,
      cabinetId: c.cabinet ? cabinets.find((k) => k.label === c.cabinet)!.id : null,
    })),
  );
  const [plan] = await tx
    .insert(ratePlans)
    .values({
      organisationId,
      name: d.ratePlan.name,
      currency: d.ratePlan.definition.currency,
      definition: d.ratePlan.definition,
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
    .values(d.buses.map((b) => ({ organisationId, depotId, ...b })))
    .returning({ id: buses.id, number: buses.number });
  // School days from three days back to a week ahead, so any night around `now` has its runs.
  const rows: (typeof runs.$inferInsert)[] = [];
  const days: (typeof serviceDays.$inferInsert)[] = [];
  for (let offset = -3; offset <= 7; offset++) {
    const day = today.plus({ days: offset });
    if (day.weekday > 5) continue;
    days.push({ organisationId, depotId, serviceDate: day.toISODate()!, forecastLowF: demoForecastLowF(offset) });
    fleet.forEach((bus, i) => {
      for (const run of d.runsForBus(i)) {
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
  // Peaks already set: this period's working days so far, or (where a ratchet bills a share of
  // it) the last period's highest.
  const period = billingPeriodOf(today.toISODate()!, d.depot.billingStartDay, zone).start;
  await tx.insert(billingPeaks).values({
    organisationId,
    depotId,
    billingPeriodStart: (d.peaks.previousPeriod
      ? billingPeriodOf(period.minus({ days: 1 }).toISODate()!, d.depot.billingStartDay, zone).start
      : period
    ).toISODate()!,
    facilityKw: d.peaks.facilityKw,
    periodsKw: d.peaks.periodsKw,
  });
  return depotId;
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
  yardEmail: string,
  tag?: string,
): Promise<string[]> {
  const [supervisor] = await db
    .select()
    .from(users)
    .where(eq(users.email, demoEmail('supervisor@demo.nightyard.example', tag)));
  const [yard] = await db
    .select()
    .from(users)
    .where(eq(users.email, demoEmail(yardEmail, tag)));
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
    const result = await planDemoNight(JSON.stringify(scenario), parsed.scenario);
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
