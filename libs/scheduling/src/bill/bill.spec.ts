import { DateTime } from 'luxon';
import { describe, expect, it } from 'vitest';
import { ratePlanDefinitionSchema, toCents } from '@nightyard/contracts';
import { computeBill, nightMarginalCost, type IntervalDemand } from './bill.js';

const ZONE = 'America/Chicago';
const series = (startIso: string, minutes: number, kwhs: number[]): IntervalDemand[] => {
  const t0 = DateTime.fromISO(startIso, { zone: ZONE }).toMillis();
  return kwhs.map((kwh, i) => ({ startMs: t0 + i * minutes * 60_000, kwh }));
};

describe('bill engine against published worked examples', () => {
  it('Energy Management Handbook (Turner and Doty), 18.5.1 "Calculation of a monthly bill": $1,624.72', () => {
    // June commercial bill: 17,588 kWh at $0.09444 with a fuel adjustment of -$0.017192/kWh,
    // 30 kW billing demand costing $262.34, customer charge $3.74. The demand rate is the
    // handbook's $262.34 / 30 kW; energy and adjustment are one flat price here.
    const def = ratePlanDefinitionSchema.parse({
      currency: 'USD',
      seasons: [
        {
          name: 'All year',
          fromMonth: 1,
          toMonth: 12,
          offPeakPrice: 0.09444 - 0.017192,
          facilityDemandCharge: 262.34 / 30,
          periods: [],
        },
      ],
      fixedCharges: [{ name: 'Customer charge', amount: 3.74, per: 'month' }],
    });
    // 30 June days of 15-minute intervals: one interval at 30 kW (7.5 kWh), the rest share the remainder.
    const n = 30 * 96;
    const rest = (17_588 - 7.5) / (n - 1);
    const kwhs = Array.from({ length: n }, (_, i) => (i === 500 ? 7.5 : rest));
    const bill = computeBill(def, series('2026-06-01T00:00', 15, kwhs), { zone: ZONE, intervalMinutes: 15, days: 30 });
    expect(bill.kwh).toBeCloseTo(17_588, 6);
    expect(bill.energyTotal).toBeCloseTo(1_661.01 - 302.37, 1);
    expect(bill.demand[0]!.quantity).toBeCloseTo(30, 9);
    expect(toCents(bill.demandTotal)).toBe(262.34);
    expect(toCents(bill.fixedTotal)).toBe(3.74);
    // Full precision throughout, rounded once to show: $1,624.7178 -> $1,624.72.
    expect(toCents(bill.total)).toBe(1_624.72);
  });

  it('demand from interval data: 150 kWh in 30 minutes is 300 kW; at $12.50/kW-month, $3,750 (common practice)', () => {
    const def = ratePlanDefinitionSchema.parse({
      currency: 'USD',
      seasons: [
        { name: 'All year', fromMonth: 1, toMonth: 12, offPeakPrice: 0, facilityDemandCharge: 12.5, periods: [] },
      ],
    });
    const bill = computeBill(def, series('2026-03-02T10:00', 30, [100, 150, 120]), {
      zone: ZONE,
      intervalMinutes: 30,
      days: 31,
    });
    expect(bill.demand[0]!.quantity).toBe(300);
    expect(bill.demandTotal).toBe(3_750);
  });
});

describe('bill engine', () => {
  const tou = ratePlanDefinitionSchema.parse({
    currency: 'USD',
    seasons: [
      {
        name: 'Winter',
        fromMonth: 1,
        toMonth: 12,
        offPeakPrice: 0.07,
        facilityDemandCharge: 7.5,
        periods: [
          {
            name: 'on-peak',
            price: 0.18,
            demandCharge: 9,
            windows: [{ dayTypes: ['weekday'], from: '16:00', to: '20:00' }],
          },
        ],
      },
    ],
    fixedCharges: [{ name: 'Meter', amount: 1.5, per: 'day' }],
  });

  it('splits energy by period and charges the period peak inside its windows only', () => {
    // Wednesday 15:00-17:00 in 15-minute steps: 15:00-16:00 off-peak at 100 kW, 16:00-17:00 on-peak at 40 kW.
    const kwhs = [25, 25, 25, 25, 10, 10, 10, 10];
    const bill = computeBill(tou, series('2026-12-02T15:00', 15, kwhs), { zone: ZONE, intervalMinutes: 15, days: 31 });
    expect(bill.energy.map((l) => ({ ...l, amount: toCents(l.amount) }))).toEqual([
      { name: 'Energy, off-peak', quantity: 100, unit: 'kWh', rate: 0.07, amount: 7 },
      { name: 'Energy, on-peak', quantity: 40, unit: 'kWh', rate: 0.18, amount: 7.2 },
    ]);
    expect(bill.demand.map((d) => [d.name, d.quantity, d.amount])).toEqual([
      ['Facility demand', 100, 750],
      ['Demand, on-peak', 40, 360],
    ]);
    expect(bill.fixed).toEqual([{ name: 'Meter', quantity: 31, unit: 'day', rate: 1.5, amount: 46.5 }]);
    expect(bill.total).toBeCloseTo(7 + 7.2 + 750 + 360 + 46.5, 9);
  });

  it('a night below the peaks so far adds no demand cost; above them only the increase', () => {
    const night = series('2026-12-02T21:00', 15, [20, 30, 30, 20]);
    const below = nightMarginalCost(tou, night, { zone: ZONE, intervalMinutes: 15, peaksSoFarKw: { facility: 150 } });
    expect(below.demandTotal).toBe(0);
    expect(below.fixedTotal).toBe(0);
    expect(below.energyTotal).toBeCloseTo(100 * 0.07, 9);
    const above = nightMarginalCost(tou, night, { zone: ZONE, intervalMinutes: 15, peaksSoFarKw: { facility: 100 } });
    expect(above.demandTotal).toBe(20 * 7.5);
  });

  it('a 25-hour clock-change day has 100 intervals and each is priced by its own local time', () => {
    const t0 = DateTime.fromISO('2026-11-01T00:00', { zone: ZONE }).toMillis();
    const day = Array.from({ length: 100 }, (_, i) => ({ startMs: t0 + i * 900_000, kwh: 1 }));
    const bill = computeBill(tou, day, { zone: ZONE, intervalMinutes: 15, days: 1 });
    // Sunday: no on-peak; 100 kWh all off-peak.
    expect(bill.energy.map((l) => ({ ...l, amount: toCents(l.amount) }))).toEqual([
      { name: 'Energy, off-peak', quantity: 100, unit: 'kWh', rate: 0.07, amount: 7 },
    ]);
  });
});

describe('tiered energy, demand ratchets and minimum bills', () => {
  // Source: "Calculated Minimum Charges", Oracle Utilities Customer Care and Billing 2.9 user guide,
  // https://docs.oracle.com/en/industries/energy-water/ccb/2.9.0.0.0/ccb-user-guides/CCB_29000/C1_BP14Rates_Calculated_Minimum_Charges.html
  // Its example rate: first 300 kWh at $0.0382, remaining kWh at $0.0673, minimum charge $0.15 per
  // day (its state and county taxes are left out). The bills below are worked by hand from it.
  const blocked = ratePlanDefinitionSchema.parse({
    currency: 'USD',
    seasons: [
      {
        name: 'All year',
        fromMonth: 1,
        toMonth: 12,
        offPeakPrice: 0.0382,
        periods: [],
        energyBlocks: [
          { uptoKwh: 300, adder: 0 },
          { uptoKwh: null, adder: 0.0673 - 0.0382 },
        ],
      },
    ],
    minimumCharge: { amount: 0.15, per: 'day' },
  });
  const month = (totalKwh: number) => {
    const n = 30 * 96;
    return series(
      '2026-06-01T00:00',
      15,
      Array.from({ length: n }, () => totalKwh / n),
    );
  };

  it('1,000 kWh in a 30-day month: 300 x $0.0382 + 700 x $0.0673 = $11.46 + $47.11 = $58.57, above the $4.50 minimum', () => {
    const bill = computeBill(blocked, month(1_000), { zone: ZONE, intervalMinutes: 15, days: 30 });
    const first = bill.energy.find((l) => l.name === 'Energy, off-peak')!;
    const block = bill.energy.find((l) => l.name === 'Energy above 300 kWh')!;
    expect(first.quantity).toBeCloseTo(1_000, 6);
    expect(block.quantity).toBeCloseTo(700, 6);
    expect(toCents(first.amount)).toBe(38.2);
    expect(toCents(block.amount)).toBe(20.37);
    expect(toCents(bill.energyTotal)).toBe(58.57);
    expect(bill.fixed).toEqual([]);
    expect(toCents(bill.total)).toBe(58.57);
  });

  it('100 kWh in a 30-day month: $3.82 of energy is topped up to the minimum of 30 x $0.15 = $4.50', () => {
    const bill = computeBill(blocked, month(100), { zone: ZONE, intervalMinutes: 15, days: 30 });
    expect(toCents(bill.energyTotal)).toBe(3.82);
    expect(bill.fixed.map((l) => [l.name, toCents(l.amount)])).toEqual([['Minimum bill top-up', 0.68]]);
    expect(toCents(bill.total)).toBe(4.5);
  });

  it('a night alone (no fixed charges) is never topped up to the minimum', () => {
    const bill = computeBill(blocked, month(100), { zone: ZONE, intervalMinutes: 15, days: 30, withoutFixed: true });
    expect(bill.fixed).toEqual([]);
  });

  it('blocks count from the kWh already used earlier in the period', () => {
    const bill = computeBill(blocked, series('2026-06-10T00:00', 15, [50, 50]), {
      zone: ZONE,
      intervalMinutes: 15,
      days: 30,
      kwhBefore: 250,
      withoutFixed: true,
    });
    expect(bill.energy.find((l) => l.name === 'Energy above 300 kWh')!.quantity).toBeCloseTo(50, 9);
  });

  // Source: "What is a demand ratchet?", Pacific Northwest National Laboratory, FEMP FAQ,
  // https://feds.pnnl.gov/faq/what-demand-ratchet: "A typical demand ratchet uses 80% of the peak
  // demand occurring during the previous 11 months ... a peak demand of 1,000 kW ... you will be
  // billed for a minimum of 800 kW during the next 11 months".
  const ratcheted = ratePlanDefinitionSchema.parse({
    currency: 'USD',
    seasons: [
      { name: 'All year', fromMonth: 1, toMonth: 12, offPeakPrice: 0.05, facilityDemandCharge: 10, periods: [] },
    ],
    demandRatchet: { percent: 80, months: 11 },
  });

  it('PNNL ratchet example: after a 1,000 kW peak a month peaking at 500 kW is billed on 800 kW ($8,000 at $10/kW)', () => {
    const bill = computeBill(ratcheted, series('2026-06-01T00:00', 15, [125, 50]), {
      zone: ZONE,
      intervalMinutes: 15,
      days: 30,
      ratchetBase: { kw: 1_000, source: 'from meter readings' },
    });
    const facility = bill.demand[0]!;
    expect(facility.quantity).toBe(800);
    expect(facility.amount).toBe(8_000);
    expect(facility.note).toContain('80 % of 1000 kW');
    expect(facility.note).toContain('from meter readings');
  });

  it('a month above the ratchet is billed on its own peak', () => {
    const bill = computeBill(ratcheted, series('2026-06-01T00:00', 15, [225]), {
      zone: ZONE,
      intervalMinutes: 15,
      days: 30,
      ratchetBase: { kw: 1_000, source: 'from meter readings' },
    });
    expect(bill.demand[0]!.quantity).toBe(900);
    expect(bill.demand[0]!.note).toBeUndefined();
  });
});

describe('peaks recorded earlier in the period (entered in Depot)', () => {
  const tou = ratePlanDefinitionSchema.parse({
    currency: 'USD',
    seasons: [
      {
        name: 'Winter',
        fromMonth: 1,
        toMonth: 12,
        offPeakPrice: 0.07,
        facilityDemandCharge: 7.5,
        periods: [
          {
            name: 'on-peak',
            price: 0.18,
            demandCharge: 9,
            windows: [{ dayTypes: ['weekday'], from: '16:00', to: '20:00' }],
          },
        ],
      },
    ],
  });

  it('an on-peak peak of 48 kW entered bills 48 kW although the intervals reach only 40 kW', () => {
    const bill = computeBill(tou, series('2026-12-02T16:00', 15, [10, 10]), {
      zone: ZONE,
      intervalMinutes: 15,
      days: 31,
      recordedPeaksKw: { facility: 30, periods: { 'on-peak': 48 } },
    });
    const onPeak = bill.demand.find((d) => d.name === 'Demand, on-peak')!;
    expect(onPeak.quantity).toBe(48);
    expect(onPeak.amount).toBe(48 * 9);
    expect(onPeak.note).toContain('entered in Depot');
    // The facility peak of the intervals (40 kW) is above the 30 kW entered: it stands.
    expect(bill.demand[0]!.quantity).toBe(40);
  });

  it("a forecast of time gone by bills its energy but sets no peak: the 185 kW / on-peak 48 kW entered stand, not the forecast's 209.4 kW", () => {
    // Tuesday 1 December 17:30-18:00 as forecast (a night nobody planned or metered), then a building quarter hour.
    const t0 = DateTime.fromISO('2026-12-01T17:30', { zone: ZONE }).toMillis();
    const intervals: IntervalDemand[] = [
      { startMs: t0, kwh: 209.4 / 4, energyOnly: true },
      { startMs: t0 + 15 * 60_000, kwh: 209.4 / 4, energyOnly: true },
      { startMs: t0 + 30 * 60_000, kwh: 10 },
    ];
    const bill = computeBill(tou, intervals, {
      zone: ZONE,
      intervalMinutes: 15,
      days: 31,
      recordedPeaksKw: { facility: 185, periods: { 'on-peak': 48 } },
    });
    expect(bill.kwh).toBeCloseTo(209.4 / 2 + 10, 9);
    expect(bill.energyTotal).toBeCloseTo((209.4 / 2 + 10) * 0.18, 9);
    expect(bill.demand.map((d) => [d.name, d.quantity, d.peakAt])).toEqual([
      ['Facility demand', 185, null],
      ['Demand, on-peak', 48, null],
    ]);
  });

  it('equal peaks on later nights (floating-point noise apart) keep the date of the first', () => {
    const first = DateTime.fromISO('2026-12-07T17:30', { zone: ZONE }).toMillis();
    const later = DateTime.fromISO('2026-12-10T17:30', { zone: ZONE }).toMillis();
    const kwh = 52.35043478260869;
    const bill = computeBill(
      tou,
      [
        { startMs: first, kwh },
        { startMs: later, kwh: kwh + 1e-14 },
      ],
      { zone: ZONE, intervalMinutes: 15, days: 31 },
    );
    expect(bill.demand.map((d) => d.peakAt)).toEqual([first, first]);
  });
});
