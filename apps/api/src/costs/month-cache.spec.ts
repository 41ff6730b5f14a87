import { readFileSync } from 'node:fs';
import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import type { AuthUser } from '../auth/auth-user';
import { depots, ratePlans, users } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, signInAgain, type TestUser } from '../testing/test-app';
import { fixedClock } from '../time/clock';
import { monthCosts, monthCostsCache, newMonthCostsCache } from './costs-service';

// The costs month is remembered per depot and billing period; these tests prove the remembered
// answer is the one a fresh computation gives, and that it changes as soon as an input does.
const NOW = new Date('2026-12-04T18:00:00Z');
// The night of Dec 2 is planned and published that afternoon; the month is then read on Dec 4.
let clock = fixedClock('2026-12-02T12:00:00-06:00');
const app = createTestApp({ clock: () => clock() });
const fixture = (name: string) => readFileSync(new URL(`./fixtures/${name}`, import.meta.url), 'utf8');
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const NUMBERS = ['31', '32', '33'];
let fin: TestUser;
let sup: TestUser;
let caller: AuthUser;
let depotId: string;
let ratePlanId: string;

beforeAll(async () => {
  const org = await createOrganisation(app, { fin: ['finance'], sup: ['supervisor'] });
  ({ fin, sup } = org.users as Record<string, TestUser>);
  const [row] = await app.db.select().from(users).where(eq(users.id, fin.id));
  caller = {
    id: row!.id,
    organisationId: row!.organisationId,
    email: row!.email,
    name: row!.name,
    roles: row!.roles,
    depotIds: [],
  };
  const created = await createDepot(app.db, org.organisationId);
  depotId = created.depot.id;
  caller.depotIds = [depotId];
  ratePlanId = created.ratePlan.id;
  await addBuses(app.db, org.organisationId, depotId, NUMBERS);
  for (const date of ['2026-12-02', '2026-12-03', '2026-12-04']) {
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(sup))
      .send({ forecastLowF: 30, runs: dayRuns(date, NUMBERS, () => 35) })
      .expect(200);
  }
  await publishedPlan(app, sup, depotId, '2026-12-02');
  clock = fixedClock(NOW);
  await signInAgain(app, fin, sup);
});

const month = async () =>
  (await app.request().get(`/api/depots/${depotId}/costs/month`).query({ date: '2026-12-10' }).set(as(fin)).expect(200))
    .body;
/** The same month computed afresh, without any cache, at the app's instant. */
const uncached = async (now = NOW) =>
  JSON.parse(JSON.stringify(await monthCosts(app.db, caller, depotId, '2026-12-10', now, 7, null)));

describe('the costs month cache', () => {
  it('answers from the cache with exactly what a fresh computation gives', async () => {
    const first = await month();
    const hits = monthCostsCache.hits;
    const second = await month();
    expect(monthCostsCache.hits).toBe(hits + 1);
    expect(second).toEqual(first);
    expect(first).toEqual(await uncached());
    expect(first.nights).toHaveLength(1);
    // The answer kept as bytes is the answer of its own inputs only: another fuel economy asked for
    // in between gives its own figures, and asking as before gives the first answer again.
    const other = (
      await app
        .request()
        .get(`/api/depots/${depotId}/costs/month`)
        .query({ date: '2026-12-10', dieselMpg: 5 })
        .set(as(fin))
        .expect(200)
    ).body;
    expect(other.emissions.dieselMpg).toBe(5);
    expect(other.emissions.dieselGallonsAvoided).toBeGreaterThan(first.emissions.dieselGallonsAvoided);
    expect(await month()).toEqual(first);
  });

  it('gives the fresh answer at every moment of the period, however the moments are asked for', async () => {
    const cache = newMonthCostsCache();
    const moments = [
      '2026-11-30T12:00:00Z',
      '2026-12-01T06:00:00Z',
      '2026-12-01T06:00:00.001Z',
      '2026-12-02T23:59:00Z',
      '2026-12-03T00:14:59Z',
      '2026-12-20T10:00:00Z',
      '2026-12-02T23:59:00Z',
      '2027-01-05T00:00:00Z',
    ].map((t) => new Date(t));
    for (const now of moments) {
      const cached = JSON.parse(JSON.stringify(await monthCosts(app.db, caller, depotId, '2026-12-10', now, 7, cache)));
      expect(cached, now.toISOString()).toEqual(await uncached(now));
    }
    expect(cache.hits).toBeGreaterThanOrEqual(moments.length - 1);
  });

  it('changes as soon as meter data is imported', async () => {
    const before = await month();
    await app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(fin))
      .send({ fileName: 'night.xml', content: fixture('green-button-night.xml'), billingPeriodStart: '2026-12-01' })
      .expect(201);
    const after = await month();
    expect(before.sources.actualIntervals).toBe(0);
    expect(after.sources.actualIntervals).toBe(23);
    expect(after.monthToDate).not.toEqual(before.monthToDate);
    expect(after).toEqual(await uncached());
  });

  it('changes as soon as another night is published', async () => {
    const before = await month();
    // Published on the afternoon of Dec 3, before its night began; read again on Dec 4.
    clock = fixedClock('2026-12-03T12:00:00-06:00');
    await signInAgain(app, sup);
    const planId = await publishedPlan(app, sup, depotId, '2026-12-03');
    clock = fixedClock(NOW);
    await signInAgain(app, fin, sup);
    const after = await month();
    expect(after.nights.map((n: { planId: string }) => n.planId)).toContain(planId);
    expect(after.nights).toHaveLength(before.nights.length + 1);
    expect(after.projected).not.toEqual(before.projected);
    expect(after).toEqual(await uncached());
  });

  it("changes when the rate plan's prices are edited", async () => {
    const before = await month();
    const [plan] = await app.db.select().from(ratePlans).where(eq(ratePlans.id, ratePlanId));
    const definition = plan!.definition;
    const dearer = {
      ...definition,
      seasons: definition.seasons.map((season) => ({ ...season, offPeakPrice: season.offPeakPrice * 2 })),
    };
    await app.db.update(ratePlans).set({ definition: dearer }).where(eq(ratePlans.id, ratePlanId));
    const after = await month();
    expect(after.projected.energyTotal).toBeGreaterThan(before.projected.energyTotal);
    expect(after).toEqual(await uncached());
  });

  it("changes when the depot's building load changes", async () => {
    const before = await month();
    await app.db
      .update(depots)
      .set({ otherLoadKw: [35] })
      .where(eq(depots.id, depotId));
    const after = await month();
    expect(after.projected.total).toBeGreaterThan(before.projected.total);
    expect(after).toEqual(await uncached());
  });
});
