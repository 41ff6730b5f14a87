import { localToMillis, type Scenario } from './scenario.js';
import { buildSlots, type Slot } from './slots.js';
import { tariffOf, type Tariff } from './tariff.js';

/** One stay of a bus at the depot, in slot indices: charging is possible in slots [a, d). */
export interface Stay {
  bus: number;
  /** Position among the bus's stays. */
  indexOnBus: number;
  /** Global index among all stays (a "job" for the charger assignment). */
  id: number;
  arriveMs: number;
  departMs: number;
  arriveSlot: number;
  departSlot: number;
  departMinKwh: number;
  /** Battery energy the bus must hold at this departure: departMin, and for a run to another
   *  stay also the run's energy plus the reserve, since the reserve holds while at the depot. */
  requiredKwh: number;
  runKwh: number;
  /** Energy consumed by runs before this stay (kWh). */
  runsBeforeKwh: number;
}

export interface Bus {
  id: string;
  index: number;
  usableKwh: number;
  maxKw: number;
  arrivalKwh: number;
  /** Ceiling on battery energy; never below the arrival energy (charging cannot discharge). */
  ceilingKwh: number;
  reserveKwh: number;
  taperFromKwh: number | null;
  stays: Stay[];
  /** Slots where the bus is at the depot for the whole slot, in time order. */
  slots: number[];
}

export interface Charger {
  id: string;
  index: number;
  maxKw: number;
  cabinet: number;
  /** Per slot: can the charger be used? (all true today; re-planning will mark faults). */
  available: Uint8Array;
}

export interface Cabinet {
  id: string;
  limitKw: number;
  chargers: number[];
  /** A cabinet whose chargers together cannot exceed its limit never binds. */
  binding: boolean;
}

/** The scenario in solver terms: indices, slots, effective limits. Pure data. */
export interface Problem {
  scenario: Scenario;
  zone: string;
  slots: Slot[];
  slotCount: number;
  slotHours: number;
  eta: number;
  buses: Bus[];
  stays: Stay[];
  chargers: Charger[];
  cabinets: Cabinet[];
  tariff: Tariff;
  /** Cost per kWh of shortfall: above any marginal cost of delivering energy. */
  shortfallPenalty: number;
  /** Number of buses at the depot per slot. */
  present: Int32Array;
  /**
   * Re-planning: per stay, the charger it is already plugged into at the horizon's start (-1:
   * none). Such a stay keeps that charger from its first slot on. Absent: nothing pinned.
   */
  pinned?: Int32Array;
  /** The yard crew's rules (see crew.ts); absent: no minimum plug-in, moves unlimited. */
  yard: YardRules | null;
  /**
   * Re-planning: stays whose bus was already at the depot before the horizon's start, so a
   * plug-in at their first slot is not the driver's on pulling in. Absent: none.
   */
  arrivedEarlier?: Uint8Array;
  /**
   * Re-planning: per stay, the charger and window the plan being carried out gives it from the
   * cut-off on (charger -1: none). A re-plan keeps these where it can (see `keptAssignment`).
   * `shortfallKwh`: what that plan left short in total (the buses still to plan); shortfall up to
   * it is not the fault's doing, and serving it does not justify moving other buses (stable.ts).
   */
  previous?: { chargerOf: Int32Array; from: Int32Array; to: Int32Array; shortfallKwh?: number };
  /** Cost a plan may add to make fewer crew moves or move fewer buses: max(share x cost, amount). */
  tolerance: { share: number; amount: number };
}

/** The crew rules in slot terms. */
export interface YardRules {
  /** Shortest session in slots (a stay shorter than this is plugged for the whole stay). */
  minSlots: number;
  driversPlugIn: boolean;
  /** Crew moves allowed per slot; null: unlimited (no crew windows given). */
  capacity: Int32Array | null;
}

/** 1 in each slot the charger is in service: 0 where a slot overlaps one of its outage spans. */
function outOfServiceSlots(
  slots: readonly { startMs: number; endMs: number }[],
  spans: readonly { from: string; to: string }[],
  zone: string,
): Uint8Array {
  const available = new Uint8Array(slots.length).fill(1);
  for (const span of spans) {
    const from = localToMillis(span.from, zone)!;
    const to = localToMillis(span.to, zone)!;
    slots.forEach((s, t) => {
      if (s.startMs < to && from < s.endMs) available[t] = 0;
    });
  }
  return available;
}

export function prepareProblem(scenario: Scenario): Problem {
  const slots = buildSlots(scenario);
  const T = slots.length;
  const slotMs = scenario.slotMinutes * 60_000;
  const slotHours = scenario.slotMinutes / 60;
  const startMs = slots[0]?.startMs ?? localToMillis(scenario.start, scenario.timezone)!;
  const eta = scenario.efficiency;
  const cabinetIndex = new Map(scenario.cabinets.map((c, i) => [c.id, i]));
  const chargers: Charger[] = scenario.chargers.map((c, index) => ({
    id: c.id,
    index,
    maxKw: c.maxKw,
    cabinet: c.cabinet === undefined ? -1 : cabinetIndex.get(c.cabinet)!,
    available: outOfServiceSlots(slots, c.outOfService ?? [], scenario.timezone),
  }));
  const cabinets: Cabinet[] = scenario.cabinets.map((c, g) => {
    const members = chargers.filter((ch) => ch.cabinet === g).map((ch) => ch.index);
    const sum = members.reduce((acc, i) => acc + chargers[i]!.maxKw, 0);
    return { id: c.id, limitKw: c.limitKw, chargers: members, binding: sum > c.limitKw + 1e-9 };
  });
  const stays: Stay[] = [];
  const present = new Int32Array(T);
  const buses: Bus[] = scenario.buses.map((b, index) => {
    const ceiling = Math.max(b.ceilingKwh ?? b.usableKwh, b.arrivalKwh);
    let runsBefore = 0;
    const busStays: Stay[] = [];
    const busSlots: number[] = [];
    b.stays.forEach((s, k) => {
      const arriveMs = localToMillis(s.arrive, scenario.timezone)!;
      const departMs = localToMillis(s.depart, scenario.timezone)!;
      const a = Math.max(0, Math.ceil((arriveMs - startMs) / slotMs));
      const d = Math.min(T, Math.floor((departMs - startMs) / slotMs));
      const last = k === b.stays.length - 1;
      const required = last ? s.departMinKwh : Math.max(s.departMinKwh, s.runKwh + b.reserveKwh);
      const stay: Stay = {
        bus: index,
        indexOnBus: k,
        id: stays.length,
        arriveMs,
        departMs,
        arriveSlot: a,
        departSlot: Math.max(a, d),
        departMinKwh: s.departMinKwh,
        requiredKwh: required,
        runKwh: s.runKwh,
        runsBeforeKwh: runsBefore,
      };
      runsBefore += s.runKwh;
      stays.push(stay);
      busStays.push(stay);
      for (let t = stay.arriveSlot; t < stay.departSlot; t++) {
        busSlots.push(t);
        present[t]!++;
      }
    });
    return {
      id: b.id,
      index,
      usableKwh: b.usableKwh,
      maxKw: b.maxKw,
      arrivalKwh: b.arrivalKwh,
      ceilingKwh: ceiling,
      reserveKwh: b.reserveKwh,
      taperFromKwh: b.taperFromKwh ?? null,
      stays: busStays,
      slots: busSlots,
    };
  });
  const tariff = tariffOf(scenario);
  let yard: YardRules | null = null;
  if (scenario.yard) {
    const y = scenario.yard;
    let capacity: Int32Array | null = null;
    if (y.crew) {
      capacity = new Int32Array(T);
      const windows = y.crew.map((w) => ({
        from: localToMillis(w.from, scenario.timezone)!,
        to: localToMillis(w.to, scenario.timezone)!,
        moves: w.movesPerSlot,
      }));
      // A slot takes moves if it lies wholly inside a crew window; overlapping windows add up.
      slots.forEach((s, t) => {
        for (const w of windows) if (w.from <= s.startMs && s.endMs <= w.to) capacity![t] = capacity![t]! + w.moves;
      });
    }
    yard = {
      minSlots: Math.ceil(y.minPlugInMinutes / scenario.slotMinutes - 1e-9),
      driversPlugIn: y.driversPlugIn,
      capacity,
    };
  }
  // Delivering one kWh to a battery costs at most (price + every demand rate spread over one
  // slot) / efficiency; a penalty well above that makes the LP serve every kWh it can.
  const maxPrice = Math.max(scenario.tariff.offPeakPrice, ...scenario.tariff.periods.map((p) => p.price));
  const rates = scenario.tariff.facilityDemandCharge + scenario.tariff.periods.reduce((a, p) => a + p.demandCharge, 0);
  const shortfallPenalty = Math.max(10, (20 * (maxPrice + rates / slotHours)) / eta);
  return {
    scenario,
    zone: scenario.timezone,
    slots,
    slotCount: T,
    slotHours,
    eta,
    buses,
    stays,
    chargers,
    cabinets,
    tariff,
    shortfallPenalty,
    present,
    yard,
    tolerance: {
      share: (scenario.yard?.costTolerancePercent ?? 0.5) / 100,
      amount: scenario.yard?.costToleranceAmount ?? 5,
    },
  };
}

/** A plug map: for each bus and slot, the charger it is on (-1: not plugged). */
export type PlugMap = Int32Array[];

export function emptyPlugMap(problem: Problem): PlugMap {
  return problem.buses.map(() => new Int32Array(problem.slotCount).fill(-1));
}
