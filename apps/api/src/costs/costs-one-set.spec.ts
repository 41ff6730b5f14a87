import { beforeAll, describe, expect, it } from 'vitest';
import { billingPeaks } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { withNovemberRatchet } from '../testing/meter-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, signInAgain, TEST_START, type TestUser } from '../testing/test-app';

// One set of figures on the Costs page: the peaks so far, the bill to date, the projected bill,
// the savings and the demand target agree, and each says what it is. The depots have runs for the
// week of Monday 7 December and no published plan before Thursday 10 December's night, so the
// nights of the 7th to the 9th are forecast; the clock stands at Thursday 10 December 12:00, after
// them. (The demo's Orchard Lane showed a forecast night gone by as "Facility peak so far 209.4 kW"
// beside the 185 kW entered in Depot, and Kestrel Hollow a ratchet's 188.8 kW as "the peak so far".)
let now = TEST_START;
const app = createTestApp({ clock: () => now });
let fin: TestUser;
let sup: TestUser;
let organisationId: string;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const NUMBERS = ['51', '52', '53'];
const WEEK = ['2026-12-07', '2026-12-08', '2026-12-09', '2026-12-10', '2026-12-11'];
const NOW = new Date('2026-12-10T12:00:00-06:00');
type Line = { name: string; quantity: number; amount: number; peakAt: number | null; note?: string };
const line = (lines: Line[], name: string) => lines.find((l) => l.name === name)!;

/** A depot with the week's runs entered and Thursday's night published. */
async function depotWithWeek(name: string) {
  const { depot, ratePlan } = await createDepot(app.db, organisationId, name);
  await addBuses(app.db, organisationId, depot.id, NUMBERS);
  now = TEST_START;
  await signInAgain(app, fin, sup);
  for (const date of WEEK) {
    await app
      .request()
      .put(`/api/depots/${depot.id}/service-days/${date}`)
      .set(as(sup))
      .send({ forecastLowF: 40, runs: dayRuns(date, NUMBERS) })
      .expect(200);
  }
  now = NOW;
  await signInAgain(app, fin, sup);
  await publishedPlan(app, sup, depot.id, '2026-12-10');
  return { depot, ratePlan };
}

async function monthOf(depotId: string) {
  return (
    await app.request().get(`/api/depots/${depotId}/costs/month`).query({ date: '2026-12-10' }).set(as(fin)).expect(200)
  ).body;
}

beforeAll(async () => {
  const org = await createOrganisation(app, { fin: ['finance'], sup: ['supervisor'] });
  fin = org.users.fin!;
  sup = org.users.sup!;
  organisationId = org.organisationId;
});

describe('one set of figures', () => {
  it('a forecast night gone by sets no peak so far: the peaks entered in Depot stand on the card, the bill to date, the projected bill and the target', async () => {
    const { depot } = await depotWithWeek('One set A');
    await app.db.insert(billingPeaks).values({
      organisationId,
      depotId: depot.id,
      billingPeriodStart: '2026-12-01',
      facilityKw: 25,
      periodsKw: { 'on-peak': 22 },
    });
    const m = await monthOf(depot.id);
    const gone = new Set(['2026-12-07', '2026-12-08', '2026-12-09']);
    expect(m.forecast.filter((n: { date: string }) => gone.has(n.date))).toHaveLength(3);

    // Peaks so far: what was recorded, not the forecast's guess at when unplanned buses charged.
    expect(m.peaks.facility).toEqual({ kw: 25, at: null, source: 'entered' });
    expect(m.peaks.periods).toEqual([{ name: 'on-peak', kw: 22, at: null }]);
    // The bill to date bills the same peaks, and the forecast nights' energy.
    expect(line(m.monthToDate.demand, 'Facility demand')).toMatchObject({ quantity: 25, peakAt: null });
    expect(line(m.monthToDate.demand, 'Demand, on-peak')).toMatchObject({ quantity: 22, peakAt: null });
    expect(m.monthToDate.kwh).toBeGreaterThan(
      m.forecast.find((n: { date: string }) => n.date === '2026-12-07').needKwh,
    );

    // The projected bill's peaks are the peaks so far or later ones, never one set in a forecast gone by.
    for (const name of ['Facility demand', 'Demand, on-peak']) {
      const projected = line(m.projected.demand, name);
      expect(projected.quantity).toBeGreaterThanOrEqual(line(m.monthToDate.demand, name).quantity);
      if (projected.peakAt !== null) expect(projected.peakAt).toBeGreaterThanOrEqual(NOW.getTime());
    }
    expect(m.projected.total).toBeGreaterThanOrEqual(m.monthToDate.total);

    // The target's floor is the card's peaks so far.
    const facilityTarget = m.target.targets.find((t: { name: string }) => t.name === 'facility');
    expect(facilityTarget.peakSoFarKw).toBeCloseTo(25, 9);
    expect(m.target.ratchet).toBeNull();
  });

  it("the savings compare the projected bill itself with the same bill on the baselines' charging: same engine, same peaks so far", async () => {
    const { depot } = await depotWithWeek('One set B');
    const m = await monthOf(depot.id);
    expect(m.savings.nightsCompared).toBe(1);
    // The bill with the plans is the projected bill shown beside it, to the unrounded cent.
    expect(m.savings.planBill).toBe(m.projected.total);
    expect(m.savings.planPeakKw).toBe(line(m.projected.demand, 'Facility demand').quantity);
    expect(m.savings.total).toBeCloseTo(m.savings.baselineBill - m.savings.planBill, 9);
    // It is never below the month to date (the old "period's bill with the plans" left out the forecast nights).
    expect(m.savings.planBill).toBeGreaterThanOrEqual(m.monthToDate.total);
    // The baseline charges Thursday's night as it would: its facility demand is at least the night's own peak.
    const thursday = m.nights.find((n: { date: string }) => n.date === '2026-12-10');
    expect(m.savings.baselinePeakKw).toBeGreaterThanOrEqual(thursday.baselinePeakKw - 0.01);
  });

  it("a target held up by the demand ratchet says so: the ratchet's 80 % of November's 400 kW, not a peak so far of 320 kW", async () => {
    const { depot, ratePlan } = await depotWithWeek('One set C');
    await withNovemberRatchet(app.db, organisationId, { depot, ratePlan }, [
      { startsAt: new Date('2026-11-10T17:00:00-06:00'), minutes: 15, kwh: 100 },
    ]);
    const m = await monthOf(depot.id);
    expect(m.peaks.facility.kw).toBeLessThan(320);
    expect(line(m.monthToDate.demand, 'Facility demand').quantity).toBeCloseTo(320, 9);
    const facilityTarget = m.target.targets.find((t: { name: string }) => t.name === 'facility');
    expect(facilityTarget.peakSoFarKw).toBeCloseTo(320, 9);
    expect(m.target.ratchet).toEqual({ kw: 320, percent: 80, baseKw: 400, source: expect.stringMatching(/meter/) });
  });
});
