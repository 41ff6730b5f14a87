import type { Charger, DepotDetail, RatePlan, RatePreview } from '@nightyard/contracts';

// Client-side test data for the Depot and Rates specs (HTTP is faked with HttpTestingController).

export const DEPOT_ID = '00000000-0000-4000-8000-0000000000d1';
export const CABINET_ID = '00000000-0000-4000-8000-0000000000c1';

export function charger(overrides: Partial<Charger> = {}): Charger {
  return {
    id: `00000000-0000-4000-8000-${Math.random().toString(16).slice(2, 14).padEnd(12, '0')}`,
    label: 'C1',
    maxKw: 60,
    connector: 'SAE J1772 CCS1',
    cabinetId: null,
    cabinetLabel: null,
    status: 'in_service',
    statusReason: null,
    statusSince: null,
    outFrom: null,
    outUntil: null,
    ocppIdentity: null,
    live: null,
    ...overrides,
  };
}

export function depotDetail(overrides: Partial<DepotDetail> = {}): DepotDetail {
  return {
    id: DEPOT_ID,
    name: 'North Depot',
    timezone: 'America/Chicago',
    serviceLimitKw: 450,
    otherLoadKw: [30],
    billingStartDay: 1,
    cabinets: [{ id: CABINET_ID, label: 'Cabinet A', limitKw: 150, chargerCount: 2 }],
    chargers: [
      charger({ label: 'C10', maxKw: 30 }),
      charger({ label: 'C2', maxKw: 60 }),
      charger({ label: 'D1', maxKw: 120, cabinetId: CABINET_ID, cabinetLabel: 'Cabinet A' }),
      charger({
        label: 'D2',
        maxKw: 120,
        cabinetId: CABINET_ID,
        cabinetLabel: 'Cabinet A',
        status: 'out_of_service',
        statusReason: 'Cable damaged, tagged out',
        statusSince: '2026-11-30T14:05:00Z',
        outFrom: null,
        outUntil: null,
      }),
    ],
    loadReductionWindows: [
      {
        id: '00000000-0000-4000-8000-0000000000e1',
        start: '2026-12-10T16:00',
        end: '2026-12-10T19:00',
        limitKw: 300,
        note: 'Utility event',
      },
    ],
    peaksSoFar: { billingPeriodStart: '2026-12-01', facilityKw: 212, periods: { 'on-peak': 180 } },
    yardCrew: {
      minPlugInMinutes: 45,
      driversPlugIn: true,
      shifts: [
        { from: '15:00', to: '23:30', movesPerSlot: 3 },
        { from: '04:30', to: '07:00', movesPerSlot: 2 },
      ],
      costTolerancePercent: 0.5,
      costToleranceAmount: 5,
    },
    ratePlans: [
      { ratePlanId: '00000000-0000-4000-8000-0000000000f1', name: 'Commercial TOU', effectiveFrom: '2026-06-01' },
    ],
    ...overrides,
  };
}

export function ratePlan(overrides: Partial<RatePlan> = {}): RatePlan {
  return {
    id: '00000000-0000-4000-8000-0000000000f1',
    name: 'Commercial TOU',
    createdAt: '2026-06-01T10:00:00.000Z',
    definition: {
      currency: 'USD',
      seasons: [
        {
          name: 'Summer',
          fromMonth: 6,
          toMonth: 9,
          offPeakPrice: 0.075,
          facilityDemandCharge: 7.5,
          periods: [
            {
              name: 'on-peak',
              price: 0.24,
              demandCharge: 16,
              windows: [{ dayTypes: ['weekday'], from: '15:00', to: '20:00' }],
            },
          ],
          energyBlocks: [],
        },
        {
          name: 'Winter',
          fromMonth: 10,
          toMonth: 5,
          offPeakPrice: 0.068,
          facilityDemandCharge: 7.5,
          periods: [],
          energyBlocks: [],
        },
      ],
      fixedCharges: [{ name: 'Customer charge', amount: 45, per: 'month' }],
      holidays: [],
      demandRatchet: null,
      minimumCharge: null,
    },
    ...overrides,
  };
}

/** A winter weekday in Chicago (UTC-6 all day): 24 hours. */
export function weekdayPreview(): RatePreview {
  return {
    date: '2026-12-02',
    dayType: 'weekday',
    season: 'Winter',
    currency: 'USD',
    facilityDemandCharge: 7.5,
    intervals: [
      {
        start: '2026-12-02T00:00:00.000-06:00',
        end: '2026-12-02T07:00:00.000-06:00',
        period: 'off-peak',
        price: 0.068,
        demandCharge: 0,
      },
      {
        start: '2026-12-02T07:00:00.000-06:00',
        end: '2026-12-02T16:00:00.000-06:00',
        period: 'mid-peak',
        price: 0.11,
        demandCharge: 0,
      },
      {
        start: '2026-12-02T16:00:00.000-06:00',
        end: '2026-12-02T20:00:00.000-06:00',
        period: 'on-peak',
        price: 0.18,
        demandCharge: 9,
      },
      {
        start: '2026-12-02T20:00:00.000-06:00',
        end: '2026-12-03T00:00:00.000-06:00',
        period: 'off-peak',
        price: 0.068,
        demandCharge: 0,
      },
    ],
  };
}

/** Sunday 1 November 2026 in Chicago: clocks go back at 02:00 CDT, so the day has 25 hours. */
export function fallBackPreview(): RatePreview {
  return {
    date: '2026-11-01',
    dayType: 'weekend',
    season: 'Winter',
    currency: 'USD',
    facilityDemandCharge: 7.5,
    intervals: [
      {
        start: '2026-11-01T00:00:00.000-05:00',
        end: '2026-11-02T00:00:00.000-06:00',
        period: 'off-peak',
        price: 0.068,
        demandCharge: 0,
      },
    ],
  };
}
