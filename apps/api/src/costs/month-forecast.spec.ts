import { beforeAll, describe, expect, it } from 'vitest';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

// The month forecast: nights without a published plan are forecast from the service calendar so
// the projected bill means something before the month is over. The clock stands at Tuesday
// 2026-12-01 15:00 (TEST_START); runs are entered for the week of Monday 7 December, and the plans
// of Monday's and Tuesday's nights are published.
const app = createTestApp();
let sup: TestUser;
let fin: TestUser;
let depotId: string;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const NUMBERS = ['41', '42', '43'];
const WEEK = ['2026-12-07', '2026-12-08', '2026-12-09', '2026-12-10', '2026-12-11'];
// dayRuns: bus i drives 30 + i and 28 + i miles; every test bus uses 1.2 kWh a mile.
const DAY_KWH = NUMBERS.reduce((a, _, i) => a + (30 + i + 28 + i) * 1.2, 0);

beforeAll(async () => {
  const org = await createOrganisation(app, { sup: ['supervisor'], fin: ['finance'] });
  ({ sup, fin } = org.users as Record<string, TestUser>);
  depotId = (await createDepot(app.db, org.organisationId)).depot.id;
  await addBuses(app.db, org.organisationId, depotId, NUMBERS);
  for (const date of WEEK) {
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(sup))
      .send({ forecastLowF: 40, runs: dayRuns(date, NUMBERS) })
      .expect(200);
  }
  for (const date of ['2026-12-07', '2026-12-08']) await publishedPlan(app, sup, depotId, date);
});

/** The month's costs as finance reads them on Tuesday 1 December. */
const monthCosts = async () =>
  (await app.request().get(`/api/depots/${depotId}/costs/month`).query({ date: '2026-12-01' }).set(as(fin)).expect(200))
    .body;

describe('the month forecast', () => {
  it('forecasts the nights without a published plan, from their runs or the same weekday, and gives the bill a range', async () => {
    const m = await monthCosts();
    const byDate = new Map<string, { needKwh: number; basis: string }>(
      m.forecast.map((n: { date: string }) => [n.date, n]),
    );
    // Published nights are the plans' own, never forecast.
    expect(byDate.has('2026-12-07')).toBe(false);
    expect(byDate.has('2026-12-08')).toBe(false);
    // Wednesday's night puts back Thursday's runs, both entered.
    expect(byDate.get('2026-12-09')).toEqual({
      date: '2026-12-09',
      needKwh: expect.closeTo(DAY_KWH, 6),
      basis: 'runs',
    });
    // Friday's night runs to Monday 14th, not entered: the Monday before stands in for it.
    expect(byDate.get('2026-12-11')).toMatchObject({ needKwh: expect.closeTo(DAY_KWH, 6), basis: 'typical-weekday' });
    // The following weeks' weekdays take the entered week's; weekends have no night of their own.
    expect(byDate.get('2026-12-16')).toMatchObject({ basis: 'typical-weekday' });
    expect(byDate.has('2026-12-12')).toBe(false);
    expect(byDate.has('2026-12-13')).toBe(false);
    // Days before the entered week have no runs: no service, no forecast.
    expect(byDate.has('2026-12-02')).toBe(false);
    expect(m.sources.forecastNights).toBe(m.forecast.length);
    // The projected bill takes the even spread, one end of its range.
    expect(m.projectedRange.low).toBeLessThanOrEqual(m.projectedRange.high);
    expect([m.projectedRange.low, m.projectedRange.high]).toContain(m.projected.total);
  });

  it("counts the forecast nights' charging in the projected bill: more kWh than the plans and the building alone", async () => {
    const m = await monthCosts();
    const forecastKwh = m.forecast.reduce((a: number, n: { needKwh: number }) => a + n.needKwh, 0);
    // Whatever the building draws, the bill's kWh hold at least the forecast nights' grid energy.
    expect(m.projected.kwh).toBeGreaterThan(forecastKwh);
  });
});

describe('the month forecast under the demand target', () => {
  it('forecasts the nights nobody planned yet under the target, their energy whole (the shapes: month-forecast-shapes.spec.ts)', async () => {
    const m = await monthCosts();
    expect(m.target.targets.map((t: { name: string }) => t.name)).toEqual(['facility', 'on-peak']);
    // Here the forecast puts back each next day's whole runs, more than the target's nights (the
    // batteries as planned) need: the excess goes above the target by the same kW in each demand
    // period, the least it can, and no kWh is lost.
    const facility = m.projected.demand.find((d: { name: string }) => d.name === 'Facility demand').quantity;
    const onPeak = m.projected.demand.find((d: { name: string }) => d.name === 'Demand, on-peak').quantity;
    const [facilityTarget, onPeakTarget] = m.target.targets.map((t: { kw: number }) => t.kw);
    expect(onPeak - onPeakTarget).toBeCloseTo(facility - facilityTarget, 6);
    const forecastKwh = m.forecast.reduce((a: number, n: { needKwh: number }) => a + n.needKwh, 0);
    expect(m.projected.kwh).toBeGreaterThan(forecastKwh);
    expect([m.projectedRange.low, m.projectedRange.high]).toContain(m.projected.total);
  });
});
