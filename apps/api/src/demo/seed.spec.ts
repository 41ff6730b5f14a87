import { randomUUID } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { afterAll, describe, expect, it } from 'vitest';
import { parseScenario } from '@nightyard/scheduling';
import { createDb, createPool } from '../db/client';
import {
  billingPeaks,
  buses,
  chargers,
  depotRatePlans,
  plans,
  powerCabinets,
  ratePlans,
  runs,
  userDepots,
  users,
  yardConfirmations,
} from '../db/schema';
import { TEST_DATABASE_URL } from '../testing/test-env';
import { seedDemo } from './seed';

const ZONE = 'America/Chicago';
const at = (local: string) => DateTime.fromISO(local, { zone: ZONE }).toJSDate();
const pool = createPool(TEST_DATABASE_URL);
const db = createDb(pool);
afterAll(() => pool.end());
const tag = () => `seed-${randomUUID().slice(0, 8)}`;
/** The main depot alone on Tuesday at 15:00: two tests read it and neither changes it, so it is seeded once. */
let weekday: ReturnType<typeof seedDemo> | undefined;
const weekdaySeed = () => (weekday ??= seedDemo(db, at('2026-12-01T15:00'), tag()));

describe('demo seed', () => {
  it('writes the invented district with the night in progress and the next one published (weekday 15:00)', async () => {
    // Tuesday 2026-12-01, 15:00 in Chicago: buses came back from their morning runs, so Tuesday's night is under way.
    const seeded = await weekdaySeed();
    expect(seeded.publishedNights).toEqual(['2026-12-01', '2026-12-02']);
    const people = await db.select().from(users).where(eq(users.organisationId, seeded.organisationId));
    const lead = people.find((u) => u.email === seeded.emails.lead);
    expect(lead!.roles).toEqual(['supervisor', 'yard']);
    expect(await db.select().from(buses).where(eq(buses.organisationId, seeded.organisationId))).toHaveLength(24);
    const chs = await db.select().from(chargers).where(eq(chargers.organisationId, seeded.organisationId));
    expect(chs).toHaveLength(10);
    expect(chs.filter((c) => c.cabinetId !== null)).toHaveLength(2);
    const dayRuns = await db
      .select()
      .from(runs)
      .where(and(eq(runs.serviceDate, '2026-12-02'), eq(runs.organisationId, seeded.organisationId)));
    expect(dayRuns).toHaveLength(48);
    // Readings exist only for buses already back: none of Wednesday's, none of Tuesday's afternoon yet.
    expect(dayRuns.every((r) => r.arrivalSocPct === null)).toBe(true);
    const published = await db.select().from(plans).where(eq(plans.organisationId, seeded.organisationId));
    expect(published.map((p) => p.state)).toEqual(['published', 'published']);
    for (const plan of published) {
      expect(plan.status).toBe('done');
      expect(parseScenario(plan.scenario).ok).toBe(true);
      const result = plan.result!;
      expect(result.buses).toHaveLength(24);
      expect(result.sessions.length).toBeGreaterThanOrEqual(24);
      expect(plan.publishedAt!.getTime()).toBeLessThanOrEqual(at('2026-12-01T15:00').getTime());
    }
  });

  it("just after midnight (Wednesday 00:02) publishes Tuesday's night in progress and Wednesday's, with the crew's steps so far confirmed", async () => {
    const now = at('2026-12-02T00:02');
    const seeded = await seedDemo(db, now, tag());
    expect(seeded.publishedNights).toEqual(['2026-12-01', '2026-12-02']);
    const [tuesday] = await db
      .select()
      .from(plans)
      .where(and(eq(plans.organisationId, seeded.organisationId), eq(plans.serviceDate, '2026-12-01')));
    expect(tuesday!.publishedAt!.getTime()).toBeLessThan(now.getTime());
    const confirmed = await db.select().from(yardConfirmations).where(eq(yardConfirmations.planId, tuesday!.id));
    expect(confirmed.length).toBeGreaterThan(0);
    expect(confirmed.every((c) => c.confirmedAt.getTime() <= now.getTime())).toBe(true);
    // Tuesday's afternoon arrivals were read as the buses came in.
    const tuesdayRuns = await db
      .select()
      .from(runs)
      .where(and(eq(runs.serviceDate, '2026-12-01'), eq(runs.organisationId, seeded.organisationId)));
    expect(tuesdayRuns.filter((r) => r.arrivalSocPct !== null)).toHaveLength(24);
  });

  it('on a Friday night (22:00) the night runs to Monday', async () => {
    const seeded = await seedDemo(db, at('2026-12-04T22:00'), tag());
    expect(seeded.publishedNights).toEqual(['2026-12-04', '2026-12-07']);
  });
});

describe('demo seed: the district', () => {
  it('with the main depot alone (the default), every non-admin holds it', async () => {
    const seeded = await weekdaySeed();
    expect(seeded.depots.map((d) => d.key)).toEqual(['main']);
    const held = await db
      .select({ email: users.email, depotId: userDepots.depotId })
      .from(userDepots)
      .innerJoin(users, eq(users.id, userDepots.userId))
      .where(eq(users.organisationId, seeded.organisationId));
    const holders = held.map((h) => h.email).sort();
    expect(holders).toEqual(
      Object.entries(seeded.emails)
        .filter(([key]) => key !== 'admin')
        .map(([, email]) => email)
        .sort(),
    );
    expect(new Set(held.map((h) => h.depotId))).toEqual(new Set([seeded.depotId]));
  });

  it('with the district: three depots of their own sizes, chargers, tariffs and runs; people hold theirs', async () => {
    const seeded = await seedDemo(db, at('2026-12-01T15:00'), tag(), { depots: 'district' });
    expect(seeded.depots.map((d) => d.name)).toEqual([
      'Orchard Lane Depot',
      'Kestrel Hollow Depot',
      'Sandpiper Reach Depot',
    ]);
    const [main, kestrel, sandpiper] = seeded.depots.map((d) => d.id) as [string, string, string];
    expect(main).toBe(seeded.depotId);
    // The original depot is as it always was.
    expect(await db.select().from(buses).where(eq(buses.depotId, main))).toHaveLength(24);
    expect(await db.select().from(chargers).where(eq(chargers.depotId, main))).toHaveLength(10);
    expect(seeded.publishedNights).toEqual(['2026-12-01', '2026-12-02']);
    // The others: their own fleets, charger mixes and cabinets.
    expect(await db.select().from(buses).where(eq(buses.depotId, kestrel))).toHaveLength(12);
    expect(await db.select().from(buses).where(eq(buses.depotId, sandpiper))).toHaveLength(36);
    const kw = async (depotId: string) =>
      (await db.select().from(chargers).where(eq(chargers.depotId, depotId))).map((c) => c.maxKw).sort((a, b) => a - b);
    expect(await kw(kestrel)).toEqual([40, 40, 40, 40, 40, 40, 150, 150]);
    expect(await kw(sandpiper)).toEqual([...Array(16).fill(60), ...Array(6).fill(150)]);
    expect(await db.select().from(powerCabinets).where(eq(powerCabinets.depotId, sandpiper))).toHaveLength(2);
    // Each on a tariff of its own utility: one with a demand ratchet, one with winter and summer.
    const tariff = async (depotId: string) => {
      const [row] = await db
        .select({ name: ratePlans.name, definition: ratePlans.definition })
        .from(depotRatePlans)
        .innerJoin(ratePlans, eq(ratePlans.id, depotRatePlans.ratePlanId))
        .where(eq(depotRatePlans.depotId, depotId));
      return row!;
    };
    const [t1, t2, t3] = await Promise.all([tariff(main), tariff(kestrel), tariff(sandpiper)]);
    expect(new Set([t1.name, t2.name, t3.name]).size).toBe(3);
    expect(t2.definition.demandRatchet).toEqual({ percent: 80, months: 11 });
    expect(t3.definition.seasons.map((s) => s.name)).toEqual(['Summer', 'Winter']);
    // The ratchet has last period's peak to look back at.
    const [peak] = await db.select().from(billingPeaks).where(eq(billingPeaks.depotId, kestrel));
    expect(peak).toMatchObject({ billingPeriodStart: '2026-11-01', facilityKw: 236 });
    // Runs for the seeded days, and each depot's nights published as the original's are.
    for (const [depotId, n] of [
      [kestrel, 12],
      [sandpiper, 36],
    ] as const) {
      const day = await db
        .select()
        .from(runs)
        .where(and(eq(runs.depotId, depotId), eq(runs.serviceDate, '2026-12-02')));
      expect(day).toHaveLength(n * 2);
      const published = await db.select().from(plans).where(eq(plans.depotId, depotId));
      expect(published.map((p) => [p.serviceDate, p.state]).sort()).toEqual([
        ['2026-12-01', 'published'],
        ['2026-12-02', 'published'],
      ]);
      for (const p of published) expect(p.result!.buses).toHaveLength(n);
    }
    // Who holds what: the office every depot, each yard its own, the administrator none (sees all).
    const held = await db
      .select({ email: users.email, depotId: userDepots.depotId })
      .from(userDepots)
      .innerJoin(users, eq(users.id, userDepots.userId))
      .where(eq(users.organisationId, seeded.organisationId));
    const of = (key: string) =>
      held
        .filter((h) => h.email === seeded.emails[key])
        .map((h) => h.depotId)
        .sort();
    const all = [main, kestrel, sandpiper].sort();
    expect(of('admin')).toEqual([]);
    for (const key of ['finance', 'supervisor', 'facilities']) expect(of(key), key).toEqual(all);
    expect(of('yard')).toEqual([main]);
    expect(of('lead')).toEqual([main]);
    expect(of('yard2')).toEqual([kestrel]);
    expect(of('yard3')).toEqual([sandpiper]);
    // Who starts where: everyone who may open the original depot on it, the others on the list's first.
    const chosen = await db
      .select({ email: users.email, depotId: users.chosenDepotId })
      .from(users)
      .where(eq(users.organisationId, seeded.organisationId));
    const startsOn = (key: string) => chosen.find((c) => c.email === seeded.emails[key])!.depotId;
    for (const key of ['admin', 'finance', 'supervisor', 'facilities', 'yard', 'lead'])
      expect(startsOn(key), key).toBe(main);
    expect(startsOn('yard2')).toBeNull();
    expect(startsOn('yard3')).toBeNull();
  }, 60_000);
});
