// Writes the example scenarios beside the engine. Run: npx tsx libs/scheduling/examples/build-examples.ts
// The demo depot is derived from the invented demo data in libs/demo (read only here).
import { writeFileSync } from 'node:fs';
import { demoBuses, demoCabinets, demoChargers, demoDepot, demoRatePlan, demoRunsForBus } from '@nightyard/demo';

const dir = new URL('.', import.meta.url);
const write = (name: string, data: unknown) => writeFileSync(new URL(name, dir), `${JSON.stringify(data, null, 2)}\n`);

// The demo rate plan's shape belongs to the product (it may change); read it loosely.
type Loose = any; // eslint-disable-line @typescript-eslint/no-explicit-any -- read loosely, as said above
const ratePlan: Loose = demoRatePlan;
const definition: Loose = ratePlan.definition ?? ratePlan;
const winter: Loose = definition.seasons.find((s: Loose) => s.name === 'Winter');
const daysOf = (w: Loose): number[] =>
  w.days ?? [
    ...(w.dayTypes.includes('weekday') ? [1, 2, 3, 4, 5] : []),
    ...(w.dayTypes.includes('weekend') ? [6, 7] : []),
  ];
const tariffOf = (season: Loose, peaksSoFarKw: Record<string, number>) => ({
  currency: definition.currency ?? 'USD',
  offPeakPrice: season.offPeakPrice,
  periods: season.periods.map((p: Loose) => ({
    name: p.name,
    price: p.price,
    demandCharge: p.demandCharge,
    windows: p.windows.map((w: Loose) => ({ days: daysOf(w), from: w.from, to: w.to })),
  })),
  facilityDemandCharge: season.facilityDemandCharge ?? definition.facilityDemandCharge,
  peaksSoFarKw,
});

// Demo depot, Wednesday 2026-12-02 noon to Thursday 09:00: the midday layover, the afternoon
// run, the night at the depot, Thursday's pull-out. Cold factor 1.15 on every run (winter).
const COLD = 1.15;
// Flat other load: the format has one value; the horizon's average of the hourly profile.
const hours = [12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22, 23, 0, 1, 2, 3, 4, 5, 6, 7, 8];
const otherLoad = Math.round(hours.reduce((a, h) => a + demoDepot.otherLoadProfileKw[h]!, 0) / hours.length);
const demoBusesOut = demoBuses.map((b, i) => {
  const runs = demoRunsForBus(i);
  const usable = b.usableKwh;
  const ceiling = Math.round(usable * b.ceilingPct) / 100;
  const reserve = Math.round(usable * b.reservePct) / 100;
  const runKwh = (miles: number) => Math.round(miles * b.kwhPerMile * COLD * 10) / 10;
  const [morning, afternoon] = runs;
  const nextDay = runKwh(morning!.miles) + runKwh(afternoon!.miles);
  // Left Wednesday morning at the ceiling; the morning run is behind it at noon.
  const atNoon = Math.round((ceiling - runKwh(morning!.miles)) * 10) / 10;
  return {
    id: b.number,
    usableKwh: usable,
    maxKw: b.maxChargeKw,
    arrivalKwh: atNoon,
    ceilingKwh: ceiling,
    reserveKwh: reserve,
    taperFromKwh: Math.round(usable * b.taperStartPct) / 100,
    stays: [
      {
        arrive: '2026-12-02T12:00',
        depart: `2026-12-02T${afternoon!.pullOut}`,
        departMinKwh: Math.round((runKwh(afternoon!.miles) + reserve) * 10) / 10,
        runKwh: runKwh(afternoon!.miles),
      },
      {
        arrive: `2026-12-02T${afternoon!.pullIn}`,
        depart: `2026-12-03T${morning!.pullOut}`,
        departMinKwh: Math.min(ceiling, Math.round((nextDay + reserve) * 10) / 10),
      },
    ],
  };
});
write('demo-depot.json', {
  version: 1,
  timezone: demoDepot.timezone,
  start: '2026-12-02T12:00',
  end: '2026-12-03T09:00',
  slotMinutes: 15,
  efficiency: 0.92,
  site: { limitKw: demoDepot.serviceLimitKw, otherLoadKw: otherLoad },
  cabinets: demoCabinets.map((c) => ({ id: c.label, limitKw: c.limitKw })),
  chargers: demoChargers.map((c) =>
    c.cabinet ? { id: c.label, maxKw: c.maxKw, cabinet: c.cabinet } : { id: c.label, maxKw: c.maxKw },
  ),
  tariff: tariffOf(winter, { facility: 120, 'on-peak': 60 }),
  buses: demoBusesOut,
});

// Small depot: the format's own example, grown to four buses.
write('small-depot.json', {
  version: 1,
  timezone: 'America/Chicago',
  start: '2026-01-14T12:00',
  end: '2026-01-15T09:00',
  slotMinutes: 15,
  efficiency: 0.92,
  site: { limitKw: 400, otherLoadKw: 25 },
  cabinets: [{ id: 'P1', limitKw: 120 }],
  chargers: [
    { id: 'C1', maxKw: 60, cabinet: 'P1' },
    { id: 'C2', maxKw: 60, cabinet: 'P1' },
    { id: 'C3', maxKw: 30 },
  ],
  tariff: {
    currency: 'USD',
    offPeakPrice: 0.09,
    periods: [
      {
        name: 'on-peak',
        price: 0.27,
        demandCharge: 9.5,
        windows: [{ days: [1, 2, 3, 4, 5], from: '16:00', to: '21:00' }],
      },
      {
        name: 'mid-peak',
        price: 0.14,
        demandCharge: 0,
        windows: [{ days: [1, 2, 3, 4, 5], from: '07:00', to: '16:00' }],
      },
    ],
    facilityDemandCharge: 12.0,
    peaksSoFarKw: { facility: 180, 'on-peak': 0 },
  },
  buses: [
    {
      id: 'B07',
      usableKwh: 196,
      maxKw: 60,
      arrivalKwh: 70,
      ceilingKwh: 176,
      reserveKwh: 30,
      taperFromKwh: 157,
      stays: [{ arrive: '2026-01-14T15:40', depart: '2026-01-15T06:25', departMinKwh: 120 }],
    },
    {
      id: 'B08',
      usableKwh: 196,
      maxKw: 60,
      arrivalKwh: 55,
      ceilingKwh: 176,
      reserveKwh: 30,
      taperFromKwh: 157,
      stays: [{ arrive: '2026-01-14T16:10', depart: '2026-01-15T06:40', departMinKwh: 150 }],
    },
    {
      id: 'B12',
      usableKwh: 155,
      maxKw: 60,
      arrivalKwh: 48,
      ceilingKwh: 140,
      reserveKwh: 23,
      taperFromKwh: 132,
      stays: [{ arrive: '2026-01-14T17:05', depart: '2026-01-15T06:10', departMinKwh: 110 }],
    },
    {
      id: 'B15',
      usableKwh: 155,
      maxKw: 60,
      arrivalKwh: 62,
      ceilingKwh: 140,
      reserveKwh: 23,
      taperFromKwh: 132,
      stays: [{ arrive: '2026-01-14T17:30', depart: '2026-01-15T07:05', departMinKwh: 125 }],
    },
  ],
});

// The night of the autumn clock change (America/Chicago, 2026-11-01: 01:00-02:00 twice), a
// Saturday night: weekend, so the weekday periods do not apply; a night rate runs past midnight.
write('autumn-clock-change.json', {
  version: 1,
  timezone: 'America/Chicago',
  start: '2026-10-31T12:00',
  end: '2026-11-01T12:00',
  slotMinutes: 15,
  efficiency: 0.92,
  site: { limitKw: 300, otherLoadKw: 20 },
  cabinets: [],
  chargers: [
    { id: 'C1', maxKw: 60 },
    { id: 'C2', maxKw: 60 },
    { id: 'C3', maxKw: 90 },
  ],
  tariff: {
    currency: 'USD',
    offPeakPrice: 0.11,
    periods: [
      { name: 'evening', price: 0.22, demandCharge: 6, windows: [{ days: [6, 7], from: '16:00', to: '21:00' }] },
      { name: 'night', price: 0.06, demandCharge: 0, windows: [{ days: [6, 7], from: '23:00', to: '05:00' }] },
    ],
    facilityDemandCharge: 8,
    peaksSoFarKw: { facility: 60 },
  },
  buses: [
    {
      id: 'A1',
      usableKwh: 200,
      maxKw: 80,
      arrivalKwh: 60,
      ceilingKwh: 180,
      reserveKwh: 25,
      taperFromKwh: 170,
      stays: [{ arrive: '2026-10-31T16:30', depart: '2026-11-01T06:30', departMinKwh: 160 }],
    },
    {
      id: 'A2',
      usableKwh: 200,
      maxKw: 80,
      arrivalKwh: 80,
      ceilingKwh: 180,
      reserveKwh: 25,
      taperFromKwh: 170,
      stays: [{ arrive: '2026-10-31T17:15', depart: '2026-11-01T01:30', departMinKwh: 150 }],
    },
    {
      id: 'A3',
      usableKwh: 160,
      maxKw: 60,
      arrivalKwh: 50,
      ceilingKwh: 150,
      reserveKwh: 20,
      stays: [{ arrive: '2026-10-31T18:00', depart: '2026-11-01T07:15', departMinKwh: 130 }],
    },
    {
      id: 'A4',
      usableKwh: 160,
      maxKw: 60,
      arrivalKwh: 40,
      ceilingKwh: 150,
      reserveKwh: 20,
      stays: [{ arrive: '2026-10-31T19:00', depart: '2026-11-01T08:00', departMinKwh: 140 }],
    },
    {
      id: 'A5',
      usableKwh: 220,
      maxKw: 100,
      arrivalKwh: 70,
      ceilingKwh: 200,
      reserveKwh: 25,
      taperFromKwh: 185,
      stays: [{ arrive: '2026-10-31T20:00', depart: '2026-11-01T05:45', departMinKwh: 190 }],
    },
  ],
});

// A depot that cannot serve every bus: one charger too weak, a short dwell, a tight site.
write('cannot-serve-all.json', {
  version: 1,
  timezone: 'America/Chicago',
  start: '2026-02-10T12:00',
  end: '2026-02-11T09:00',
  slotMinutes: 15,
  efficiency: 0.9,
  site: { limitKw: 140, otherLoadKw: 30 },
  cabinets: [],
  chargers: [
    { id: 'C1', maxKw: 60 },
    { id: 'C2', maxKw: 40 },
  ],
  tariff: {
    currency: 'USD',
    offPeakPrice: 0.08,
    periods: [
      {
        name: 'on-peak',
        price: 0.25,
        demandCharge: 10,
        windows: [{ days: [1, 2, 3, 4, 5], from: '15:00', to: '20:00' }],
      },
    ],
    facilityDemandCharge: 10,
    peaksSoFarKw: {},
  },
  buses: [
    {
      id: 'S1',
      usableKwh: 200,
      maxKw: 60,
      arrivalKwh: 40,
      ceilingKwh: 190,
      reserveKwh: 20,
      stays: [{ arrive: '2026-02-10T16:00', depart: '2026-02-11T06:00', departMinKwh: 180 }],
    },
    {
      id: 'S2',
      usableKwh: 200,
      maxKw: 60,
      arrivalKwh: 40,
      ceilingKwh: 190,
      reserveKwh: 20,
      stays: [{ arrive: '2026-02-10T16:30', depart: '2026-02-11T06:15', departMinKwh: 180 }],
    },
    {
      id: 'S3',
      usableKwh: 200,
      maxKw: 60,
      arrivalKwh: 40,
      ceilingKwh: 190,
      reserveKwh: 20,
      stays: [{ arrive: '2026-02-10T17:00', depart: '2026-02-11T06:30', departMinKwh: 180 }],
    },
    {
      id: 'S4',
      usableKwh: 200,
      maxKw: 60,
      arrivalKwh: 60,
      ceilingKwh: 190,
      reserveKwh: 20,
      stays: [{ arrive: '2026-02-10T22:00', depart: '2026-02-10T23:00', departMinKwh: 150 }],
    },
  ],
});
