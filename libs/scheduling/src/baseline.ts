import { costLoad, type Cost } from './tariff.js';
import type { Problem } from './problem.js';

export interface Baseline {
  kind: BaselineKind;
  /** Charger efficiency (battery kWh per grid kWh), as in the problem. */
  eta: number;
  cost: Cost;
  /** Site charging load per slot (kW). */
  chargingKw: Float64Array;
  /** Grid kW per bus per slot. */
  power: Float64Array[];
  peakKw: number;
  /** Never true when the building's load leaves room for charging; kept as a check. */
  exceedsSiteLimit: boolean;
  /** kWh below the plan's departure energy, summed over stays (a baseline may not keep up). */
  shortfallKwh: number;
}

/** Most grid kW a bus accepts in a slot given its energy at the slot's start. */
export function acceptance(problem: Problem, b: number, e: number, powerCap: number, taper = true): number {
  const bus = problem.buses[b]!;
  let p = Math.min(bus.maxKw, powerCap);
  if (taper && bus.taperFromKwh !== null && e > bus.taperFromKwh) {
    p = Math.min(p, (bus.maxKw * (bus.usableKwh - e)) / (bus.usableKwh - bus.taperFromKwh));
  }
  p = Math.min(p, (bus.ceilingKwh - e) / (problem.eta * problem.slotHours));
  return Math.max(0, p);
}

export type BaselineKind = 'arrival' | 'timer';

/**
 * What the depot would do without a plan, inside the same physical limits as the plan (service
 * limit net of the building's load, cabinets, chargers: a main breaker or a charger's own load
 * sharing would enforce them) and aiming at the same departure energy the plan delivers:
 * - arrival ("charge on arrival"): a bus is plugged into the first free charger when it pulls in
 *   and charges at the most the limits allow until it holds the plan's departure energy or
 *   leaves; a bus that finds no free charger waits, and a charger whose bus is done goes to the
 *   bus that has waited longest;
 * - timer: the same, but a stay's charging starts no earlier than the cheapest window of that
 *   stay opens (its first slot at the lowest price between arrival and departure) - the one
 *   setting a depot timer offers.
 * When limits bind, power is shared in proportion to what each bus would take (cabinet first,
 * then the site). `targetKwh[bus][stay]` is the plan's battery energy at each departure.
 */
export function limitedBaseline(
  problem: Problem,
  targetKwh: readonly (readonly number[])[],
  kind: BaselineKind,
): Baseline {
  const { slotCount: T, slotHours: dt, eta } = problem;
  const energy = problem.buses.map((b) => b.arrivalKwh);
  const power = problem.buses.map(() => new Float64Array(T));
  const occupant = new Int32Array(problem.chargers.length).fill(-1);
  const stayOf = problem.buses.map(() => -1);
  const queue: number[] = [];
  const charging = new Float64Array(T);
  let shortfall = 0;
  const opensAt = problem.stays.map((stay) =>
    kind === 'timer' ? cheapestWindowOpens(problem, stay.arriveSlot, stay.departSlot) : stay.arriveSlot,
  );
  const starts = problem.stays
    .slice()
    .sort((x, y) => opensAt[x.id]! - opensAt[y.id]! || x.arriveMs - y.arriveMs || x.bus - y.bus);
  let next = 0;
  // Most a bus takes in a slot: its own acceptance, capped at what is left to its target.
  const wants = (b: number, cap: number) => {
    const k = stayOf[b]!;
    const left = (targetKwh[b]?.[k] ?? 0) - energy[b]!;
    return left <= 1e-9 ? 0 : Math.min(acceptance(problem, b, energy[b]!, cap, true), left / (eta * dt));
  };
  for (let t = 0; t < T; t++) {
    for (const bus of problem.buses) {
      const k = stayOf[bus.index]!;
      if (k >= 0 && t >= bus.stays[k]!.departSlot) leave(bus.index);
    }
    while (next < starts.length && opensAt[starts[next]!.id]! <= t) {
      const stay = starts[next++]!;
      if (stay.departSlot <= t) {
        depart(stay.bus, stay.indexOnBus);
        continue;
      }
      stayOf[stay.bus] = stay.indexOnBus;
      queue.push(stay.bus);
    }
    for (let c = 0; c < occupant.length; c++) {
      const b = occupant[c]!;
      if (b >= 0 && wants(b, problem.chargers[c]!.maxKw) <= 1e-9) occupant[c] = -1;
    }
    for (let c = 0; c < occupant.length && queue.length; c++) {
      if (occupant[c]! >= 0 || !problem.chargers[c]!.available[t]) continue;
      while (queue.length) {
        const b = queue.shift()!;
        if (wants(b, problem.chargers[c]!.maxKw) <= 1e-9) continue;
        occupant[c] = b;
        break;
      }
    }
    const want = new Float64Array(occupant.length);
    for (let c = 0; c < occupant.length; c++) {
      const b = occupant[c]!;
      if (b >= 0 && problem.chargers[c]!.available[t]) want[c] = wants(b, problem.chargers[c]!.maxKw);
    }
    for (const cab of problem.cabinets) {
      const sum = cab.chargers.reduce((a, c) => a + want[c]!, 0);
      if (sum > cab.limitKw) for (const c of cab.chargers) want[c] = (want[c]! * cab.limitKw) / sum;
    }
    const site = Math.max(0, problem.slots[t]!.limitKw - problem.slots[t]!.otherKw);
    const total = want.reduce((a, w) => a + w, 0);
    if (total > site) for (let c = 0; c < want.length; c++) want[c] = (want[c]! * site) / total;
    for (let c = 0; c < occupant.length; c++) {
      const b = occupant[c]!;
      if (b < 0) continue;
      power[b]![t] = want[c]!;
      energy[b] = energy[b]! + eta * dt * want[c]!;
      charging[t] = charging[t]! + want[c]!;
    }
  }
  for (const bus of problem.buses) if (stayOf[bus.index]! >= 0) leave(bus.index);

  function leave(b: number) {
    const k = stayOf[b]!;
    stayOf[b] = -1;
    for (let c = 0; c < occupant.length; c++) if (occupant[c] === b) occupant[c] = -1;
    const i = queue.indexOf(b);
    if (i >= 0) queue.splice(i, 1);
    depart(b, k);
  }
  function depart(b: number, k: number) {
    const stay = problem.buses[b]!.stays[k]!;
    // Short of the plan's departure energy (a stay that never reached the queue counts too).
    shortfall += Math.max(0, (targetKwh[b]?.[k] ?? 0) - energy[b]!);
    energy[b] = energy[b]! - stay.runKwh;
  }

  const cost = costLoad(problem.slots, charging, problem.tariff, dt);
  let exceeds = false;
  for (let t = 0; t < T; t++)
    if (charging[t]! + problem.slots[t]!.otherKw > problem.slots[t]!.limitKw + 1e-6) exceeds = true;
  return {
    kind,
    eta,
    cost,
    chargingKw: charging,
    power,
    peakKw: cost.peakKw,
    exceedsSiteLimit: exceeds,
    shortfallKwh: shortfall,
  };
}

/** The first slot of [a, d) at the lowest price in it (a when the stay has no slot). */
function cheapestWindowOpens(problem: Problem, a: number, d: number): number {
  let best = a;
  for (let t = a + 1; t < d; t++) if (problem.slots[t]!.price < problem.slots[best]!.price - 1e-12) best = t;
  return best;
}
