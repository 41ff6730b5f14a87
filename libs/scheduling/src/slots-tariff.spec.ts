import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { localToMillis, parseScenario, type Scenario } from './scenario.js';
import { buildSlots } from './slots.js';
import { costLoad, tariffOf } from './tariff.js';
import type { RawJson } from './testing/raw-json.js';

const base = (): RawJson => JSON.parse(readFileSync(new URL('../examples/small-depot.json', import.meta.url), 'utf8'));
const scenario = (mutate: (s: RawJson) => void): Scenario => {
  const s = base();
  mutate(s);
  const r = parseScenario(s);
  if (!r.ok) throw new Error(JSON.stringify(r.problems));
  return r.scenario;
};
const night = (start: string, end: string, stay: [string, string]) =>
  scenario((s) => {
    s.start = start;
    s.end = end;
    s.buses.forEach((b: RawJson) => (b.stays = [{ arrive: stay[0], depart: stay[1], departMinKwh: 100 }]));
  });

describe('slots in the depot time zone', () => {
  it('has 96 slots on an ordinary day', () => {
    expect(
      buildSlots(night('2026-01-14T12:00', '2026-01-15T12:00', ['2026-01-14T16:00', '2026-01-15T06:00'])),
    ).toHaveLength(96);
  });

  // IANA time zone database through luxon: 2026-03-08 has 23 hours, 2026-11-01 has 25 hours
  // in America/Chicago.
  it('has 92 slots over the spring clock change (2026-03-08, America/Chicago)', () => {
    const slots = buildSlots(night('2026-03-07T12:00', '2026-03-08T12:00', ['2026-03-07T16:00', '2026-03-08T06:00']));
    expect(slots).toHaveLength(92);
    expect(slots.find((s) => s.start.startsWith('2026-03-08T01:45'))!.start).toBe('2026-03-08T01:45:00.000-06:00');
    const next = slots.findIndex((s) => s.start.startsWith('2026-03-08T01:45')) + 1;
    expect(slots[next]!.start).toBe('2026-03-08T03:00:00.000-05:00');
  });

  it('has 100 slots over the autumn clock change (2026-11-01, America/Chicago), 01:00-02:00 twice', () => {
    const slots = buildSlots(night('2026-10-31T12:00', '2026-11-01T12:00', ['2026-10-31T16:00', '2026-11-01T06:00']));
    expect(slots).toHaveLength(100);
    const ones = slots.filter((s) => s.start.startsWith('2026-11-01T01:'));
    expect(ones.map((s) => s.start.slice(11))).toEqual([
      '01:00:00.000-05:00',
      '01:15:00.000-05:00',
      '01:30:00.000-05:00',
      '01:45:00.000-05:00',
      '01:00:00.000-06:00',
      '01:15:00.000-06:00',
      '01:30:00.000-06:00',
      '01:45:00.000-06:00',
    ]);
  });

  it('reads a time in the repeated hour as its first occurrence', () => {
    expect(new Date(localToMillis('2026-11-01T01:30', 'America/Chicago')!).toISOString()).toBe(
      '2026-11-01T06:30:00.000Z',
    );
    expect(localToMillis('2026-03-08T02:30', 'America/Chicago')).toBeNull();
  });

  it('prices a window that runs past midnight on the day it starts', () => {
    const s = scenario((x) => {
      x.start = '2026-01-16T12:00'; // Friday
      x.end = '2026-01-17T12:00';
      x.tariff.periods = [
        { name: 'night', price: 0.05, demandCharge: 0, windows: [{ days: [5], from: '22:00', to: '06:00' }] },
      ];
      x.tariff.peaksSoFarKw = {};
      x.buses.forEach(
        (b: RawJson) => (b.stays = [{ arrive: '2026-01-16T16:00', depart: '2026-01-17T06:00', departMinKwh: 100 }]),
      );
    });
    const slots = buildSlots(s);
    const at = (hhmm: string, day: string) => slots.find((x) => x.start.startsWith(`${day}T${hhmm}`))!;
    expect(at('21:45', '2026-01-16').periodName).toBe('off-peak');
    expect(at('22:00', '2026-01-16').periodName).toBe('night');
    expect(at('03:00', '2026-01-17').periodName).toBe('night'); // Saturday morning, Friday's window
    expect(at('05:45', '2026-01-17').price).toBe(0.05);
    expect(at('06:00', '2026-01-17').periodName).toBe('off-peak');
  });

  it('applies weekday periods only on their days', () => {
    const slots = buildSlots(night('2026-01-17T12:00', '2026-01-18T12:00', ['2026-01-17T16:00', '2026-01-18T06:00'])); // Sat-Sun
    expect(slots.every((s) => s.periodName === 'off-peak')).toBe(true);
  });
});

describe('tariff costing', () => {
  const slots = (n: number, price: number, period = -1, otherKw = 0) =>
    Array.from({ length: n }, () => ({ price, period, otherKw }));
  const tariff = (facility: number, soFar = 0) => ({
    currency: 'USD',
    facilityDemandCharge: facility,
    facilityPeakSoFarKw: soFar,
    periods: [],
  });

  it('takes an interval demand as energy over length: 150 kWh in 30 min is 300 kW, $3,750 at $12.50/kW', () => {
    // Common practice (utilities' tariff definitions), as in the checks brief.
    const c = costLoad(slots(2, 0), [300, 300], tariff(12.5), 0.25); // two 15-min slots = 150 kWh
    expect(c.peakKw).toBe(300);
    expect(c.demand).toBeCloseTo(3750, 9);
  });

  it('prices energy per kWh: 17,588 kWh at $0.09444 is $1,661.01', () => {
    // Energy Management Handbook (Turner and Doty) 18.5.1: energy line of the monthly bill.
    const c = costLoad(slots(1, 0.09444), [17588], tariff(0), 1);
    expect(Math.round(c.energy * 100) / 100).toBe(1661.01);
  });

  it('charges no demand below the billing period peak so far, only the increase above it', () => {
    expect(costLoad(slots(4, 0.1, -1, 20), [50, 80, 60, 10], tariff(10, 120), 0.25).demand).toBe(0);
    expect(costLoad(slots(4, 0.1, -1, 20), [50, 110, 60, 10], tariff(10, 120), 0.25).demand).toBeCloseTo(100, 9);
  });

  it('charges a period demand on the peak inside the period only', () => {
    const t = {
      currency: 'USD',
      facilityDemandCharge: 0,
      facilityPeakSoFarKw: 0,
      periods: [{ name: 'on-peak', price: 0.3, demandCharge: 5, peakSoFarKw: 0 }],
    };
    const s = [
      { price: 0.1, period: -1, otherKw: 0 },
      { price: 0.3, period: 0, otherKw: 0 },
    ];
    const c = costLoad(s, [200, 40], t, 0.25);
    expect(c.demand).toBeCloseTo(200, 9);
    expect(c.energy).toBeCloseTo(0.1 * 50 + 0.3 * 10, 9);
  });

  it('costs the example tariff from the scenario', () => {
    const s = scenario(() => {});
    const t = tariffOf(s);
    expect(t.facilityPeakSoFarKw).toBe(180);
    expect(t.periods.map((p) => p.peakSoFarKw)).toEqual([0, 0]);
  });
});
