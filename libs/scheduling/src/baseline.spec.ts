import { describe, expect, it } from 'vitest';
import { limitedBaseline } from './baseline.js';
import { planScenario } from './plan.js';
import { prepareProblem } from './problem.js';
import { parseScenario, type ScenarioInput } from './scenario.js';
import { generateDepot } from './testing/generate-depot.js';

// The two baselines of scheduling.md ("Baselines: what the depot would do without Nightyard"),
// worked by hand on nights small enough to follow: 15-minute slots, efficiency 1, so a bus at
// P kW gains P/4 kWh a slot.

function night(
  over: {
    site?: Record<string, unknown>;
    chargers?: unknown[];
    cabinets?: unknown[];
    tariff?: Record<string, unknown>;
    depart?: string;
  } = {},
) {
  const input = {
    version: 1,
    timezone: 'America/Chicago',
    start: '2026-01-13T12:00',
    end: '2026-01-14T09:00',
    slotMinutes: 15,
    efficiency: 1,
    site: { limitKw: 1000, otherLoadKw: 0, ...over.site },
    cabinets: over.cabinets ?? [],
    chargers: over.chargers ?? [
      { id: 'C1', maxKw: 100 },
      { id: 'C2', maxKw: 100 },
    ],
    tariff: {
      currency: 'USD',
      offPeakPrice: 0.1,
      periods: [],
      facilityDemandCharge: 10,
      peaksSoFarKw: {},
      ...over.tariff,
    },
    buses: ['B1', 'B2'].map((id) => ({
      id,
      usableKwh: 300,
      maxKw: 100,
      arrivalKwh: 50,
      stays: [{ arrive: '2026-01-13T22:00', depart: over.depart ?? '2026-01-14T06:00', departMinKwh: 250 }],
    })),
  } as ScenarioInput;
  const parsed = parseScenario(input);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return prepareProblem(parsed.scenario);
}
/** Both buses to leave with 250 kWh: 200 kWh each to deliver. */
const TARGETS = [[250], [250]];
const slotOf = (problem: ReturnType<typeof night>, local: string) =>
  problem.slots.findIndex((s) => s.start.startsWith(`2026-01-${local}`));

describe('charge on arrival', () => {
  it('shares the service limit in proportion: 150 kW for two buses is 75 kW each until each has 200 kWh', () => {
    const p = night({ site: { limitKw: 150 } });
    const b = limitedBaseline(p, TARGETS, 'arrival');
    const from = slotOf(p, '13T22:00');
    // 200 kWh at 75 kW: ten slots of 18.75 kWh (187.5), then 12.5 kWh (50 kW) in the eleventh.
    for (let t = from; t < from + 10; t++) expect(b.chargingKw[t]).toBeCloseTo(150, 9);
    expect(b.chargingKw[from + 10]).toBeCloseTo(100, 9);
    expect(b.chargingKw[from + 11]).toBeCloseTo(0, 9);
    expect(b.peakKw).toBeCloseTo(150, 9);
    expect(b.cost.energy).toBeCloseTo(400 * 0.1, 9);
    expect(b.cost.demand).toBeCloseTo(150 * 10, 9);
    expect(b.shortfallKwh).toBeCloseTo(0, 9);
    expect(b.exceedsSiteLimit).toBe(false);
  });

  it("stays under a load-reduction window net of the building's load", () => {
    const p = night({
      site: {
        limitKw: 1000,
        otherLoadKw: 10,
        limitWindows: [{ from: '2026-01-13T22:00', to: '2026-01-13T23:00', limitKw: 150 }],
      },
    });
    const b = limitedBaseline(p, TARGETS, 'arrival');
    const from = slotOf(p, '13T22:00');
    // Inside the window 140 kW is left for charging; after it each bus takes its 100 kW.
    for (let t = from; t < from + 4; t++) expect(b.chargingKw[t]).toBeCloseTo(140, 9);
    expect(b.chargingKw[from + 4]).toBeCloseTo(200, 9);
    expect(b.exceedsSiteLimit).toBe(false);
  });

  it('a cabinet shares its limit the same way: 120 kW is 60 kW each', () => {
    const p = night({
      cabinets: [{ id: 'K1', limitKw: 120 }],
      chargers: [
        { id: 'C1', maxKw: 100, cabinet: 'K1' },
        { id: 'C2', maxKw: 100, cabinet: 'K1' },
      ],
    });
    const b = limitedBaseline(p, TARGETS, 'arrival');
    expect(b.chargingKw[slotOf(p, '13T22:00')]).toBeCloseTo(120, 9);
    expect(b.peakKw).toBeCloseTo(120, 9);
  });

  it('one charger: the first bus has it until it holds its departure energy, then the bus that waited', () => {
    const p = night({ chargers: [{ id: 'C1', maxKw: 100 }] });
    const b = limitedBaseline(p, TARGETS, 'arrival');
    const from = slotOf(p, '13T22:00');
    // 200 kWh at 100 kW is two hours: B1 22:00-00:00, B2 00:00-02:00.
    expect(b.power[0]![from]).toBeCloseTo(100, 9);
    expect(b.power[1]![from]).toBe(0);
    expect(b.power[0]![from + 8]).toBe(0);
    expect(b.power[1]![from + 8]).toBeCloseTo(100, 9);
    expect(b.chargingKw[from + 16]).toBe(0);
    expect(b.shortfallKwh).toBeCloseTo(0, 9);
  });

  it('says what it leaves undelivered when it cannot keep up: one charger, three hours, 400 kWh wanted', () => {
    const p = night({ chargers: [{ id: 'C1', maxKw: 100 }], depart: '2026-01-14T01:00' });
    const b = limitedBaseline(p, TARGETS, 'arrival');
    // B1 gets its 200 kWh by 00:00, B2 gets 100 kWh from 00:00 to 01:00: 100 kWh short.
    expect(b.shortfallKwh).toBeCloseTo(100, 9);
    expect(b.cost.energy).toBeCloseTo(300 * 0.1, 9);
  });
});

describe('timer', () => {
  // On-peak 0.30 $/kWh until midnight, off-peak 0.10 after: the cheapest window opens at 00:00.
  const tou = {
    offPeakPrice: 0.1,
    periods: [
      {
        name: 'on-peak',
        price: 0.3,
        demandCharge: 0,
        windows: [{ days: [1, 2, 3, 4, 5, 6, 7], from: '12:00', to: '24:00' }],
      },
    ],
  };

  it('starts no charging before the cheapest window opens, then charges as on arrival', () => {
    const p = night({ site: { limitKw: 150 }, tariff: tou });
    const arrival = limitedBaseline(p, TARGETS, 'arrival');
    const timer = limitedBaseline(p, TARGETS, 'timer');
    const midnight = slotOf(p, '14T00:00');
    for (let t = 0; t < midnight; t++) expect(timer.chargingKw[t]).toBe(0);
    expect(timer.chargingKw[midnight]).toBeCloseTo(150, 9);
    // Same 400 kWh, all at 0.10; on arrival 300 kWh fall before midnight at 0.30 (two hours at 150 kW).
    expect(timer.cost.energy).toBeCloseTo(400 * 0.1, 9);
    expect(arrival.cost.energy).toBeCloseTo(300 * 0.3 + 100 * 0.1, 9);
    expect(timer.shortfallKwh).toBeCloseTo(0, 9);
  });

  it('a window opening too late leaves energy undelivered, and says so', () => {
    const p = night({ chargers: [{ id: 'C1', maxKw: 100 }], tariff: tou, depart: '2026-01-14T03:00' });
    const timer = limitedBaseline(p, TARGETS, 'timer');
    // One charger from 00:00 to 03:00: 300 of the 400 kWh.
    expect(timer.shortfallKwh).toBeCloseTo(100, 9);
  });
});

describe('both baselines on generated depots', () => {
  it.each([3, 5, 8])(
    "seed %i: inside every slot's limit, never more than the plan delivers, and the plan saves against the reference",
    async (seed) => {
      const input = generateDepot({ buses: 18, seed, chargers: 8 });
      const parsed = parseScenario(input);
      if (!parsed.ok) throw new Error('bad depot');
      const plan = await planScenario(parsed.scenario, { maxMoves: 40 });
      const problem = prepareProblem(parsed.scenario);
      const targets = problem.buses.map((bus) => bus.stays.map((_, k) => plan.buses[bus.index]!.departures[k]!.kwh));
      for (const kind of ['arrival', 'timer'] as const) {
        const b = limitedBaseline(problem, targets, kind);
        problem.slots.forEach((s, t) => expect(b.chargingKw[t]! + s.otherKw).toBeLessThanOrEqual(s.limitKw + 1e-6));
        const delivered = b.chargingKw.reduce((a, kw) => a + kw * problem.slotHours * problem.eta, 0);
        const planned = plan.slots.reduce(
          (a, s, t) => a + (s.loadKw - problem.slots[t]!.otherKw) * problem.slotHours * problem.eta,
          0,
        );
        expect(delivered).toBeLessThanOrEqual(planned + 0.05);
        // A stay left short needs more in the next one, so the shortfall covers at least the difference.
        expect(delivered + b.shortfallKwh).toBeGreaterThanOrEqual(planned - 0.05);
        const reported = plan.baselines[kind];
        expect(reported.total).toBeCloseTo(reported.energy + reported.demand + reported.shortfallCost, 4);
      }
      // The plan's cost never exceeds the reference's (the optimiser could always copy it).
      expect(plan.cost.total).toBeLessThanOrEqual(plan.baseline.total + 1e-6);
      expect(plan.savings.total).toBeCloseTo(plan.baseline.total - plan.cost.total, 4);
    },
  );
});
