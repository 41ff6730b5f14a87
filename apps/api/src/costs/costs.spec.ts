import { readFileSync } from 'node:fs';
import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { billingPeaks, meterIntervals } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, signInAgain, TEST_START, type TestUser } from '../testing/test-app';

// Plans are published before their night; the meter files are imported the afternoon after it.
let now = TEST_START;
const app = createTestApp({ clock: () => now });
const fixture = (name: string) => readFileSync(new URL(`./fixtures/${name}`, import.meta.url), 'utf8');
let fin: TestUser;
let sup: TestUser;
let yard: TestUser;
let depotId: string;
let planId: string;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const NUMBERS = ['21', '22', '23'];
const putServiceDay = (date: string) =>
  app
    .request()
    .put(`/api/depots/${depotId}/service-days/${date}`)
    .set(as(sup))
    .send({ forecastLowF: 30, runs: dayRuns(date, NUMBERS, () => 35) })
    .expect(200);

beforeAll(async () => {
  const org = await createOrganisation(app, { fin: ['finance'], sup: ['supervisor'], yard: ['yard'] });
  ({ fin, sup, yard } = org.users as Record<string, TestUser>);
  depotId = (await createDepot(app.db, org.organisationId)).depot.id;
  await addBuses(app.db, org.organisationId, depotId, NUMBERS);
  for (const date of ['2026-12-02', '2026-12-03']) await putServiceDay(date);
  planId = await publishedPlan(app, sup, depotId, '2026-12-02');
  now = new Date('2026-12-03T15:00:00-06:00');
  await signInAgain(app, fin, sup, yard);
});

describe('costs', () => {
  it('per plan: cost, savings, per bus and per mile that add up', async () => {
    const res = await app.request().get(`/api/plans/${planId}/costs`).set(as(fin)).expect(200);
    const c = res.body;
    expect(c.total).toBeCloseTo(c.energy + c.demand, 2);
    // A night saves on energy only: demand is billed once a period (the month's saving).
    expect(c.savings).toBeCloseTo(c.baseline.total - c.baseline.demand - c.energy, 6);
    expect(c.savings).toBeLessThanOrEqual(c.baseline.total - c.baseline.demand);
    expect(c.perBus.map((b: { bus: string }) => b.bus)).toEqual(NUMBERS);
    // One set of numbers: the buses' costs add up to the night's total, and per mile divides it.
    expect(c.perBus.reduce((a: number, b: { cost: number }) => a + b.cost, 0)).toBeCloseTo(c.total, 9);
    expect(['arrival', 'timer']).toContain(c.baseline.kind);
    expect(c.otherBaseline.kind).not.toBe(c.baseline.kind);
    // The reference is the cheaper of the two when both deliver the plan's energy.
    if (c.baseline.shortfallKwh === 0 && c.otherBaseline.shortfallKwh === 0)
      expect(c.baseline.total).toBeLessThanOrEqual(c.otherBaseline.total);
    // Next day's miles from the runs: (30 + 28) + (31 + 29) + (32 + 30).
    expect(c.miles).toBe(180);
    expect(c.costPerMile).toBeCloseTo(c.total / 180, 2);
  });

  it('imports Green Button XML: readings stored, gap and duplicate reported, peaks so far raised', async () => {
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(fin))
      .send({ fileName: 'night.xml', content: fixture('green-button-night.xml'), billingPeriodStart: '2026-12-01' })
      .expect(201);
    expect(res.body).toMatchObject({
      format: 'green-button-xml',
      intervals: 23,
      minutes: 15,
      duplicates: 1,
      gaps: [{ from: '2026-12-02T02:15', to: '2026-12-02T02:30' }],
    });
    // Highest reading: value 180 x 10^2 Wh = 18 kWh in 15 minutes = 72 kW.
    expect(res.body.peaks.facilityKw).toBe(72);
    const [peaks] = await app.db.select().from(billingPeaks).where(eq(billingPeaks.depotId, depotId));
    expect(peaks!.facilityKw).toBe(72);
  });

  it('the month: projected bill, month to date, nights with actual against projected, emissions with their source', async () => {
    await app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(fin))
      .send({ fileName: 'evening.csv', content: fixture('green-button-evening.csv'), billingPeriodStart: '2026-12-01' })
      .expect(201);
    const res = await app
      .request()
      .get(`/api/depots/${depotId}/costs/month`)
      .query({ date: '2026-12-10' })
      .set(as(sup))
      .expect(200);
    const m = res.body;
    expect(m.period).toEqual({ start: '2026-12-01', end: '2027-01-01', days: 31 });
    expect(m.sources.actualIntervals).toBe(23 + 8);
    expect(m.projected.total).toBeCloseTo(
      m.projected.energyTotal + m.projected.demandTotal + m.projected.fixedTotal,
      2,
    );
    const night = m.nights.find((n: { date: string }) => n.date === '2026-12-02');
    expect(night.planId).toBe(planId);
    expect(night.actualCoverage).toBeGreaterThan(0);
    expect(night.actualSiteEnergyCost).not.toBeNull();
    // A partly metered night is set against the projection over its metered intervals only.
    expect(night.actualCoverage).toBeLessThan(1);
    expect(night.projectedMeteredSiteEnergyCost).toBeGreaterThan(0);
    expect(night.projectedMeteredSiteEnergyCost).toBeLessThan(night.projectedSiteEnergyCost);
    // Demand is billed once a period: the saving is one bill minus the other, never above the baseline's bill.
    expect(m.savings.nightsCompared).toBe(1);
    expect(m.savings.total).toBeCloseTo(m.savings.baselineBill - m.savings.planBill, 9);
    expect(m.savings.total).toBeLessThanOrEqual(m.savings.baselineBill);
    expect(['arrival', 'timer']).toContain(night.baselineKind);
    // Only runs driven by now (Thursday 15:00): Wednesday's 180 miles and Thursday morning's 93,
    // not Thursday afternoon's, still to come.
    expect(m.emissions.miles).toBe(180 + 93);
    expect(m.emissions.source).toMatch(/10,180 g per gallon/);
    expect(m.emissions.co2KgAvoided).toBeCloseTo(m.emissions.dieselGallonsAvoided * 10.18, 1);
  });

  it('bad files and months without a rate plan import nothing', async () => {
    const before = (await app.db.select().from(meterIntervals).where(eq(meterIntervals.depotId, depotId))).length;
    const mixed = fixture('green-button-evening.csv').replace('22:15,22:29', '22:15,22:59');
    const a = await app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(fin))
      .send({ fileName: 'x.csv', content: mixed, billingPeriodStart: '2026-12-01' })
      .expect(400);
    expect(a.body.error.message).toMatch(/mixes interval lengths/);
    const b = await app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(fin))
      .send({ fileName: 'x.csv', content: fixture('green-button-evening.csv'), billingPeriodStart: '2025-12-01' })
      .expect(400);
    expect(b.body.error.message).toMatch(/No rate plan applies to Test depot on 2025-12-01/);
    const c = await app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(fin))
      .send({ fileName: 'x.csv', content: fixture('green-button-evening.csv'), billingPeriodStart: '2026-12-05' })
      .expect(400);
    expect(c.body.error.fields.billingPeriodStart).toMatch(/2026-12-01/);
    expect((await app.db.select().from(meterIntervals).where(eq(meterIntervals.depotId, depotId))).length).toBe(before);
  });

  it('roles and isolation', async () => {
    await app
      .request()
      .get(`/api/depots/${depotId}/costs/month`)
      .query({ date: '2026-12-10' })
      .set(as(yard))
      .expect(403);
    await app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(sup))
      .send({ fileName: 'x', content: 'x', billingPeriodStart: '2026-12-01' })
      .expect(403);
    const outsider = (await createOrganisation(app, { f: ['finance'] })).users.f!;
    await app
      .request()
      .get(`/api/depots/${depotId}/costs/month`)
      .query({ date: '2026-12-10' })
      .set(as(outsider))
      .expect(404);
    await app.request().get(`/api/plans/${planId}/costs`).set(as(outsider)).expect(404);
  });

  it("a night across the billing period's edge: each period has its part, plan and baseline alike, and the parts add up to the night", async () => {
    for (const date of ['2026-12-31', '2027-01-01']) await putServiceDay(date);
    // Last in this file: the clock moves on to January and stays there.
    now = new Date('2026-12-31T12:00:00-06:00');
    await signInAgain(app, sup);
    const id = await publishedPlan(app, sup, depotId, '2026-12-31');
    now = new Date('2027-01-02T12:00:00-06:00');
    await signInAgain(app, fin, sup);
    const night = await app.request().get(`/api/plans/${id}/costs`).set(as(fin)).expect(200);
    const rowOf = async (date: string) =>
      (
        await app.request().get(`/api/depots/${depotId}/costs/month`).query({ date }).set(as(fin)).expect(200)
      ).body.nights.find((n: { planId: string }) => n.planId === id);
    const dec = await rowOf('2026-12-10');
    const jan = await rowOf('2027-01-10');
    expect([dec.periodPart, jan.periodPart]).toEqual(['end', 'start']);
    expect(dec.planEnergyCost + jan.planEnergyCost).toBeCloseTo(night.body.energy, 6);
    const baselineEnergy = night.body.baseline.total - night.body.baseline.demand;
    expect(dec.baselineEnergyCost + jan.baselineEnergyCost).toBeCloseTo(baselineEnergy, 4);
    // A night wholly inside its period is not marked.
    const whole = (
      await app
        .request()
        .get(`/api/depots/${depotId}/costs/month`)
        .query({ date: '2026-12-10' })
        .set(as(fin))
        .expect(200)
    ).body.nights.find((n: { planId: string }) => n.planId === planId);
    expect(whole.periodPart).toBeNull();
  });
});
