import { emptyPlugMap, type PlugMap, type Problem, type Stay } from './problem.js';

// Stage 1 of the two-stage method: which stay (a bus's visit to the depot) goes on which
// charger, and in which window of slots. Each stay gets at most one charger (one plug-in per
// stay: every swap is a person walking across the yard at night); a charger serves its stays
// one after another. Stage 2 (the LP) then decides the power inside the windows.

export interface Assignment {
  /** Charger of each stay (-1: not plugged). */
  chargerOf: Int32Array;
  /** Window [from, to) of each stay on its charger. */
  from: Int32Array;
  to: Int32Array;
  /** Stays on each charger, in service order. */
  sequence: number[][];
}

export interface AssignmentHints {
  /** Grid kWh each stay receives in the lower-bound LP: how much charging it needs. */
  energy: Float64Array;
  /** Weight of each slot for charging (the lower bound's site load): where cheap time is. */
  weight: Float64Array;
  /** Grid kW per bus per slot in the lower bound: when each stay would like to charge. */
  power: Float64Array[];
  /** Energy-weighted mean slot of each stay's charging in the lower bound (service order). */
  centre: Float64Array;
  /** How stage 1 orders a charger's stays and places hand-overs (variants are compared). */
  order?: 'departure' | 'best';
  handover?: 'share' | 'least-cut';
}

export function cloneAssignment(a: Assignment): Assignment {
  return {
    chargerOf: a.chargerOf.slice(),
    from: a.from.slice(),
    to: a.to.slice(),
    sequence: a.sequence.map((s) => s.slice()),
  };
}

/**
 * Stay j taken off its charger, in place: the stay before it there keeps the charger until the
 * one after it (or until j's end), or else the one after it starts at j's start, so the crew's
 * hand-overs around j become one. Returns the assignment.
 */
export function takeOff(problem: Problem, a: Assignment, j: number): Assignment {
  const cj = a.chargerOf[j]!;
  if (cj < 0) return a;
  const seq = a.sequence[cj]!;
  const i = seq.indexOf(j);
  const p = i > 0 ? seq[i - 1]! : -1;
  const n = i < seq.length - 1 ? seq[i + 1]! : -1;
  if (p >= 0) a.to[p] = Math.min(problem.stays[p]!.departSlot, n >= 0 ? a.from[n]! : a.to[j]!);
  else if (n >= 0) a.from[n] = Math.max(problem.stays[n]!.arriveSlot, a.from[j]!);
  a.sequence[cj] = seq.filter((x) => x !== j);
  a.chargerOf[j] = -1;
  return a;
}

export function usablePower(problem: Problem, stay: Stay, charger: number): number {
  return Math.min(problem.buses[stay.bus]!.maxKw, problem.chargers[charger]!.maxKw);
}

/** Stays on a charger are served in the order the lower bound charges them (then departure). */
export function sortSequence(
  problem: Problem,
  hints: AssignmentHints,
  seq: number[],
  by: 'centre' | 'departure' = 'centre',
): void {
  seq.sort((x, y) => {
    const a = problem.stays[x]!;
    const b = problem.stays[y]!;
    const key = by === 'centre' ? hints.centre[x]! - hints.centre[y]! : 0;
    return key || a.departSlot - b.departSlot || a.arriveSlot - b.arriveSlot || a.id - b.id;
  });
}

/**
 * Places the hand-overs between consecutive stays on one charger: each stay gets a share of
 * the charger's weighted time in proportion to its energy, within the times it is present.
 */
export function layoutCharger(problem: Problem, hints: AssignmentHints, assignment: Assignment, charger: number): void {
  const seq = assignment.sequence[charger]!;
  const w = hints.weight;
  const T = problem.slotCount;
  const prefix = new Float64Array(T + 1);
  for (let t = 0; t < T; t++) prefix[t + 1] = prefix[t]! + w[t]! + 1e-6;
  const cap = (x: number, y: number) => (y > x ? prefix[y]! - prefix[x]! : 0);
  let start = seq.length ? problem.stays[seq[0]!]!.arriveSlot : 0;
  for (let i = 0; i < seq.length; i++) {
    const s = problem.stays[seq[i]!]!;
    start = Math.max(start, s.arriveSlot);
    if (i === seq.length - 1) {
      assignment.from[s.id] = Math.min(start, s.departSlot);
      assignment.to[s.id] = s.departSlot;
      break;
    }
    const next = problem.stays[seq[i + 1]!]!;
    const lastEnd = problem.stays[seq[seq.length - 1]!]!.departSlot;
    let remaining = 0;
    for (let j = i; j < seq.length; j++) remaining += hints.energy[seq[j]!]! + 1e-3;
    const share = (hints.energy[s.id]! + 1e-3) / remaining;
    const target = cap(start, lastEnd) * share;
    // Earliest hand-over whose weighted time covers this stay's share.
    let h = start;
    while (h < T && cap(start, h) < target) h++;
    let lo = Math.max(start, Math.min(next.arriveSlot, s.departSlot));
    let hi = Math.min(Math.max(s.departSlot, next.arriveSlot), Math.max(next.departSlot - 1, lo));
    if (hints.handover !== 'share') {
      // Leave each of the two stays the slots it needs at full power, where that is possible.
      const needA = Math.ceil(hints.energy[s.id]! / (usablePower(problem, s, charger) * problem.slotHours) - 1e-9);
      const needB = Math.ceil(
        hints.energy[next.id]! / (usablePower(problem, next, charger) * problem.slotHours) - 1e-9,
      );
      const lo2 = Math.max(lo, start + needA);
      const hi2 = Math.min(hi, next.departSlot - needB);
      if (lo2 <= hi2) {
        lo = lo2;
        hi = hi2;
      }
    }
    h = Math.min(Math.max(h, lo), hi);
    if (hints.handover !== 'share') h = leastLostHandover(hints.power, s, next, lo, hi, h, T);
    assignment.from[s.id] = Math.min(start, s.departSlot);
    assignment.to[s.id] = Math.max(Math.min(h, s.departSlot), assignment.from[s.id]!);
    start = Math.max(h, next.arriveSlot);
  }
}

/**
 * The hand-over slot in [lo, hi] from stay `s` to the next stay on its charger that cuts least of
 * the two stays' charging in the lower bound (`power`: kW per bus per slot); ties go to the slot
 * nearest `h`.
 */
export function leastLostHandover(
  power: Float64Array[],
  s: { bus: number; departSlot: number },
  next: { bus: number; arriveSlot: number },
  lo: number,
  hi: number,
  h: number,
  T: number,
): number {
  const pa = power[s.bus]!;
  const pb = power[next.bus]!;
  let lost = 0;
  for (let t = lo; t < Math.min(s.departSlot, T); t++) lost += pa[t]!;
  let bestLost = Infinity;
  let bestH = h;
  for (let x = lo; x <= hi; x++) {
    const score = lost + 1e-6 * Math.abs(x - h);
    if (score < bestLost - 1e-12) {
      bestLost = score;
      bestH = x;
    }
    if (x < s.departSlot) lost -= pa[x]!;
    if (x >= next.arriveSlot) lost += pb[x]!;
  }
  return bestH;
}

/** How badly a charger's windows serve its stays: energy that cannot fit, then lower-bound
 *  charging left outside the windows. */
export function layoutScore(problem: Problem, hints: AssignmentHints, assignment: Assignment, charger: number): number {
  const dt = problem.slotHours;
  let score = 0;
  for (const id of assignment.sequence[charger]!) {
    const stay = problem.stays[id]!;
    const from = assignment.from[id]!;
    const to = assignment.to[id]!;
    const cap = usablePower(problem, stay, charger) * dt * Math.max(0, to - from);
    score += 1000 * Math.max(0, hints.energy[id]! - cap);
    const p = hints.power[stay.bus]!;
    for (let t = stay.arriveSlot; t < stay.departSlot; t++) if (t < from || t >= to) score += p[t]! * dt;
  }
  return score;
}

export function permutations(xs: number[]): number[][] {
  if (xs.length <= 1) return [xs.slice()];
  const out: number[][] = [];
  xs.forEach((x, i) => {
    for (const rest of permutations([...xs.slice(0, i), ...xs.slice(i + 1)])) out.push([x, ...rest]);
  });
  return out;
}

/**
 * Orders a charger's stays and places the hand-overs: every order for a few stays, a handful
 * of natural orders for more; the one whose windows fit the stays' energy best wins.
 */
export function arrangeCharger(
  problem: Problem,
  hints: AssignmentHints,
  assignment: Assignment,
  charger: number,
): void {
  const seq = assignment.sequence[charger]!;
  if (hints.order !== 'best') {
    sortSequence(problem, hints, seq, 'departure');
    layoutCharger(problem, hints, assignment, charger);
    return;
  }
  if (seq.length <= 1) {
    layoutCharger(problem, hints, assignment, charger);
    return;
  }
  const st = problem.stays;
  const candidates =
    seq.length <= 4
      ? permutations(seq)
      : [
          seq.slice().sort((x, y) => hints.centre[x]! - hints.centre[y]! || x - y),
          seq
            .slice()
            .sort((x, y) => st[x]!.departSlot - st[y]!.departSlot || st[x]!.arriveSlot - st[y]!.arriveSlot || x - y),
          seq
            .slice()
            .sort((x, y) => st[x]!.arriveSlot - st[y]!.arriveSlot || st[x]!.departSlot - st[y]!.departSlot || x - y),
        ];
  let best: number[] = candidates[0]!;
  let bestScore = Infinity;
  for (const order of candidates) {
    assignment.sequence[charger] = order;
    layoutCharger(problem, hints, assignment, charger);
    const score = layoutScore(problem, hints, assignment, charger);
    if (score < bestScore - 1e-9) {
      bestScore = score;
      best = order;
    }
  }
  assignment.sequence[charger] = best;
  layoutCharger(problem, hints, assignment, charger);
}

export function plugMapOf(problem: Problem, assignment: Assignment): PlugMap {
  const plug = emptyPlugMap(problem);
  for (const stay of problem.stays) {
    const c = assignment.chargerOf[stay.id]!;
    if (c < 0) continue;
    const row = plug[stay.bus]!;
    for (let t = assignment.from[stay.id]!; t < assignment.to[stay.id]!; t++) {
      if (problem.chargers[c]!.available[t]) row[t] = c;
    }
  }
  return plug;
}

/**
 * Sequencing heuristic: stays in order of departure (earliest deadline first), each to the
 * charger where it can start soonest, and among those to the weakest charger that serves it at
 * full power (strong chargers stay free for the buses that need them).
 */
export function initialAssignment(problem: Problem, hints: AssignmentHints): Assignment {
  const n = problem.stays.length;
  const assignment: Assignment = {
    chargerOf: new Int32Array(n).fill(-1),
    from: new Int32Array(n),
    to: new Int32Array(n),
    sequence: problem.chargers.map(() => []),
  };
  const dt = problem.slotHours;
  const jobs = problem.stays.filter((s) => s.departSlot > s.arriveSlot && hints.energy[s.id]! > 1e-6);
  jobs.sort(
    (x, y) =>
      x.departSlot - y.departSlot ||
      x.arriveSlot - y.arriveSlot ||
      hints.energy[y.id]! - hints.energy[x.id]! ||
      x.id - y.id,
  );
  const free = new Int32Array(problem.chargers.length);
  for (const job of jobs) {
    let best = -1;
    let bestKey: number[] = [];
    for (const c of problem.chargers) {
      const power = usablePower(problem, job, c.index);
      const need = Math.ceil(hints.energy[job.id]! / (power * dt) - 1e-9);
      const start = Math.max(job.arriveSlot, free[c.index]!);
      const fits = start + need <= job.departSlot ? 0 : 1;
      const shortBy = Math.max(0, start + need - job.departSlot) * power;
      const powerFit = power >= problem.buses[job.bus]!.maxKw - 1e-9 ? c.maxKw : 1e6 - power;
      const key = [fits, fits ? shortBy : 0, start, assignment.sequence[c.index]!.length, powerFit, c.index];
      if (best < 0 || lexLess(key, bestKey)) {
        best = c.index;
        bestKey = key;
      }
    }
    if (best < 0) continue;
    const power = usablePower(problem, job, best);
    const start = Math.max(job.arriveSlot, free[best]!);
    free[best] = Math.min(job.departSlot, start + Math.ceil(hints.energy[job.id]! / (power * dt) - 1e-9));
    assignment.chargerOf[job.id] = best;
    assignment.sequence[best]!.push(job.id);
  }
  for (const c of problem.chargers) arrangeCharger(problem, hints, assignment, c.index);
  return assignment;
}

function lexLess(a: number[], b: number[]): boolean {
  for (let i = 0; i < a.length; i++) {
    if (a[i]! < b[i]!) return true;
    if (a[i]! > b[i]!) return false;
  }
  return false;
}
