import { acceptance } from './baseline.js';
import type { Solver } from './highs-solver.js';
import { buildChargeModel } from './lp-model.js';
import type { PlugMap, Problem } from './problem.js';

export type ShortReason = 'dwell' | 'charger' | 'cabinet' | 'site' | 'taper';

/**
 * kWh short at each departure if the bus had a charger of `powerCap` kW to itself for every
 * whole slot of every stay: charging as early as possible maximises the energy at every later
 * moment, so this is the most the bus could hold.
 */
export function soloShortfall(problem: Problem, b: number, powerCap: number, taper: boolean): number {
  const bus = problem.buses[b]!;
  let e = bus.arrivalKwh;
  let worst = 0;
  for (const stay of bus.stays) {
    for (let t = stay.a; t < stay.d; t++) e += problem.eta * problem.slotHours * acceptance(problem, b, e, powerCap, taper);
    worst = Math.max(worst, stay.requiredKwh - e);
    e -= stay.runKwh;
  }
  return Math.max(0, worst);
}

function strongest(problem: Problem): number {
  return Math.max(0, ...problem.chargers.filter((c) => c.available.some((a) => a === 1)).map((c) => c.maxKw));
}

/**
 * Why a short bus is short. First its own limits, alone on the strongest charger: a charger
 * weaker than the bus accepts ("charger"), the taper ("taper"), or simply too few slots at the
 * depot ("dwell"). If alone it could be served, the shared limits are lifted one at a time on
 * the plan's own assignment: the one whose lifting serves the bus ("site" or "cabinet") binds;
 * if neither does, the bus lacks charger time ("charger").
 */
export function explainShortfalls(
  problem: Problem,
  solver: Solver,
  plug: PlugMap,
  shortByBus: Float64Array,
  tolerance = 1e-3,
): (ShortReason | null)[] {
  const reasons: (ShortReason | null)[] = problem.buses.map(() => null);
  const shared: number[] = [];
  const strong = strongest(problem);
  for (const bus of problem.buses) {
    if (shortByBus[bus.index]! <= tolerance) continue;
    const own = soloShortfall(problem, bus.index, strong, true);
    if (own > tolerance) {
      if (soloShortfall(problem, bus.index, Infinity, true) <= tolerance) reasons[bus.index] = 'charger';
      else if (soloShortfall(problem, bus.index, strong, false) <= tolerance) reasons[bus.index] = 'taper';
      else reasons[bus.index] = 'dwell';
    } else {
      shared.push(bus.index);
    }
  }
  if (shared.length === 0) return reasons;
  const shortWith = (variant: { siteUnlimited?: boolean; cabinetsUnlimited?: boolean }) => {
    const model = buildChargeModel(problem, { mode: 'assigned', plug, ...variant });
    const res = solver.solve(model.lp);
    const out = new Float64Array(problem.buses.length);
    if (res.status !== 'optimal') return out.fill(Infinity);
    for (const stay of problem.stays) {
      const c = model.shortCol[stay.id]!;
      if (c >= 0) out[stay.bus] = Math.max(out[stay.bus]!, res.x[c]!);
    }
    return out;
  };
  const noSite = shortWith({ siteUnlimited: true });
  const hasCabinets = problem.cabinets.some((c) => c.binding);
  const noCabinet = hasCabinets ? shortWith({ cabinetsUnlimited: true }) : null;
  for (const b of shared) {
    const base = shortByBus[b]!;
    const siteGain = base - noSite[b]!;
    const cabinetGain = noCabinet ? base - noCabinet[b]! : 0;
    if (siteGain > tolerance && siteGain >= cabinetGain) reasons[b] = 'site';
    else if (cabinetGain > tolerance) reasons[b] = 'cabinet';
    else reasons[b] = 'charger';
  }
  return reasons;
}
