import { describe, expect, it } from 'vitest';
import { quarterHours } from './quarter-hours.js';

const T0 = Date.UTC(2026, 0, 14, 6, 0);
const MIN = 60_000;
const readings = (minutes: number, kwhs: number[], from = T0) =>
  kwhs.map((kwh, i) => ({ startMs: from + i * minutes * MIN, minutes, kwh }));

describe('meter readings as quarter-hour energy', () => {
  it('adds 5-minute readings up into their quarter hour: 15-minute demand, not 5-minute', () => {
    // 2 + 4 + 6 kWh in one quarter hour is 12 kWh, 48 kW of 15-minute demand (its 6 kWh
    // reading alone would be 72 kW of 5-minute demand).
    const q = quarterHours(readings(5, [2, 4, 6, 1, 1, 1]));
    expect(q).toEqual([
      { startMs: T0, kwh: 12 },
      { startMs: T0 + 15 * MIN, kwh: 3 },
    ]);
  });

  it('leaves out a quarter hour whose 5-minute readings are not all there', () => {
    const q = quarterHours([...readings(5, [2, 4, 6]), ...readings(5, [1, 1], T0 + 15 * MIN)]);
    expect(q).toEqual([{ startMs: T0, kwh: 12 }]);
  });

  it('keeps 15-minute readings as they are and spreads 30- and 60-minute ones evenly', () => {
    expect(quarterHours(readings(15, [3, 5]))).toEqual([
      { startMs: T0, kwh: 3 },
      { startMs: T0 + 15 * MIN, kwh: 5 },
    ]);
    expect(quarterHours(readings(60, [20])).map((r) => r.kwh)).toEqual([5, 5, 5, 5]);
    expect(quarterHours(readings(30, [8, 4])).map((r) => r.kwh)).toEqual([4, 4, 2, 2]);
  });

  it('keeps the energy: the quarter hours add up to the readings', () => {
    const rs = readings(
      5,
      Array.from({ length: 96 * 3 }, (_, i) => (i % 7) + 0.25),
    );
    const total = rs.reduce((a, r) => a + r.kwh, 0);
    const q = quarterHours(rs);
    expect(q).toHaveLength(96);
    expect(q.reduce((a, r) => a + r.kwh, 0)).toBeCloseTo(total, 9);
  });

  it('counts a reading off the clock marks in the quarters it overlaps, by minutes covered', () => {
    // 10-minute readings from 06:00: 06:00-06:10 and 06:10-06:20 (half of it in the second quarter).
    const q = quarterHours(readings(10, [10, 10, 10]));
    expect(q).toEqual([
      { startMs: T0, kwh: 15 },
      { startMs: T0 + 15 * MIN, kwh: 15 },
    ]);
  });
});
