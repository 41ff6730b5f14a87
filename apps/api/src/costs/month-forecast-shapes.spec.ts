import { describe, expect, it } from 'vitest';
import { forecastShapes, targetShapes, type ChargingKw, type ForecastNight, type ForecastSlot } from './month-forecast';

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

  it('energy over the target by less than a hundredth of a kWh (rounding) does not raise the peak', () => {
    // Room under 20 kW: 4 x 10 kW / 4 = 10 kWh; 10.004 kWh asked. Raised for the 0.004 kWh, the
    // site read 20.004 kW: a forecast night then took the month's peak by a thousandth of a kW.
    const n = night([10, 10, 10, 10], 10.004);
    for (const shape of Object.values(forecastShapes(n, () => 20))) {
      for (const kw of siteKw(n, shape)) expect(kw).toBeLessThanOrEqual(20 + 1e-9);
      expect(kwh(shape)).toBeCloseTo(10, 9);
    }
    // A hundredth and more is drawn, above the target.
    const more = night([10, 10, 10, 10], 10.02);
    for (const shape of Object.values(forecastShapes(more, () => 20))) expect(kwh(shape)).toBeCloseTo(10.02, 6);
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

  // A night the target's LP charged, in 30-minute slots with a bus at the depot in three: 20 kW, 0
  // and 20 kW (20 kWh), in 15-minute intervals 20, 20, 0, 0, 20, 20 kW. The building draws 10 kW;
  // prices fall through the night, so the cheapest intervals are the last.
  const slotOf = (t: number): ForecastSlot => ({ t, price: 0.2 - (t / Q) * 0.01, buildingKw: 10, roomKw: 90 });
  const lp = { slotMinutes: 30, slots: [20, 0, 20].map((kw, i) => ({ startMs: i * 2 * Q, kw })) };

  it("a night the target's LP charged keeps the runs' energy where the LP put its charging, the rest in the cheapest room under the cap", () => {
    // The runs need 26 kWh, 6 more than the LP charged. A 50 kW cap leaves 40 kW of room, 20 kW
    // beside the LP's 20: the cheapest interval, the last, takes 20 kW more (5 kWh), the one before
    // it 4 kW (1 kWh). Spread evenly: 26 x 4 / 6 kW in each.
    const { cheapest, even } = targetShapes(night([10], 26), lp, slotOf, () => 50);
    expect([...cheapest.entries()]).toEqual([
      [0, 20],
      [Q, 20],
      [2 * Q, 0],
      [3 * Q, 0],
      [4 * Q, 24],
      [5 * Q, 40],
    ]);
    for (const v of even.values()) expect(v).toBeCloseTo(26 / 1.5, 9);
  });

  it("a night the target's LP charged more than the runs use: its charging scaled down", () => {
    const { cheapest } = targetShapes(night([10], 10), lp, slotOf, () => 50);
    expect([...cheapest.values()]).toEqual([10, 10, 0, 0, 10, 10]);
  });

  it("a night the target's LP charged, with more energy than fits under the cap: the lowest site loads rise first", () => {
    // A 30 kW cap leaves 20 kW of room: 6 x 20 / 4 = 30 kWh fit under it. 36 kWh lift all six
    // intervals the same 4 kW above it, in both shapes: 24 kW of charging, 34 kW at the site.
    for (const shape of Object.values(targetShapes(night([10], 36), lp, slotOf, () => 30))) {
      expect(shape.size).toBe(6);
      for (const v of shape.values()) expect(v).toBeCloseTo(24, 6);
    }
  });

  it("a night the target's LP charged in 5-minute slots: each interval takes the mean of its three", () => {
    const five = { slotMinutes: 5, slots: [30, 60, 0].map((kw, i) => ({ startMs: (i * Q) / 3, kw })) };
    const { cheapest } = targetShapes(night([0], 7.5), five, slotOf, () => 100);
    expect([...cheapest.entries()]).toEqual([[0, 30]]);
  });
});
