import type { RatePlanDefinition } from '@nightyard/contracts';

// The demo scenario: an invented school district, depot, utility and fleet. Nothing here
// describes a real organisation; figures are plausible for the trade, not measured.

export const DEMO_PASSWORD = 'nightyard-demo';

export const demoOrganisation = { name: 'Tallgrass Valley School District' };

export const demoUsers = [
  { email: 'admin@demo.nightyard.example', name: 'Avery Lindqvist', roles: ['admin'] },
  { email: 'facilities@demo.nightyard.example', name: 'Marisol Okafor', roles: ['facilities'] },
  { email: 'supervisor@demo.nightyard.example', name: 'Desmond Hale', roles: ['supervisor'] },
  { email: 'yard@demo.nightyard.example', name: 'Rosa Villanueva', roles: ['yard'] },
  { email: 'finance@demo.nightyard.example', name: 'Priya Castellano', roles: ['finance'] },
  { email: 'lead@demo.nightyard.example', name: 'Tomasz Greer', roles: ['supervisor', 'yard'] },
] as const;

export const demoDepot = {
  name: 'Orchard Lane Depot',
  timezone: 'America/Chicago',
  serviceLimitKw: 450,
  // Office, workshop and yard lighting: higher by day, lower at night (kW for hours 0-23).
  otherLoadProfileKw: [22, 22, 22, 22, 22, 24, 30, 38, 44, 46, 46, 46, 46, 46, 46, 44, 40, 34, 28, 26, 24, 24, 22, 22],
  billingStartDay: 1,
  // As many depots staff it: an evening crew and an early-morning crew, no one from 23:30 to 04:30.
  yardCrew: {
    minPlugInMinutes: 45,
    driversPlugIn: true,
    shifts: [
      { from: '15:00', to: '23:30', movesPerSlot: 3 },
      { from: '04:30', to: '07:00', movesPerSlot: 2 },
    ],
  },
};

export const demoCabinets = [{ label: 'Cabinet A', limitKw: 150 }];

const CCS1 = 'SAE J1772 CCS1';

export const demoChargers = [
  { label: 'C1', maxKw: 60, connector: CCS1, cabinet: null },
  { label: 'C2', maxKw: 60, connector: CCS1, cabinet: null },
  { label: 'C3', maxKw: 60, connector: CCS1, cabinet: null },
  { label: 'C4', maxKw: 60, connector: CCS1, cabinet: null },
  { label: 'C5', maxKw: 30, connector: CCS1, cabinet: null },
  { label: 'C6', maxKw: 30, connector: CCS1, cabinet: null },
  { label: 'C7', maxKw: 30, connector: CCS1, cabinet: null },
  { label: 'C8', maxKw: 30, connector: CCS1, cabinet: null },
  { label: 'D1', maxKw: 120, connector: CCS1, cabinet: 'Cabinet A' },
  { label: 'D2', maxKw: 120, connector: CCS1, cabinet: 'Cabinet A' },
] as const;

/** Every demo charger uses this OCPP basic-auth password (security profile 1); invented. */
export const DEMO_CHARGER_PASSWORD = 'orchard-lane-demo-charger';
export const demoChargerIdentity = (label: string, tag?: string) => (tag ? `OLD-${tag}-${label}` : `OLD-${label}`);

/** 24 buses: sixteen large (196 kWh usable) and eight smaller (155 kWh). */
export const demoBuses = Array.from({ length: 24 }, (_, i) => {
  const large = i < 16;
  return {
    number: String(201 + i),
    usableKwh: large ? 196 : 155,
    maxChargeKw: large ? 80 : 60,
    connector: CCS1,
    kwhPerMile: large ? 1.28 : 1.12,
    ceilingPct: 90,
    reservePct: 15,
    taperStartPct: 85,
  };
});

export const demoRatePlan = {
  name: 'Tallgrass Power & Light: Commercial TOU (invented)',
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
          {
            name: 'mid-peak',
            price: 0.13,
            demandCharge: 0,
            windows: [{ dayTypes: ['weekday'], from: '08:00', to: '15:00' }],
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
        periods: [
          {
            name: 'on-peak',
            price: 0.18,
            demandCharge: 9,
            windows: [{ dayTypes: ['weekday'], from: '16:00', to: '20:00' }],
          },
          {
            name: 'mid-peak',
            price: 0.11,
            demandCharge: 0,
            windows: [{ dayTypes: ['weekday'], from: '07:00', to: '16:00' }],
          },
        ],
        energyBlocks: [],
      },
    ],
    fixedCharges: [{ name: 'Customer charge', amount: 45, per: 'month' }],
    holidays: ['2026-12-25', '2027-01-01', '2027-05-31', '2027-07-05', '2027-09-06', '2027-11-25', '2027-12-24'],
    demandRatchet: null,
    minimumCharge: null,
  },
} satisfies { name: string; definition: RatePlanDefinition };

/**
 * A school day's runs for bus index i (0-23): a morning run, a midday layover at the depot and an
 * afternoon run. Deterministic so every seed gives the same week. Times are local wall-clock.
 */
export function demoRunsForBus(
  i: number,
): { pullOut: string; pullIn: string; miles: number; arrivalSocPct?: number }[] {
  const stagger = (i * 7) % 50; // minutes, spreads pull-outs over 06:00-06:50
  const morningOut = 6 * 60 + stagger;
  const morningMiles = 13 + ((i * 13) % 13); // 13-25 miles
  const morningIn = morningOut + 110 + (i % 4) * 10;
  const afternoonOut = 13 * 60 + 55 + ((i * 11) % 40);
  const afternoonMiles = 15 + ((i * 17) % 13); // 15-27 miles
  const afternoonIn = afternoonOut + 120 + (i % 5) * 12; // pull-ins 15:55-17:35, into the on-peak
  const hhmm = (m: number) => `${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`;
  return [
    { pullOut: hhmm(morningOut), pullIn: hhmm(morningIn), miles: morningMiles },
    {
      pullOut: hhmm(afternoonOut),
      pullIn: hhmm(afternoonIn),
      miles: afternoonMiles,
      // Back a little above the reserve: each bus left with about what its runs needed, as a plan leaves it.
      arrivalSocPct: 16 + ((i * 19) % 11),
    },
  ];
}

/** An invented early-winter week: forecast lows (°F) by day offset from today. */
export function demoForecastLowF(dayOffset: number): number {
  return [31, 27, 22, 35, 40, 18, 25, 29, 33][(dayOffset + 1) % 9]!;
}
