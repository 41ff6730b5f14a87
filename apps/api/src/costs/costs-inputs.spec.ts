import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { NotifiedCache } from '../db/notified-cache';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, signInAgain, type TestUser } from '../testing/test-app';
import { TEST_DATABASE_URL } from '../testing/test-env';
import { until, writeQuietly } from '../testing/notices';
import { fixedClock } from '../time/clock';
import { COSTS_CHANGED, RATE_PLAN_CHANGED, type CostsInputs } from './costs-service';

// The costs month's inputs are kept per depot while the database reports changes to the rows they
// come from (as main.ts runs it): a change must show on the next request all the same.

let clock = fixedClock('2026-12-02T12:00:00-06:00');
const kept: CostsInputs = new NotifiedCache(TEST_DATABASE_URL, {
  channel: COSTS_CHANGED,
  forgetAllOn: [RATE_PLAN_CHANGED],
});
const app = createTestApp({ clock: () => clock(), costsInputs: kept });
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const NUMBERS = ['81', '82'];
let fin: TestUser;
let sup: TestUser;
let depotId: string;
let ratePlanId: string;

const month = async () =>
  (await app.request().get(`/api/depots/${depotId}/costs/month`).query({ date: '2026-12-10' }).set(as(fin)).expect(200))
    .body as {
    projected: { total: number };
    emissions: { miles: number };
  };

/** Changes the building load without telling anyone (see writeQuietly). */
const buildingLoadQuietly = (kw: number) =>
  writeQuietly(app.db, sql`update depots set other_load_kw = ${JSON.stringify([kw])}::jsonb where id = ${depotId}`);

beforeAll(async () => {
  await kept.start();
  const org = await createOrganisation(app, { fin: ['finance'], sup: ['supervisor'] });
  ({ fin, sup } = org.users as Record<string, TestUser>);
  const created = await createDepot(app.db, org.organisationId);
  depotId = created.depot.id;
  ratePlanId = created.ratePlan.id;
  await addBuses(app.db, org.organisationId, depotId, NUMBERS);
  for (const date of ['2026-12-02', '2026-12-03']) {
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(sup))
      .send({ runs: dayRuns(date, NUMBERS, () => 35) })
      .expect(200);
  }
  await publishedPlan(app, sup, depotId, '2026-12-02');
  // Before the 3rd's first pull-in: the 2nd's runs are in, the 3rd's not yet.
  clock = fixedClock('2026-12-03T07:00:00-06:00');
  await signInAgain(app, fin, sup);
});
afterAll(() => kept.close());

describe("the costs month's inputs kept per depot while the database reports their changes", () => {
  it('keeps the inputs, counts the miles driven by each moment, and sees a change through the API at once', async () => {
    expect(kept.isListening).toBe(true);
    const first = await month();
    await buildingLoadQuietly(60);
    // Kept: the quiet change is not seen (the proof that the inputs were not read again).
    expect((await month()).projected.total).toBe(first.projected.total);
    // The miles driven come from the kept runs, by the moment asked for: a day later, the 3rd's runs are in.
    clock = fixedClock('2026-12-04T07:00:00-06:00');
    await signInAgain(app, fin, sup);
    expect((await month()).emissions.miles).toBeGreaterThan(first.emissions.miles);
    // A write through the API (another day's runs) is seen on the very next request, the quiet change with it.
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/2026-12-07`)
      .set(as(sup))
      .send({ runs: dayRuns('2026-12-07', NUMBERS, () => 35) })
      .expect(200);
    expect((await month()).projected.total).toBeGreaterThan(first.projected.total);
  });

  it("sees a change made straight in the database (as another process would), a rate plan's included", async () => {
    const before = await month();
    await app.db.execute(sql`update depots set other_load_kw = '[90]'::jsonb where id = ${depotId}`);
    await until(async () => (await month()).projected.total > before.projected.total, 'the building load is seen');
    const dearer = await month();
    await app.db.execute(
      sql`update rate_plans set definition = jsonb_set(definition, '{seasons,0,offPeakPrice}', '0.5') where id = ${ratePlanId}`,
    );
    await until(async () => (await month()).projected.total > dearer.projected.total, 'the rate plan is seen');
  });
});
