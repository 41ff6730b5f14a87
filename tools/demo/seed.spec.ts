import { eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { parseScenario } from '@nightyard/scheduling';
import { createDb, createPool } from '../../apps/api/src/db/client';
import { buses, chargers, organisations, plans, runs, users } from '../../apps/api/src/db/schema';
import { TEST_DATABASE_URL } from '../../apps/api/src/testing/test-env';
import { seedDemo } from './seed';

describe('demo seed', () => {
  it('writes the invented district with a published plan for the current night', async () => {
    const pool = createPool(TEST_DATABASE_URL);
    const db = createDb(pool);
    try {
      // Tuesday 2026-12-01, 15:00 in Chicago.
      await seedDemo(db, new Date('2026-12-01T21:00:00Z'));
      const [org] = await db.select().from(organisations).where(eq(organisations.name, 'Tallgrass Valley School District'));
      const people = await db.select().from(users).where(eq(users.organisationId, org!.id));
      expect(people.map((u) => u.email)).toContain('lead@demo.nightyard.example');
      expect(people.find((u) => u.email === 'lead@demo.nightyard.example')!.roles).toEqual(['supervisor', 'yard']);
      expect(await db.select().from(buses).where(eq(buses.organisationId, org!.id))).toHaveLength(24);
      const chs = await db.select().from(chargers).where(eq(chargers.organisationId, org!.id));
      expect(chs).toHaveLength(10);
      expect(chs.filter((c) => c.cabinetId !== null)).toHaveLength(2);
      const dayRuns = await db.select().from(runs).where(eq(runs.serviceDate, '2026-12-02'));
      expect(dayRuns.filter((r) => r.organisationId === org!.id)).toHaveLength(48);
      const [plan] = await db.select().from(plans).where(eq(plans.organisationId, org!.id));
      expect(plan).toMatchObject({ serviceDate: '2026-12-01', state: 'published', status: 'done' });
      expect(parseScenario(plan!.scenario).ok).toBe(true);
      const result = plan!.result as { buses: { shortfallKwh: number }[]; sessions: unknown[] };
      expect(result.buses).toHaveLength(24);
      expect(result.sessions.length).toBeGreaterThanOrEqual(24);
    } finally {
      await pool.end();
    }
  });
});
