import { acceptance } from './baseline.js';
import type { Solver } from './highs-solver.js';
import { buildChargeModel } from './lp-model.js';
import type { PlugMap, Problem } from './problem.js';

export type ShortReason = 'dwell' | 'charger' | 'cabinet' | 'site' | 'taper';

/**
 * kWh short per bus on the plan's own assignment with the site limit or the cabinets' limits
 * lifted (the engine passes one that re-solves its live model from the plan's basis).
 */
export type ShortWith = (variant: { siteUnlimited?: boolean; cabinetsUnlimited?: boolean }) => Float64Array;

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
    for (let t = stay.arriveSlot; t < stay.departSlot; t++)
      e += problem.eta * problem.slotHours * acceptance(problem, b, e, powerCap, taper);
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
  lifted?: ShortWith,
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
    if (lifted) return lifted(variant);
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

/** Local clock time "18:40" of an instant in the depot's zone. */
function clock(ms: number, zone: string): string {
  return new Intl.DateTimeFormat('en-GB', {
    timeZone: zone,
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
  }).format(ms);
}

/** The longest stretch inside [from, to) with no crew in the yard, as "from 23:30 to 04:30", or null. */
function crewGap(problem: Problem, from: number, to: number): string | null {
  const cap = problem.yard?.capacity;
  if (!cap) return null;
  let best: [number, number] | null = null;
  let t = from;
  while (t < to) {
    if (cap[t]! > 0) {
      t++;
      continue;
    }
    let u = t;
    while (u < to && cap[u]! === 0) u++;
    if (!best || u - t > best[1] - best[0]) best = [t, u];
    t = u;
  }
  if (!best || best[1] - best[0] < 2) return null;
  const slots = problem.slots;
  return `from ${clock(slots[best[0]]!.startMs, problem.zone)} to ${clock(slots[best[1] - 1]!.endMs, problem.zone)}`;
}

/**
 * The cause of a bus's shortfall in words, for the plan review: what stops it, at which stay
 * (pull-in and pull-out times), and whether that is proven (no plan of one plug-in per stay could
 * serve it) or only what this plan found.
 */
export function describeShortfall(
  problem: Problem,
  b: number,
  reason: ShortReason,
  shortKwh: number,
  proven: boolean,
  /** The stay whose departure misses most; the last by default. */
  stayIndex = -1,
): string {
  const bus = problem.buses[b]!;
  const zone = problem.zone;
  const stay = bus.stays[stayIndex >= 0 ? stayIndex : bus.stays.length - 1]!;
  const span = `between pull-in ${clock(stay.arriveMs, zone)} and pull-out ${clock(stay.departMs, zone)}`;
  // Hundredths below 1 kWh: a shortfall of 0.03 kWh must not read "0 kWh short".
  const kwh = `${shortKwh >= 1 ? Math.round(shortKwh * 10) / 10 : Math.max(0.01, Math.round(shortKwh * 100) / 100)} kWh`;
  let words: string;
  switch (reason) {
    case 'dwell':
      words = `not at the depot long enough: even alone on the strongest charger ${span} it would miss ${kwh}`;
      break;
    case 'taper':
      words = `the battery's taper: even alone on the strongest charger ${span}, it takes charge too slowly near full to gain the last ${kwh}`;
      break;
    case 'site':
      words = `the service limit: the site's power ${span} is taken by the depot's other load and the buses charging then (${kwh} short)`;
      break;
    case 'cabinet':
      words = `the power cabinet's limit: the chargers sharing it cannot all draw full power ${span} (${kwh} short)`;
      break;
    default: {
      const gap = crewGap(problem, stay.arriveSlot, stay.departSlot);
      words = problem.yard
        ? `no charger is free long enough ${span} with the crew's hours${gap ? ` (nobody in the yard ${gap})` : ''} (${kwh} short)`
        : `no charger is free long enough ${span} (${kwh} short)`;
    }
  }
  return `${words}; ${proven ? 'proven: no plan can serve it fully' : 'not proven: this is the best plan found'}`;
}
