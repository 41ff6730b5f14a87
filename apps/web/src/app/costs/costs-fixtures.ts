import type { BillView, MeterImportResult, MonthCosts, PlanCosts } from '@nightyard/contracts';

/** Test data for the Costs unit tests (invented figures, December 2026 at a Chicago depot). */
export function bill(overrides: Partial<BillView> = {}): BillView {
  return {
    currency: 'USD',
    energy: [
      { name: 'Energy, off-peak', quantity: 12_000, unit: 'kWh', rate: 0.068, amount: 816 },
      { name: 'Energy, on-peak', quantity: 1_500.5, unit: 'kWh', rate: 0.18, amount: 270.09 },
    ],
    demand: [
      {
        name: 'Facility demand',
        quantity: 185,
        unit: 'kW',
        rate: 7.5,
        amount: 1387.5,
        peakAt: Date.parse('2026-12-02T23:15:00Z'),
      },
      { name: 'Demand, on-peak', quantity: 48, unit: 'kW', rate: 9, amount: 432, peakAt: null },
    ],
    fixed: [{ name: 'Customer charge', quantity: 31, unit: 'day', rate: 1.5, amount: 46.5 }],
    energyTotal: 1086.09,
    demandTotal: 1819.5,
    fixedTotal: 46.5,
    total: 2952.09,
    kwh: 13_500.5,
    ...overrides,
  };
}

export function monthCosts(overrides: Partial<MonthCosts> = {}): MonthCosts {
  return {
    currency: 'USD',
    period: { start: '2026-12-01', end: '2027-01-01', days: 31 },
    ratePlanName: 'Invented Electric TOU',
    projected: bill(),
    projectedRange: null,
    forecast: [],
    monthToDate: bill({ total: 190.25, energyTotal: 143.75, demandTotal: 0, fixedTotal: 46.5, kwh: 1_200 }),
    savings: {
      total: 312.4,
      planBill: 4_100.25,
      baselineBill: 4_412.65,
      nightsCompared: 2,
      planPeakKw: 185,
      baselinePeakKw: 410,
    },
    peaks: {
      facility: { kw: 185, at: '2026-12-02T23:15:00.000Z', source: 'actual' },
      periods: [{ name: 'on-peak', kw: 48, at: null }],
    },
    nights: [
      {
        date: '2026-12-01',
        planId: '00000000-0000-4000-8000-0000000000a1',
        version: 1,
        planEnergyCost: 100.5,
        baselineEnergyCost: 150.1,
        baselineKind: 'timer',
        baselinePeakKw: 410,
        projectedSiteEnergyCost: 98.2,
        actualSiteEnergyCost: 101.7,
        projectedMeteredSiteEnergyCost: 98.2,
        projectedPeakKw: 160,
        actualPeakKw: 171.2,
        actualCoverage: 1,
        periodPart: null,
      },
      {
        date: '2026-12-02',
        planId: '00000000-0000-4000-8000-0000000000a2',
        version: 2,
        planEnergyCost: 90,
        baselineEnergyCost: 130.2,
        baselineKind: 'arrival',
        baselinePeakKw: 380,
        projectedSiteEnergyCost: 90,
        actualSiteEnergyCost: null,
        projectedMeteredSiteEnergyCost: null,
        projectedPeakKw: 150,
        actualPeakKw: null,
        actualCoverage: 0,
        periodPart: null,
      },
    ],
    sources: { actualIntervals: 96, plannedNights: 2, forecastNights: 0, schoolNightsWithoutPlan: 3 },
    emissions: {
      miles: 2_400,
      dieselMpg: 7,
      dieselGallonsAvoided: 342.86,
      co2KgAvoided: 3490.29,
      source:
        'Diesel avoided = miles / 7 mpg (assumed for a full-size diesel school bus). CO2 = 10,180 g per gallon of diesel (US EPA figure).',
    },
    target: null,
    ...overrides,
  };
}

/** A demand target over the rest of the period (invented figures). */
export function periodTarget(
  overrides: Partial<NonNullable<MonthCosts['target']>> = {},
): NonNullable<MonthCosts['target']> {
  return {
    currency: 'USD',
    nights: [
      { date: '2026-12-14', basis: 'runs' },
      { date: '2026-12-15', basis: 'typical-weekday' },
    ],
    facilityKw: 212,
    targets: [
      { name: 'facility', kw: 212, peakSoFarKw: 185, rate: 7.5 },
      { name: 'on-peak', kw: 48, peakSoFarKw: 48, rate: 9 },
    ],
    cost: { energy: 1_240.5, demand: 202.5, total: 1_443 },
    binding: {
      name: 'facility',
      night: 'Monday Dec 14',
      at: '2026-12-14T05:30:00.000-06:00',
      buses: 24,
      needKwh: 1_900,
      sentence:
        'Monday Dec 14, 05:30: 24 buses need 1,900 kWh between pull-in (16:20) and pull-out (06:10); spreading it over the cheap intervals still needs 212 kW for the facility demand.',
    },
    marginal: [
      {
        name: 'facility',
        rate: 7.5,
        aboveSavesPerKw: 2.1,
        belowCostsPerKw: 9.4,
        belowShortKwhPerKw: 0,
        sentence:
          'Each kW above the target saves $2.10 of energy this period and costs $7.50 of demand charge; each kW below costs $9.40 of energy and saves $7.50.',
      },
    ],
    impossible: [],
    solveMs: 120,
    ratchet: null,
    ...overrides,
  };
}

export function planCosts(overrides: Partial<PlanCosts> = {}): PlanCosts {
  return {
    planId: '00000000-0000-4000-8000-0000000000a1',
    serviceDate: '2026-12-01',
    currency: 'USD',
    energy: 100.5,
    demand: 20,
    total: 120.5,
    baseline: { kind: 'timer', energy: 150.1, demand: 140, total: 290.1, peakKw: 410, shortfallKwh: 0 },
    otherBaseline: { kind: 'arrival', total: 310.4, energy: 160.4, peakKw: 420, shortfallKwh: 0 },
    peakKw: 185,
    savings: 49.6,
    savingsShare: 0.3304,
    chargingKwh: 140.5,
    miles: 116,
    costPerMile: 1.04,
    perBus: [
      { bus: '201', kwh: 80, cost: 70.2, miles: 58, costPerMile: 1.21 },
      { bus: '202', kwh: 60.5, cost: 50.3, miles: 58, costPerMile: 0.87 },
      { bus: '203', kwh: 0, cost: 0, miles: 0, costPerMile: null },
    ],
    ...overrides,
  };
}

export function importResult(overrides: Partial<MeterImportResult> = {}): MeterImportResult {
  return {
    id: '00000000-0000-4000-8000-0000000000f1',
    format: 'green-button-csv',
    intervals: 8,
    minutes: 15,
    duplicates: 2,
    gaps: [{ from: '2026-12-02T22:30', to: '2026-12-02T23:00' }],
    kwh: 82.25,
    peaks: { facilityKw: 185, periods: { 'on-peak': 48 } },
    ...overrides,
  };
}
