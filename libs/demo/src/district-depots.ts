import type { RatePlanDefinition, StoredYardCrew } from '@nightyard/contracts';
import {
  demoBuses,
  demoCabinets,
  demoChargerIdentity,
  demoChargers,
  demoDepot,
  demoRatePlan,
  demoRunsForBus,
} from './demo-depot';

// The demo district's depots: the original one (unchanged: tests and the charger simulator depend
// on it) and two more, invented like it, of other sizes and charger mixes, each on a tariff of an
// invented utility of its own. Nothing here describes a real place, company or tariff.

const CCS1 = 'SAE J1772 CCS1';

export type DemoDepotKey = 'main' | 'kestrel' | 'sandpiper';

export interface DemoDistrictDepot {
  key: DemoDepotKey;
  depot: {
    name: string;
    timezone: string;
    serviceLimitKw: number;
    otherLoadProfileKw: number[];
    billingStartDay: number;
    yardCrew: StoredYardCrew | null;
  };
  cabinets: readonly { label: string; limitKw: number }[];
  chargers: readonly { label: string; maxKw: number; connector: string; cabinet: string | null }[];
  chargerIdentity: (label: string, tag?: string) => string;
  buses: readonly {
    number: string;
    usableKwh: number;
    maxChargeKw: number;
    connector: string;
    kwhPerMile: number;
    ceilingPct: number;
    reservePct: number;
    taperStartPct: number;
  }[];
  ratePlan: { name: string; definition: RatePlanDefinition };
  /** A school day's runs of the depot's i-th bus (local wall-clock), deterministic. */
  runsForBus: (i: number) => { pullOut: string; pullIn: string; miles: number; arrivalSocPct?: number }[];
  /**
   * Peaks already set: this period's so far, or (`previousPeriod`) the last period's, which a
   * demand ratchet then bills a share of.
   */
  peaks: { facilityKw: number; periodsKw: Record<string, number>; previousPeriod: boolean };
  /** The depot's own yard staff member, beside the people who hold every depot. */
  yardUser: { email: string; name: string } | null;
}

/** The original demo depot, as it always was. */
export const mainDemoDepot: DemoDistrictDepot = {
  key: 'main',
  depot: demoDepot,
  cabinets: demoCabinets,
  chargers: demoChargers,
  chargerIdentity: demoChargerIdentity,
  buses: demoBuses,
  ratePlan: demoRatePlan,
  runsForBus: demoRunsForBus,
  peaks: { facilityKw: 185, periodsKw: { 'on-peak': 48 }, previousPeriod: false },
  yardUser: null,
};

/**
 * A small depot in the hills an hour's zone west: twelve buses, six 40 kW chargers and two fast
 * ones on one power cabinet. Its utility bills the facility demand with a ratchet: at least 80 %
 * of the highest of the previous 11 months (last period's peak was 236 kW).
 */
export const kestrelDemoDepot: DemoDistrictDepot = {
  key: 'kestrel',
  depot: {
    name: 'Kestrel Hollow Depot',
    timezone: 'America/Denver',
    serviceLimitKw: 280,
    otherLoadProfileKw: [
      12, 12, 12, 12, 12, 14, 18, 24, 28, 28, 28, 28, 28, 28, 28, 26, 22, 18, 16, 14, 14, 12, 12, 12,
    ],
    billingStartDay: 1,
    yardCrew: {
      minPlugInMinutes: 30,
      driversPlugIn: true,
      shifts: [{ from: '15:30', to: '22:00', movesPerSlot: 2 }],
    },
  },
  cabinets: [{ label: 'Cabinet K', limitKw: 180 }],
  chargers: [
    { label: 'K1', maxKw: 40, connector: CCS1, cabinet: null },
    { label: 'K2', maxKw: 40, connector: CCS1, cabinet: null },
    { label: 'K3', maxKw: 40, connector: CCS1, cabinet: null },
    { label: 'K4', maxKw: 40, connector: CCS1, cabinet: null },
    { label: 'K5', maxKw: 40, connector: CCS1, cabinet: null },
    { label: 'K6', maxKw: 40, connector: CCS1, cabinet: null },
    { label: 'F1', maxKw: 150, connector: CCS1, cabinet: 'Cabinet K' },
    { label: 'F2', maxKw: 150, connector: CCS1, cabinet: 'Cabinet K' },
  ],
  chargerIdentity: (label, tag) => (tag ? `KHD-${tag}-${label}` : `KHD-${label}`),
  buses: Array.from({ length: 12 }, (_, i) => ({
    number: String(301 + i),
    usableKwh: i < 4 ? 226 : 155,
    maxChargeKw: i < 4 ? 150 : 60,
    connector: CCS1,
    kwhPerMile: i < 4 ? 1.35 : 1.1,
    ceilingPct: 90,
    reservePct: 15,
    taperStartPct: 85,
  })),
  ratePlan: {
    name: 'Bluestem Rural Electric: Large Power with Ratchet (invented)',
    definition: {
      currency: 'USD',
      seasons: [
        {
          name: 'All year',
          fromMonth: 1,
          toMonth: 12,
          offPeakPrice: 0.071,
          facilityDemandCharge: 11.5,
          periods: [
            {
              name: 'on-peak',
              price: 0.19,
              demandCharge: 6,
              windows: [{ dayTypes: ['weekday'], from: '14:00', to: '19:00' }],
            },
          ],
          energyBlocks: [],
        },
      ],
      fixedCharges: [{ name: 'Service charge', amount: 60, per: 'month' }],
      holidays: ['2026-12-25', '2027-01-01'],
      demandRatchet: { percent: 80, months: 11 },
      minimumCharge: null,
    },
  },
  // Longer country runs, fewer buses: pull-outs from 05:50, back by 16:40.
  runsForBus: (i) => {
    const hhmm = (m: number) => `${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`;
    const out = 5 * 60 + 50 + ((i * 9) % 40);
    const back = out + 140 + (i % 3) * 10;
    const pmOut = 14 * 60 + ((i * 7) % 30);
    const pmIn = pmOut + 130 + (i % 4) * 10;
    return [
      { pullOut: hhmm(out), pullIn: hhmm(back), miles: 30 + ((i * 11) % 15) },
      { pullOut: hhmm(pmOut), pullIn: hhmm(pmIn), miles: 28 + ((i * 5) % 15), arrivalSocPct: 17 + ((i * 23) % 11) },
    ];
  },
  peaks: { facilityKw: 236, periodsKw: { 'on-peak': 64 }, previousPeriod: true },
  yardUser: { email: 'yard2@demo.nightyard.example', name: 'Ines Marchetti' },
};

/**
 * A large depot by the river: thirty-six buses, sixteen 60 kW chargers and six 150 kW ones on two
 * power cabinets. Its utility prices by season: a summer afternoon peak, and in winter a morning
 * and an evening peak (the morning one falls on the pull-outs).
 */
export const sandpiperDemoDepot: DemoDistrictDepot = {
  key: 'sandpiper',
  depot: {
    name: 'Sandpiper Reach Depot',
    timezone: 'America/Chicago',
    serviceLimitKw: 900,
    otherLoadProfileKw: [
      35, 35, 35, 35, 36, 40, 52, 64, 70, 72, 72, 72, 72, 72, 70, 68, 62, 54, 46, 42, 40, 38, 36, 35,
    ],
    billingStartDay: 15,
    yardCrew: {
      minPlugInMinutes: 45,
      driversPlugIn: true,
      shifts: [
        { from: '14:30', to: '23:30', movesPerSlot: 4 },
        { from: '04:00', to: '06:30', movesPerSlot: 3 },
      ],
    },
  },
  cabinets: [
    { label: 'Cabinet North', limitKw: 300 },
    { label: 'Cabinet South', limitKw: 300 },
  ],
  chargers: [
    ...Array.from({ length: 16 }, (_, i) => ({
      label: `S${i + 1}`,
      maxKw: 60,
      connector: CCS1,
      cabinet: null,
    })),
    ...['N1', 'N2', 'N3'].map((label) => ({ label, maxKw: 150, connector: CCS1, cabinet: 'Cabinet North' })),
    ...['R1', 'R2', 'R3'].map((label) => ({ label, maxKw: 150, connector: CCS1, cabinet: 'Cabinet South' })),
  ],
  chargerIdentity: (label, tag) => (tag ? `SRD-${tag}-${label}` : `SRD-${label}`),
  buses: Array.from({ length: 36 }, (_, i) => ({
    number: String(401 + i),
    usableKwh: i < 24 ? 196 : 282,
    maxChargeKw: i < 24 ? 80 : 150,
    connector: CCS1,
    kwhPerMile: i < 24 ? 1.25 : 1.55,
    ceilingPct: 90,
    reservePct: 15,
    taperStartPct: 85,
  })),
  ratePlan: {
    name: 'Larkspur Municipal Utilities: Seasonal TOU (invented)',
    definition: {
      currency: 'USD',
      seasons: [
        {
          name: 'Summer',
          fromMonth: 5,
          toMonth: 9,
          offPeakPrice: 0.082,
          facilityDemandCharge: 6,
          periods: [
            {
              name: 'on-peak',
              price: 0.27,
              demandCharge: 18,
              windows: [{ dayTypes: ['weekday'], from: '13:00', to: '19:00' }],
            },
          ],
          energyBlocks: [],
        },
        {
          name: 'Winter',
          fromMonth: 10,
          toMonth: 4,
          offPeakPrice: 0.064,
          facilityDemandCharge: 6,
          periods: [
            {
              name: 'on-peak',
              price: 0.16,
              demandCharge: 8.5,
              windows: [
                { dayTypes: ['weekday'], from: '06:00', to: '09:00' },
                { dayTypes: ['weekday'], from: '17:00', to: '21:00' },
              ],
            },
          ],
          energyBlocks: [],
        },
      ],
      fixedCharges: [
        { name: 'Customer charge', amount: 120, per: 'month' },
        { name: 'Metering', amount: 0.9, per: 'day' },
      ],
      holidays: ['2026-12-25', '2027-01-01'],
      demandRatchet: null,
      minimumCharge: null,
    },
  },
  // The city routes of the original depot, with more buses on them.
  runsForBus: (i) => demoRunsForBus(i),
  peaks: { facilityKw: 410, periodsKw: { 'on-peak': 150 }, previousPeriod: false },
  yardUser: { email: 'yard3@demo.nightyard.example', name: 'Callum Achterberg' },
};

/** The whole demo district: the original depot first. */
export const demoDistrictDepots: readonly DemoDistrictDepot[] = [mainDemoDepot, kestrelDemoDepot, sandpiperDemoDepot];
