import { describe, expect, it } from 'vitest';
import { forecastShapes, type ChargingKw, type ForecastNight } from './month-forecast';

// A forecast night's two shapes under the demand target (hand-worked figures, invented night).
const Q = 900_000;
const night = (buildingKw: number[], gridKwh: number, roomKw = 100): ForecastNight => ({
  date: '2026-12-09',
  needKwh: gridKwh * 0.92,
  basis: 'runs',
  gridKwh,
  // Prices fall through the night: the cheapest intervals are the last.
  slots: buildingKw.map((b, i) => ({ t: i * Q, price: 0.2 - i * 0.01, buildingKw: b, roomKw })),
});
const kwh = (kw: ChargingKw) => [...kw.values()].reduce((a, v) => a + v / 4, 0);
const siteKw = (n: ForecastNight, kw: ChargingKw) => n.slots.map((s) => s.buildingKw + (kw.get(s.t) ?? 0));

describe('forecast shapes', () => {
  it('without a target: the same power all night, or all of it in the cheapest intervals', () => {
    const n = night([10, 10, 30, 30], 10);
    const { even, cheapest } = forecastShapes(n);
    expect([...even.values()]).toEqual([10, 10, 10, 10]);
    expect(cheapest.get(3 * Q)).toBe(40);
    expect(kwh(cheapest)).toBeCloseTo(10, 9);
  });

  it('under a target the energy fits under: no site load above it, the energy whole', () => {
    const n = night([10, 10, 30, 30], 10);
    const { even, cheapest } = forecastShapes(n, () => 45);
    for (const shape of [even, cheapest]) {
      expect(kwh(shape)).toBeCloseTo(10, 9);
      for (const kw of siteKw(n, shape)) expect(kw).toBeLessThanOrEqual(45 + 1e-9);
    }
    // The cheapest shape fills the last intervals up to the target: 15 kW there, the rest before.
    expect(cheapest.get(3 * Q)).toBeCloseTo(15, 9);
    expect(cheapest.get(2 * Q)).toBeCloseTo(15, 9);
  });

  it('under a target too low for the energy: the excess raises the lowest site loads first', () => {
    // Worked by hand: under 20 kW of site load only 10 + 10 kW fit in the first two intervals
    // (5 kWh); the other 5 kWh lift those two to the next level, 30 kW, where the building
    // already is: the site draws 30 kW all night, the least peak that serves the 10 kWh.
    const n = night([10, 10, 30, 30], 10);
    for (const shape of Object.values(forecastShapes(n, () => 20))) {
      expect(kwh(shape)).toBeCloseTo(10, 6);
      for (const kw of siteKw(n, shape)) expect(kw).toBeCloseTo(30, 6);
    }
  });

  it('a tariff period with a lower target rises above it by no more than the rest above theirs', () => {
    // Caps of 20 kW (the first two intervals, an on-peak target) and 40 kW (the others), the
    // building at 10 kW throughout: room under the caps (10 + 10 + 30 + 30 kW) / 4 = 20 kWh, so
    // 24 kWh put the other 4 kWh 4 kW above every cap: 24, 24, 44 and 44 kW of site load.
    const n = night([10, 10, 10, 10], 24);
    for (const shape of Object.values(forecastShapes(n, (t) => (t < 2 * Q ? 20 : 40)))) {
      expect(kwh(shape)).toBeCloseTo(24, 6);
      siteKw(n, shape).forEach((kw, i) => expect(kw).toBeCloseTo(i < 2 ? 24 : 44, 6));
    }
  });
});
