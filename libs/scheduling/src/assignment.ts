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
}

export function cloneAssignment(a: Assignment): Assignment {
  return {
    chargerOf: a.chargerOf.slice(),
    from: a.from.slice(),
    to: a.to.slice(),
    sequence: a.sequence.map((s) => s.slice()),
  };
}

export function usablePower(problem: Problem, stay: Stay, charger: number): number {
  return Math.min(problem.buses[stay.bus]!.maxKw, problem.chargers[charger]!.maxKw);
}

/** Stays on a charger are served in order of departure (then arrival). */
export function sortSequence(problem: Problem, seq: number[]): void {
  seq.sort((x, y) => {
    const a = problem.stays[x]!;
    const b = problem.stays[y]!;
    return a.d - b.d || a.a - b.a || a.id - b.id;
  });
}

/**
 * Places the hand-overs between consecutive stays on one charger: each stay gets a share of
 * the charger's weighted time in proportion to its energy, within the times it is present.
 */
export function layoutCharger(problem: Problem, hints: AssignmentHints, assignment: Assignment, charger: number): void {
  const seq = assignment.sequence[charger]!;
  sortSequence(problem, seq);
  const w = hints.weight;
  const T = problem.T;
  const prefix = new Float64Array(T + 1);
  for (let t = 0; t < T; t++) prefix[t + 1] = prefix[t]! + w[t]! + 1e-6;
  const cap = (x: number, y: number) => (y > x ? prefix[y]! - prefix[x]! : 0);
  let start = seq.length ? problem.stays[seq[0]!]!.a : 0;
  for (let i = 0; i < seq.length; i++) {
    const s = problem.stays[seq[i]!]!;
    start = Math.max(start, s.a);
    if (i === seq.length - 1) {
      assignment.from[s.id] = Math.min(start, s.d);
      assignment.to[s.id] = s.d;
      break;
    }
    const next = problem.stays[seq[i + 1]!]!;
    const lastEnd = problem.stays[seq[seq.length - 1]!]!.d;
    let remaining = 0;
    for (let j = i; j < seq.length; j++) remaining += hints.energy[seq[j]!]! + 1e-3;
    const share = (hints.energy[s.id]! + 1e-3) / remaining;
    const target = cap(start, lastEnd) * share;
    // Earliest hand-over whose weighted time covers this stay's share.
    let h = start;
    while (h < T && cap(start, h) < target) h++;
    const lo = Math.max(start, Math.min(next.a, s.d));
    const hi = Math.min(Math.max(s.d, next.a), Math.max(next.d - 1, lo));
    h = Math.min(Math.max(h, lo), hi);
    assignment.from[s.id] = Math.min(start, s.d);
    assignment.to[s.id] = Math.max(Math.min(h, s.d), assignment.from[s.id]!);
    start = Math.max(h, next.a);
  }
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
  const jobs = problem.stays.filter((s) => s.d > s.a && hints.energy[s.id]! > 1e-6);
  jobs.sort((x, y) => x.d - y.d || x.a - y.a || hints.energy[y.id]! - hints.energy[x.id]! || x.id - y.id);
  const free = new Int32Array(problem.chargers.length);
  for (const job of jobs) {
    let best = -1;
    let bestKey: number[] = [];
    for (const c of problem.chargers) {
      const power = usablePower(problem, job, c.index);
      const need = Math.ceil(hints.energy[job.id]! / (power * dt) - 1e-9);
      const start = Math.max(job.a, free[c.index]!);
      const fits = start + need <= job.d ? 0 : 1;
      const shortBy = Math.max(0, start + need - job.d) * power;
      const powerFit = power >= problem.buses[job.bus]!.maxKw - 1e-9 ? c.maxKw : 1e6 - power;
      const key = [fits, fits ? shortBy : 0, start, powerFit, c.index];
      if (best < 0 || lexLess(key, bestKey)) {
        best = c.index;
        bestKey = key;
      }
    }
    if (best < 0) continue;
    const power = usablePower(problem, job, best);
    const start = Math.max(job.a, free[best]!);
    free[best] = Math.min(job.d, start + Math.ceil(hints.energy[job.id]! / (power * dt) - 1e-9));
    assignment.chargerOf[job.id] = best;
    assignment.sequence[best]!.push(job.id);
  }
  for (const c of problem.chargers) layoutCharger(problem, hints, assignment, c.index);
  return assignment;
}

function lexLess(a: number[], b: number[]): boolean {
  for (let i = 0; i < a.length; i++) {
    if (a[i]! < b[i]!) return true;
    if (a[i]! > b[i]!) return false;
  }
  return false;
}
