import { randomUUID } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { afterAll, describe, expect, it } from 'vitest';
import { parseScenario } from '@nightyard/scheduling';
import { createDb, createPool } from '../db/client';
import { buses, chargers, plans, runs, users, yardConfirmations } from '../db/schema';
import { TEST_DATABASE_URL } from '../testing/test-env';
import { seedDemo } from './seed';

const ZONE = 'America/Chicago';
const at = (local: string) => DateTime.fromISO(local, { zone: ZONE }).toJSDate();
const pool = createPool(TEST_DATABASE_URL);
const db = createDb(pool);
afterAll(() => pool.end());
const tag = () => `seed-${randomUUID().slice(0, 8)}`;

describe('demo seed', () => {
  it('writes the invented district with the night in progress and the next one published (weekday 15:00)', async () => {
    // Tuesday 2026-12-01, 15:00 in Chicago: buses came back from their morning runs, so Tuesday's night is under way.
    const seeded = await seedDemo(db, at('2026-12-01T15:00'), tag());
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
