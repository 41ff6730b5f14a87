import { beforeAll, describe, expect, it } from 'vitest';
import { billingPeaks, meterImports, meterIntervals } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { withNovemberRatchet } from '../testing/meter-fixture';
import { createOrganisation, createTestApp, signInAgain, TEST_START, type TestUser } from '../testing/test-app';
import { newMonthCostsCache, monthCosts } from './costs-service';

// The peaks the bill uses are the peaks the page shows: the building's own load counts, peaks
// entered in Depot raise what is billed, and a demand ratchet reads the earlier months' peaks.
let now = TEST_START;
const app = createTestApp({ clock: () => now });
let fin: TestUser;
let sup: TestUser;
let organisationId: string;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
type Line = { name: string; quantity: number; amount: number; note?: string };
const line = (lines: Line[], name: string) => lines.find((l) => l.name === name)!;

/** A depot of its own on an 80 % / 11-month demand ratchet, with November's meter readings. */
async function ratchetDepot(name: string, november: { startsAt: Date; minutes: number; kwh: number }[]) {
  const fixture = await createDepot(app.db, organisationId, name);
  await withNovemberRatchet(app.db, organisationId, fixture, november);
  return fixture.depot;
}

/** The costs month holding `date` at a depot, as finance reads it. */
async function monthOf(depotId: string, date: string) {
  return (await app.request().get(`/api/depots/${depotId}/costs/month`).query({ date }).set(as(fin)).expect(200)).body;
}

/** The site and tariff of the night of Wednesday 9 December at a depot, as a plan is made from: its peaks so far and notes. */
async function nightBase(depotId: string): Promise<{ peaksSoFarKw: Record<string, number>; notes: string[] }> {
  const body = (
    await app
      .request()
      .get(`/api/depots/${depotId}/scenario-base`)
      .query({ start: '2026-12-09T15:00', end: '2026-12-10T07:00' })
      .set(as(sup))
      .expect(200)
  ).body as { scenario: { tariff: { peaksSoFarKw: Record<string, number> } }; notes: string[] };
  return { peaksSoFarKw: body.scenario.tariff.peaksSoFarKw, notes: body.notes };
}

beforeAll(async () => {
  const org = await createOrganisation(app, { fin: ['finance'], sup: ['supervisor'] });
  fin = org.users.fin!;
  sup = org.users.sup!;
  organisationId = org.organisationId;
  now = new Date('2026-12-09T00:02:00-06:00');
  await signInAgain(app, fin, sup);
});

describe('peaks so far and the bill', () => {
  it('November without plans: the building\'s 20 kW is the peak shown and the peak billed (not "0 kW" beside $240 of demand)', async () => {
    const { depot } = await createDepot(app.db, organisationId, 'Peaks depot A');
    const m = await monthOf(depot.id, '2026-11-10');
    const facility = line(m.monthToDate.demand, 'Facility demand');
    expect(facility.quantity).toBeCloseTo(20, 9);
    expect(facility.amount).toBeCloseTo(20 * 12, 9);
    expect(m.peaks.facility).toMatchObject({ kw: 20, source: 'building' });
  });

  it('peaks entered in Depot for this period are billed: on-peak 48 kW entered, 48 kW billed and shown', async () => {
    const { depot } = await createDepot(app.db, organisationId, 'Peaks depot B');
    await app.db.insert(billingPeaks).values({
      organisationId,
      depotId: depot.id,
      billingPeriodStart: '2026-12-01',
      facilityKw: 60,
      periodsKw: { 'on-peak': 48 },
    });
    const m = await monthOf(depot.id, '2026-12-10');
    for (const bill of [m.projected, m.monthToDate]) {
      expect(line(bill.demand, 'Demand, on-peak').quantity).toBe(48);
      expect(line(bill.demand, 'Demand, on-peak').note).toMatch(/entered in Depot/);
      expect(line(bill.demand, 'Facility demand').quantity).toBe(60);
    }
    expect(m.peaks.facility).toMatchObject({ kw: 60, source: 'entered' });
    expect(m.peaks.periods).toEqual([{ name: 'on-peak', kw: 48, at: null }]);
    // A period other than the one entered for is not raised.
    const nov = await monthOf(depot.id, '2026-11-10');
    expect(line(nov.projected.demand, 'Facility demand').quantity).toBeCloseTo(20, 9);
  });

  it("a demand ratchet bills 80 % of November's metered 400 kW in December, and says where the figure comes from", async () => {
    const depot = await ratchetDepot('Peaks depot C', [
      { startsAt: new Date('2026-11-10T14:00:00-06:00'), minutes: 15, kwh: 100 },
    ]);
    const m = await monthOf(depot.id, '2026-12-10');
    const facility = line(m.projected.demand, 'Facility demand');
    expect(facility.quantity).toBeCloseTo(320, 9);
    expect(facility.amount).toBeCloseTo(320 * 12, 9);
    expect(facility.note).toMatch(/80 % of 400 kW.*previous 11 months.*meter readings/);
    // The cache answers the same as a fresh computation.
    const caller = {
      id: fin.id,
      organisationId,
      email: fin.email,
      name: 'Finance',
      roles: fin.roles,
      depotIds: [depot.id],
    };
    const fresh = await monthCosts(app.db, caller, depot.id, '2026-12-10', now, undefined, newMonthCostsCache());
    expect(fresh.projected.total).toBeCloseTo(m.projected.total, 9);
  });
  it("a night's plan counts the facility demand only above the ratchet's floor, as the bill does", async () => {
    const depot = await ratchetDepot('Peaks depot F', [
      { startsAt: new Date('2026-11-10T14:00:00-06:00'), minutes: 15, kwh: 100 },
    ]);
    const base = await nightBase(depot.id);
    // 80 % of November's 400 kW: December's bill charges at least 320 kW (the test above), so a
    // night's peak up to 320 kW adds no facility demand charge.
    expect(base.peaksSoFarKw.facility).toBe(320);
    expect(base.notes).toContainEqual(expect.stringMatching(/at least at 320 kW.*80 % of 400 kW from meter readings/));
    // Without a ratchet, no floor: nothing was entered or metered for December.
    const plain = await createDepot(app.db, organisationId, 'Peaks depot G');
    const plainBase = await nightBase(plain.depot.id);
    expect(plainBase.peaksSoFarKw).toEqual({});
  });
  it("a night's plan counts the period's metered peak before it as a peak so far, as the month's bill does", async () => {
    const { depot } = await createDepot(app.db, organisationId, 'Peaks depot H');
    const [imp] = await app.db
      .insert(meterImports)
      .values({
        organisationId,
        depotId: depot.id,
        fileName: 'dec.csv',
        format: 'csv',
        billingPeriodStart: '2026-12-01',
        intervals: 1,
        duplicates: 0,
        gaps: [],
      })
      .returning();
    // 30 kWh in the quarter hour from 14:00 on 8 December: 120 kW of demand this period.
    await app.db.insert(meterIntervals).values({
      organisationId,
      depotId: depot.id,
      importId: imp!.id,
      startsAt: new Date('2026-12-08T14:00:00-06:00'),
      minutes: 15,
      kwh: 30,
    });
    const base = await nightBase(depot.id);
    expect(base.peaksSoFarKw.facility).toBeCloseTo(120, 9);
    expect(base.notes).toContainEqual(expect.stringMatching(/from the meter readings .*facility 120 kW/));
    // The bill of the month charges that 120 kW whatever the night does below it.
    const m = await monthOf(depot.id, '2026-12-10');
    expect(line(m.projected.demand, 'Facility demand').quantity).toBeGreaterThanOrEqual(120 - 1e-9);
  });
  it('5-minute meter readings are billed as 15-minute demand: added up into their quarter hour', async () => {
    // Demand is billed on the highest quarter hour (the brief). 3 + 5 + 4 kWh from 22:00 to 22:15
    // is 12 kWh, 48 kW; the 5 kWh reading alone would read 60 kW, and the first alone 36 kW.
    const { depot } = await createDepot(app.db, organisationId, 'Peaks depot D');
    const rows = [
      ['22:00', '22:04', '3.00'],
      ['22:05', '22:09', '5.00'],
      ['22:10', '22:14', '4.00'],
      ['22:15', '22:19', '1.00'],
    ];
    const content = [
      'TYPE,DATE,START TIME,END TIME,USAGE,UNITS,COST,NOTES',
      ...rows.map(([from, to, kwh]) => `Electric usage,2026-12-08,${from},${to},${kwh},kWh,$0.10,`),
    ].join('\n');
    const imported = await app
      .request()
      .post(`/api/depots/${depot.id}/meter-data`)
      .set(as(fin))
      .send({ fileName: 'five.csv', content, billingPeriodStart: '2026-12-01' })
      .expect(201);
    expect(imported.body).toMatchObject({ minutes: 5, intervals: 4 });
    expect(imported.body.peaks.facilityKw).toBeCloseTo(48, 9);
    const m = await monthOf(depot.id, '2026-12-10');
    // The incomplete quarter from 22:15 (one reading of three) is not read as a 4 kW quarter.
    expect(m.peaks.facility.kw).toBeCloseTo(48, 9);
    expect(line(m.monthToDate.demand, 'Facility demand').quantity).toBeCloseTo(48, 9);
  });

  it('a demand ratchet reads 5-minute readings of earlier months as 15-minute demand too', async () => {
    // 20 + 40 + 40 kWh in the quarter hour from 14:00: 400 kW of 15-minute demand (a 40 kWh
    // 5-minute reading alone would be 480 kW).
    const depot = await ratchetDepot(
      'Peaks depot E',
      [20, 40, 40].map((kwh, k) => ({
        startsAt: new Date(Date.parse('2026-11-10T14:00:00-06:00') + k * 5 * 60_000),
        minutes: 5,
        kwh,
      })),
    );
    const m = await monthOf(depot.id, '2026-12-10');
    expect(line(m.projected.demand, 'Facility demand').quantity).toBeCloseTo(320, 9);
  });
});
