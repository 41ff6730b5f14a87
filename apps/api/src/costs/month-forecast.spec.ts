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
  // A depot of its own, at its steady state: each bus pulls in near its reserve (a reading of 16 %,
  // having left with what its runs needed), so the target's nights and the runs put back the same
  // energy. Bus 54 drives one long morning run and is home from 08:40, through the cheap midday.
  // Entered: Friday 4 December and the week after it.
  let depot: string;
  let owner: TestUser;
  beforeAll(async () => {
    const org = await createOrganisation(app, { sup: ['supervisor'] });
    owner = (org.users as Record<string, TestUser>).sup!;
    depot = (await createDepot(app.db, org.organisationId)).depot.id;
    await addBuses(app.db, org.organisationId, depot, ['51', '52', '53', '54']);
    for (const date of ['2026-12-04', ...WEEK]) {
      const long = {
        busNumber: '54',
        pullOut: `${date}T05:40`,
        pullIn: `${date}T08:40`,
        miles: 120,
        arrivalSocPct: 16,
      };
      await app
        .request()
        .put(`/api/depots/${depot}/service-days/${date}`)
        .set(as(owner))
        .send({ forecastLowF: 40, runs: [...dayRuns(date, ['51', '52', '53'], () => 16), long] })
        .expect(200);
    }
  });

  it("forecasts the nights nobody planned yet where the target's LP charged them: no demand above the target (the shapes: month-forecast-shapes.spec.ts)", async () => {
    const m = (
      await app
        .request()
        .get(`/api/depots/${depot}/costs/month`)
        .query({ date: '2026-12-01' })
        .set(as(owner))
        .expect(200)
    ).body;
    expect(m.target.targets.map((t: { name: string }) => t.name)).toEqual(['facility', 'on-peak']);
    const billed = (name: string) => m.projected.demand.find((d: { name: string }) => d.name === name).quantity;
    const [facilityTarget, onPeakTarget] = m.target.targets.map((t: { kw: number }) => t.kw);
    // Each night to come draws the next day's runs where the target's own LP charged it: bus 54
    // from 08:40, in the cheap midday, the others after the on-peak hours; so no forecast interval
    // sets a peak above the target. Drawn between the last bus home and the first out (before),
    // the same energy went 12.3 kW above both targets here (facility 59.5 kW, on-peak 32.3 kW).
    // The Fridays' nights run to Monday. Friday 11 is entered but its Monday is not: like the
    // Fridays after it, it takes Friday 4's night (the latest one its runs can build), moved to it.
    const nights = new Map(m.target.nights.map((n: { date: string; basis: string }) => [n.date, n.basis]));
    expect(nights.get('2026-12-04')).toBe('runs');
    for (const friday of ['2026-12-11', '2026-12-18', '2026-12-25']) expect(nights.get(friday)).toBe('typical-weekday');
    expect(billed('Facility demand')).toBeCloseTo(facilityTarget, 6);
    expect(billed('Demand, on-peak')).toBeCloseTo(onPeakTarget, 6);
    // The energy is the runs', whole: every forecast night's kWh are in the bill.
    const forecastKwh = m.forecast.reduce((a: number, n: { needKwh: number }) => a + n.needKwh, 0);
    expect(m.projected.kwh).toBeGreaterThan(forecastKwh / 0.92);
    expect(m.projectedRange.low).toBeLessThanOrEqual(m.projectedRange.high);
    expect(m.projected.total).toBeCloseTo(m.projectedRange.high, 9);
  });
});
