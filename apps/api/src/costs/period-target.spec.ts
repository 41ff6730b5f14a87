import { and, eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { depots, plans } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { generatedPlan, publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, signInAgain, type TestUser } from '../testing/test-app';
import { periodTargetOf, planningJobCaller } from './period-target';

// The billing period's demand target through the API: the costs month and the plan review carry
// it, computed from the data as it is (a heavier night's runs raise it), and a night the service
// limit cannot serve is explained. The LP itself is checked against a brute force in the engine
// (libs/scheduling/src/period-target.spec.ts).

let now = new Date('2026-12-14T13:00:00-06:00');
const app = createTestApp({ clock: () => now });
let sup: TestUser;
let fin: TestUser;
let yard: TestUser;
let depotId: string;
let organisationId: string;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const NUMBERS = ['207', '208', '209'];

async function enterDay(date: string, miles: number) {
  await app
    .request()
    .put(`/api/depots/${depotId}/service-days/${date}`)
    .set(as(sup))
    .send({ forecastLowF: 40, runs: dayRuns(date, NUMBERS, () => 40).map((r) => ({ ...r, miles: r.miles + miles })) })
    .expect(200);
}

const month = async (date = '2026-12-14') =>
  (await app.request().get(`/api/depots/${depotId}/costs/month`).query({ date }).set(as(fin)).expect(200)).body;

beforeAll(async () => {
  const org = await createOrganisation(app, { sup: ['supervisor'], fin: ['finance'], yard: ['yard'] });
  ({ sup, fin, yard } = org.users as Record<string, TestUser>);
  organisationId = org.organisationId;
  depotId = (await createDepot(app.db, organisationId)).depot.id;
  await addBuses(app.db, organisationId, depotId, NUMBERS);
  // Monday to Wednesday entered; the Mondays and Tuesdays after take those days' runs.
  await enterDay('2026-12-14', 0);
  await enterDay('2026-12-15', 0);
  await enterDay('2026-12-16', 0);
  await signInAgain(app, sup, fin, yard);
});

describe('billing-period demand target', () => {
  it('the costs month carries the target, why it is that number, and what a kW either side is worth', async () => {
    const m = await month();
    const t = m.target;
    expect(t).not.toBeNull();
    expect(t.facilityKw).toBeGreaterThan(20);
    // Never below what the period has already set: demand up to there is billed anyway.
    expect(t.facilityKw).toBeGreaterThanOrEqual(m.peaks.facility.kw - 1e-6);
    expect(t.targets.map((x: { name: string }) => x.name)).toEqual(['facility', 'on-peak']);
    expect(t.nights[0]).toEqual({ date: '2026-12-14', basis: 'runs' });
    // Later Mondays and Tuesdays are forecast from the entered ones; weekends have no night.
    expect(t.nights).toContainEqual({ date: '2026-12-21', basis: 'typical-weekday' });
    expect(t.nights.some((n: { date: string }) => n.date === '2026-12-19')).toBe(false);
    expect(t.binding.sentence).toMatch(/^\w+day Dec \d+, \d\d:\d\d: 3 buses need [\d,]+ kWh between pull-in/);
    expect(t.marginal[0].sentence).toMatch(
      /^Each kW above the target saves \$[\d,.]+ of energy this period and costs \$12\.00/,
    );
    expect(t.impossible).toEqual([]);
  });

  it('a heavier night raises the target (computed again from the runs as they are)', async () => {
    const before = (await month()).target.facilityKw;
    await enterDay('2026-12-15', 40);
    const after = (await month()).target.facilityKw;
    expect(after).toBeGreaterThan(before + 1);
    // The same for the district overview's caller.
    const direct = await periodTargetOf(app.db, planningJobCaller(organisationId), depotId, now);
    expect(direct!.view.facilityKw).toBe(after);
    await enterDay('2026-12-15', 0);
  });

  it('the plan review carries the target the night was planned under, and the plan stays within it', async () => {
    const plan = await generatedPlan(app, sup, depotId, '2026-12-14');
    expect(plan.status).toBe('done');
    const target = plan.result.target;
    expect(target).toBeDefined();
    const facility = target.peaks.find((p: { name: string }) => p.name === 'facility');
    expect(facility.targetKw).toBeGreaterThan(20);
    if (target.trade === null) {
      expect(target.aboveKw).toBe(0);
      expect(facility.kw).toBeLessThanOrEqual(facility.targetKw + 0.05);
      // Demand up to the target is paid by the period anyway: the night adds none.
      expect(plan.result.cost.demand).toBeCloseTo(0, 6);
    } else {
      expect(target.trade.sentence).toMatch(/^Raising the target by/);
    }
    expect(target.binding).toMatch(/kWh between pull-in/);
  });

  it('a night the service limit cannot serve is explained, not silently exceeded', async () => {
    await app.db.update(depots).set({ serviceLimitKw: 22 }).where(eq(depots.id, depotId));
    try {
      const t = (await month()).target;
      expect(t.impossible.length).toBeGreaterThan(0);
      expect(t.impossible[0].cause).toBe('service limit');
      expect(t.impossible[0].sentence).toMatch(/more than the service limit \(22 kW at its lowest\)/);
      // The target is the limit: no plan may go above it.
      expect(t.facilityKw).toBeLessThanOrEqual(22 + 1e-6);
    } finally {
      await app.db.update(depots).set({ serviceLimitKw: 300 }).where(eq(depots.id, depotId));
    }
  });

  it('a period past has no target', async () => {
    const m = (
      await app
        .request()
        .get(`/api/depots/${depotId}/costs/month`)
        .query({ date: '2026-11-10' })
        .set(as(fin))
        .expect(200)
    ).body;
    expect(m.period.start).toBe('2026-11-01');
    expect(m.target).toBeNull();
  });

  it("a yard report's revision keeps the night under the target its plan was made under", async () => {
    const planId = await publishedPlan(app, sup, depotId, '2026-12-15');
    const published = (await app.request().get(`/api/plans/${planId}`).set(as(sup)).expect(200)).body.plan.result;
    expect(published.target).toBeDefined();
    now = new Date('2026-12-15T23:00:00-06:00');
    try {
      await signInAgain(app, yard, sup, fin);
      const res = await app
        .request()
        .post(`/api/depots/${depotId}/tonight/reports`)
        .set(as(yard))
        .send({ planId, kind: 'charger_out', charger: 'C', reason: 'Cable damaged' })
        .expect(201);
      const revision = (await app.request().get(`/api/plans/${res.body.revision.id}`).set(as(sup)).expect(200)).body
        .plan.result;
      const target = revision.target;
      expect(target.peaks.map((p: { targetKw: number }) => p.targetKw)).toEqual(
        published.target.peaks.map((p: { targetKw: number }) => p.targetKw),
      );
      expect(target.binding).toBe(published.target.binding);
      if (target.trade === null) for (const p of target.peaks) expect(p.kw).toBeLessThanOrEqual(p.targetKw + 0.05);
      else expect(target.trade.sentence).toMatch(/^Raising the target by [\d.,]+ kW costs \$[\d.,]+ this month/);
      // The Costs page compares the revision with its baseline in time (read by index from the
      // night's start, a re-plan's own baseline fell hours early).
      const cut = Date.parse(revision.replan.from);
      const planBefore = revision.sessions.reduce(
        (sum: number, x: { start: string; kw: number[] }) =>
          sum +
          x.kw.reduce((a: number, kw: number, k: number) => {
            const t = Date.parse(x.start) + k * 900_000;
            const slot = revision.slots.find((sl: { start: string }) => Date.parse(sl.start) === t);
            return a + (t < cut && slot ? kw * 0.25 * slot.price : 0);
          }, 0),
        0,
      );
      const m = (
        await app
          .request()
          .get(`/api/depots/${depotId}/costs/month`)
          .query({ date: '2026-12-15' })
          .set(as(fin))
          .expect(200)
      ).body;
      const row = m.nights.find((n: { planId: string }) => n.planId === res.body.revision.id);
      const kind = revision.baseline.kind as 'arrival' | 'timer';
      // The revision's baseline is the whole night's, slot by slot from the night's start (the
      // engine's, with the same events); the month reads the same figure. Here the timer's
      // cheapest window is where the plan charged before the cut-off: the two agree there.
      expect(revision.baselines[kind].chargingKw).toHaveLength(revision.slots.length);
      expect(revision.baselines[kind].energy).toBeCloseTo(planBefore + revision.replan.own.baselineEnergy[kind], 4);
      expect(row.baselineEnergyCost).toBeCloseTo(revision.baselines[kind].energy, 2);
      const limit = Math.max(...revision.slots.map((sl: { limitKw: number }) => sl.limitKw));
      expect(row.baselinePeakKw).toBeLessThanOrEqual(limit + 0.01);
    } finally {
      now = new Date('2026-12-14T13:00:00-06:00');
      await signInAgain(app, sup, fin, yard);
    }
  });

  it("the night under way's published peaks still to come are the target's floor: the projection bills them anyway", async () => {
    try {
      // The night of the 15th is published (and revised by the yard above, at 23:00).
      const [row] = await app.db
        .select()
        .from(plans)
        .where(and(eq(plans.depotId, depotId), eq(plans.serviceDate, '2026-12-15'), eq(plans.state, 'published')));
      const planId = row!.id;
      const result = row!.result!;
      const at = Date.parse('2026-12-16T02:00:00-06:00');
      const high = Math.max(...result.slots.map((x) => x.loadKw)) + 150;
      const slots = result.slots.map((x) => (Date.parse(x.start) === at ? { ...x, loadKw: high } : x));
      expect(slots.some((x) => x.loadKw === high)).toBe(true);
      // Published as a new version, as a revision is (a published plan never changes).
      const { id: _id, createdAt: _c, ...copy } = row!;
      await app.db.update(plans).set({ state: 'superseded' }).where(eq(plans.id, planId));
      await app.db.insert(plans).values({ ...copy, version: row!.version + 1, result: { ...result, slots } });
      now = new Date('2026-12-15T23:00:00-06:00');
      await signInAgain(app, sup, fin, yard);
      const m = await month('2026-12-15');
      // The projected bill has it; the target is not below it (it read the peak so far beside it).
      const facility = m.projected.demand.find((l: { name: string }) => l.name === 'Facility demand');
      expect(facility.quantity).toBeGreaterThanOrEqual(high - 0.01);
      expect(m.target.facilityKw).toBeGreaterThanOrEqual(high - 0.01);
      expect(m.peaks.facility.kw).toBeLessThan(high - 1);
    } finally {
      now = new Date('2026-12-14T13:00:00-06:00');
      await signInAgain(app, sup, fin, yard);
    }
  });
});
