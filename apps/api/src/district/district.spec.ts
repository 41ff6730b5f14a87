import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import type { DistrictOverview, MonthCosts, PlanDetail } from '@nightyard/contracts';
import { depotRatePlans, userDepots } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { generatedPlan, publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

// The clock stands at TEST_START (Tuesday 1 December 2026, 15:00 at the test depots): tonight is
// the night after service day 1 December.
const app = createTestApp();
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const TONIGHT = '2026-12-01';
let boss: TestUser;
let fin: TestUser;
let finA: TestUser;
let yard: TestUser;
let depotA: string;
let depotB: string;
let depotC: string;
let planA: string;

async function runsFor(depotId: string, numbers: string[], sup: TestUser) {
  for (const date of [TONIGHT, '2026-12-02']) {
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(sup))
      .send({ forecastLowF: 30, runs: dayRuns(date, numbers, () => 30) })
      .expect(200);
  }
}

beforeAll(async () => {
  const org = await createOrganisation(app, {
    boss: ['admin', 'supervisor'],
    fin: ['finance'],
    fina: ['finance'],
    yard: ['yard'],
  });
  ({ boss, fin, fina: finA, yard } = org.users as Record<string, TestUser>);
  const { organisationId } = org;
  depotA = (await createDepot(app.db, organisationId, 'Alder Street', false)).depot.id;
  depotB = (await createDepot(app.db, organisationId, 'Birch Lane', false)).depot.id;
  depotC = (await createDepot(app.db, organisationId, 'Cedar Yard', false)).depot.id;
  await app.db.delete(depotRatePlans).where(eq(depotRatePlans.depotId, depotC));
  await app.db.insert(userDepots).values([
    { userId: fin.id, depotId: depotA },
    { userId: fin.id, depotId: depotB },
    { userId: fin.id, depotId: depotC },
    { userId: finA.id, depotId: depotA },
    { userId: yard.id, depotId: depotA },
  ]);
  await addBuses(app.db, organisationId, depotA, ['11', '12', '13']);
  await addBuses(app.db, organisationId, depotB, ['21', '22']);
  await runsFor(depotA, ['11', '12', '13'], boss);
  await runsFor(depotB, ['21', '22'], boss);
  planA = await publishedPlan(app, boss, depotA, TONIGHT);
  await generatedPlan(app, boss, depotB, TONIGHT);
}, 60_000);

const overview = async (u: TestUser) =>
  (await app.request().get('/api/district').set(as(u)).expect(200)).body as DistrictOverview;
const month = async (depotId: string) =>
  (await app.request().get(`/api/depots/${depotId}/costs/month`).query({ date: TONIGHT }).set(as(fin)).expect(200))
    .body as MonthCosts;
const plan = async (id: string) =>
  (await app.request().get(`/api/plans/${id}`).set(as(boss)).expect(200)).body.plan as PlanDetail;

describe('the district overview', () => {
  it("shows each depot's tonight with the figures of its own plan", async () => {
    const d = await overview(fin);
    expect(d.depots.map((x) => x.depot.name)).toEqual(['Alder Street', 'Birch Lane', 'Cedar Yard']);
    const [a, b, c] = d.depots;
    const published = await plan(planA);
    expect(a!.tonight).toEqual({
      serviceDate: TONIGHT,
      planState: 'published',
      planVersion: published.version,
      busesOut: 3,
      shortBuses: published.shortBuses,
      shortKwh: expect.any(Number),
      peakKw: Math.max(...published.result!.slots.map((s) => s.loadKw)),
      serviceLimitKw: 300,
      cost: published.result!.cost.energy,
    });
    // The night's energy cost as the Costs page shows it for that night (summed there from the
    // sessions' kW, which the engine keeps to 6 decimals: equal to a millionth of a dollar).
    const night = (await month(depotA)).nights.find((n) => n.date === TONIGHT)!;
    expect(a!.tonight.cost).toBeCloseTo(night.planEnergyCost, 6);
    expect(a!.tonight.shortKwh).toBeCloseTo(
      published.result!.buses.reduce((t, x) => t + (x.shortfallKwh > 1e-6 ? x.shortfallKwh : 0), 0),
      9,
    );
    const [draft] = (await app.request().get(`/api/depots/${depotB}/plans`).set(as(boss)).expect(200)).body.plans;
    const draftResult = (await plan(draft.id)).result!;
    expect(b!.tonight).toMatchObject({
      planState: 'draft',
      planVersion: draft.version,
      busesOut: 2,
      cost: draftResult.cost.energy,
      peakKw: Math.max(...draftResult.slots.map((s) => s.loadKw)),
    });
    expect(c!.tonight).toMatchObject({ planState: 'none', planVersion: null, busesOut: 0, peakKw: null, cost: null });
  });

  it("shows each depot's billing period as its costs month does; totals from the unrounded figures", async () => {
    const d = await overview(fin);
    for (const depotId of [depotA, depotB]) {
      const m = await month(depotId);
      const row = d.depots.find((x) => x.depot.id === depotId)!;
      expect(row.period).toEqual({
        start: m.period.start,
        end: m.period.end,
        ratePlanName: m.ratePlanName,
        billToDate: m.monthToDate.total,
        projectedBill: m.projected.total,
        peakKw: m.peaks.facility.kw,
        targetKw: null,
      });
    }
    // No rate plan: no bill, the depot is still shown.
    expect(d.depots.find((x) => x.depot.id === depotC)!.period).toBeNull();
    const sum = (f: (x: DistrictOverview['depots'][number]) => number) => d.depots.reduce((t, x) => t + f(x), 0);
    expect(d.totals).toEqual({
      tonightCost: sum((x) => x.tonight.cost ?? 0),
      shortBuses: sum((x) => x.tonight.shortBuses),
      billToDate: sum((x) => x.period?.billToDate ?? 0),
      projectedBill: sum((x) => x.period?.projectedBill ?? 0),
    });
    expect(d.currency).toBe('USD');
    // Asked again, the kept reads answer the same.
    expect(await overview(fin)).toEqual(d);
  });

  it('shows only the depots the caller may see; administrators see all; the yard may not ask', async () => {
    expect((await overview(finA)).depots.map((x) => x.depot.id)).toEqual([depotA]);
    expect((await overview(boss)).depots.map((x) => x.depot.id)).toEqual([depotA, depotB, depotC]);
    await app.request().get('/api/district').set(as(yard)).expect(403);
    const other = await createOrganisation(app, { admin: ['admin'] });
    expect((await overview(other.users.admin!)).depots).toEqual([]);
  });
});
