import type { ScenarioInput } from '../scenario.js';

// Seeded depot generator for the benchmark and the randomised tests: afternoon pull-ins that
// fall into the evening on-peak, morning pull-outs, 150-250 kWh packs, 60-150 kW chargers.

export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const hhmm = (minutes: number) => {
  const m = ((minutes % 1440) + 1440) % 1440;
  return `${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`;
};

export interface DepotOptions {
  buses: number;
  chargers?: number;
  seed?: number;
  /** Share of chargers at 120-150 kW that sit in pairs on a shared power cabinet. */
  cabinets?: boolean;
}

/** A 24-hour horizon (96 slots) from noon on Wednesday 2026-01-14 (America/Chicago). */
export function generateDepot(options: DepotOptions): ScenarioInput {
  const random = mulberry32(options.seed ?? 1);
  const pick = <T>(xs: readonly T[]) => xs[Math.floor(random() * xs.length)]!;
  const between = (lo: number, hi: number) => lo + (hi - lo) * random();
  const nChargers = options.chargers ?? Math.max(1, Math.floor(options.buses / 2));
  const chargers: { id: string; maxKw: number; cabinet?: string }[] = [];
  const cabinets: { id: string; limitKw: number }[] = [];
  let pending: { id: string; maxKw: number; cabinet?: string } | null = null;
  for (let i = 0; i < nChargers; i++) {
    const maxKw = pick([60, 60, 90, 120, 150]);
    const charger: { id: string; maxKw: number; cabinet?: string } = {
      id: `C${String(i + 1).padStart(3, '0')}`,
      maxKw,
    };
    if (options.cabinets !== false && maxKw >= 120) {
      if (pending) {
        const id = `P${cabinets.length + 1}`;
        cabinets.push({ id, limitKw: Math.round(0.75 * (pending.maxKw + maxKw)) });
        pending.cabinet = id;
        charger.cabinet = id;
        pending = null;
      } else {
        pending = charger;
      }
    }
    chargers.push(charger);
  }
  const buses: ScenarioInput['buses'] = [];
  let chargerKw = 0;
  for (const c of chargers) chargerKw += c.maxKw;
  for (let i = 0; i < options.buses; i++) {
    const usable = Math.round(between(150, 250));
    const arrival = Math.round(usable * between(0.2, 0.5));
    const ceiling = Math.round(usable * 0.92);
    const reserve = Math.round(usable * 0.12);
    const pullIn = Math.round(between(15 * 60, 18 * 60 + 30));
    const pullOut = Math.round(between(5 * 60 + 30, 7 * 60 + 30));
    const need = Math.round(Math.min(ceiling, reserve + usable * between(0.45, 0.72)));
    buses.push({
      id: `B${String(i + 1).padStart(3, '0')}`,
      usableKwh: usable,
      maxKw: pick([80, 100, 120, 150]),
      arrivalKwh: arrival,
      ceilingKwh: ceiling,
      reserveKwh: reserve,
      taperFromKwh: Math.round(usable * 0.85),
      stays: [
        {
          arrive: `2026-01-14T${hhmm(pullIn)}`,
          depart: `2026-01-15T${hhmm(pullOut)}`,
          departMinKwh: Math.max(need, arrival),
        },
      ],
    });
  }
  const other = Math.round(30 + options.buses * 0.5);
  return {
    version: 1,
    timezone: 'America/Chicago',
    start: '2026-01-14T12:00',
    end: '2026-01-15T12:00',
    slotMinutes: 15,
    efficiency: 0.92,
    site: { limitKw: Math.round(other + 0.5 * chargerKw), otherLoadKw: other },
    cabinets,
    chargers,
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
      facilityDemandCharge: 12,
      peaksSoFarKw: { facility: Math.round(other * 1.5), 'on-peak': other },
    },
    buses,
  };
}
