import { costLoad, type Cost } from './tariff.js';
import { prepareProblem, type Problem } from './problem.js';
import type { Scenario } from './scenario.js';

export interface Baseline {
  cost: Cost;
  /** Site charging load per slot (kW). */
  chargingKw: Float64Array;
  /** Grid kW per bus per slot. */
  power: Float64Array[];
  peakKw: number;
  exceedsSiteLimit: boolean;
  /** kWh below the required departure energy, summed over buses (unmanaged charging may fail). */
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

/**
 * Unmanaged charging: a bus is plugged into the first free charger when it pulls in and charges
 * at full power until it reaches its ceiling (then it is unplugged and the charger goes to the
 * bus that has waited longest) or leaves. A cabinet over its limit shares power in proportion.
 * The site limit is not enforced: the baseline reports whether it would have been exceeded.
 */
export function unmanagedBaseline(input: Scenario | Problem): Baseline {
  const problem = 'slots' in input && 'buses' in input && 'stays' in input ? (input as Problem) : prepareProblem(input as Scenario);
  const { T, slotHours: dt, eta } = problem;
  const energy = problem.buses.map((b) => b.arrivalKwh);
  const power = problem.buses.map(() => new Float64Array(T));
  const occupant = new Int32Array(problem.chargers.length).fill(-1);
  const stayOf = problem.buses.map(() => -1);
  const queue: number[] = [];
  const charging = new Float64Array(T);
  let shortfall = 0;
  const starts = problem.stays.slice().sort((x, y) => x.a - y.a || x.arriveMs - y.arriveMs || x.bus - y.bus);
  let next = 0;
  for (let t = 0; t < T; t++) {
    // Departures: the stay's last whole slot has passed.
    for (const bus of problem.buses) {
      const k = stayOf[bus.index]!;
      if (k < 0) continue;
      const stay = bus.stays[k]!;
      if (t >= stay.d) leave(bus.index);
    }
    while (next < starts.length && starts[next]!.a <= t) {
      const stay = starts[next++]!;
      if (stay.d <= t) {
        depart(stay.bus, stay.k);
        continue;
      }
      stayOf[stay.bus] = stay.k;
      queue.push(stay.bus);
    }
    // Full buses give their charger up; waiting buses take free chargers in charger order.
    for (let c = 0; c < occupant.length; c++) {
      const b = occupant[c]!;
      if (b >= 0 && acceptance(problem, b, energy[b]!, problem.chargers[c]!.maxKw, true) <= 1e-9) occupant[c] = -1;
    }
    for (let c = 0; c < occupant.length && queue.length; c++) {
      if (occupant[c]! >= 0 || !problem.chargers[c]!.available[t]) continue;
      while (queue.length) {
        const b = queue.shift()!;
        if (acceptance(problem, b, energy[b]!, problem.chargers[c]!.maxKw, true) <= 1e-9) continue;
        occupant[c] = b;
        break;
      }
    }
    const want = new Float64Array(occupant.length);
    for (let c = 0; c < occupant.length; c++) {
      const b = occupant[c]!;
      if (b >= 0 && problem.chargers[c]!.available[t]) want[c] = acceptance(problem, b, energy[b]!, problem.chargers[c]!.maxKw, true);
    }
    for (const cab of problem.cabinets) {
      const sum = cab.chargers.reduce((a, c) => a + want[c]!, 0);
      if (sum > cab.limitKw) for (const c of cab.chargers) want[c] = (want[c]! * cab.limitKw) / sum;
    }
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
    shortfall += Math.max(0, stay.requiredKwh - energy[b]!);
    energy[b] = energy[b]! - stay.runKwh;
  }

  const cost = costLoad(problem.slots, charging, problem.tariff, dt);
  let exceeds = false;
  for (let t = 0; t < T; t++) if (charging[t]! + problem.slots[t]!.otherKw > problem.slots[t]!.limitKw + 1e-6) exceeds = true;
  return { cost, chargingKw: charging, power, peakKw: cost.peakKw, exceedsSiteLimit: exceeds, shortfallKwh: shortfall };
}
