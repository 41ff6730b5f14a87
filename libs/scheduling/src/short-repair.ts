import {
  arrangeCharger,
  cloneAssignment,
  takeOff,
  usablePower,
  type Assignment,
  type AssignmentHints,
} from './assignment.js';
import { endIsFree, fitCrew, keepsPins, minWindow, startIsFree } from './crew.js';
import { cheaper, type LpResult } from './highs-solver.js';
import type { AssignedModel, SearchResult } from './local-search.js';
import type { Problem } from './problem.js';

// Short buses served on purpose. On large depots the local search draws its moves at random (a
// stay by its dual, a charger uniformly among hundreds), so a bus left short by the construction
// that the relaxation serves is often still short when its budget ends. Here each short stay, the
// most short first, gets the few changes most likely to serve it, each judged by the LP: a move
// to the charger with the most idle energy while it is at the depot (what serves most of them),
// its window widened into what its neighbours on the charger do not need, moves to the next
// chargers by idle energy, a swap with a served bus on another charger. The first change that
// lowers the cost is kept. On the largest depots (`batch`) all short stays are first moved at once,
// each to its own charger, in one LP solve (1,000 buses with the crew: every bus served, where one
// at a time 24 solves left 8-28 kWh short). A counted budget of LP solves (no clock) keeps the
// same scenario giving the same plan.

/**
 * The changes tried per short stay: moves to the chargers with the most idle energy, swaps with
 * served stays.
 */
export const SHORT_REPAIR = { relocations: 3, swaps: 1 };

/**
 * LP solves for repairing a short start (large crew depots) and a short end of the local search:
 * about as much LP work at any size (a solve's cost grows with the stays), 40 and 16 at most (200
 * and 500 buses), 24 and 8 at 1,000.
 */
export function repairSolves(stays: number): { start: number; end: number } {
  return {
    start: Math.max(16, Math.min(40, Math.round(24_000 / stays))),
    end: Math.max(8, Math.min(16, Math.round(8000 / stays))),
  };
}

/** Grid kWh each stay takes in an LP solution (its departure's shortfall, per stay). */
function shortOf(problem: Problem, lp: AssignedModel, res: LpResult): Float64Array {
  const out = new Float64Array(problem.stays.length);
  for (const stay of problem.stays) {
    const c = lp.model.shortCol[stay.id]!;
    if (c >= 0 && res.x.length) out[stay.id] = res.x[c]!;
  }
  return out;
}

/** Slots each charger holds a stay in (1) under an assignment, or is out of service (1). */
function occupancy(problem: Problem, a: Assignment): Uint8Array[] {
  const T = problem.slotCount;
  return problem.chargers.map((charger, c) => {
    const busy = new Uint8Array(T);
    for (let t = 0; t < T; t++) if (!charger.available[t]) busy[t] = 1;
    for (const s of a.sequence[c]!) for (let t = a.from[s]!; t < a.to[s]!; t++) busy[t] = 1;
    return busy;
  });
}

/**
 * The changes tried for one short stay, most promising first: a move to the charger with the most
 * idle energy during its stay, its window widened on its own charger, moves to the next of the
 * `relocations` chargers by idle energy, a swap with one of `swaps` served stays whose charger
 * gives it the most.
 */
function changesFor(
  problem: Problem,
  hints: AssignmentHints,
  best: Assignment,
  j: number,
  busy: Uint8Array[],
  short: Float64Array,
  options: { relocations: number; swaps: number },
  room: Float64Array | null,
): Assignment[] {
  const out: Assignment[] = [];
  let widened = false;
  const stay = problem.stays[j]!;
  const cj = best.chargerOf[j]!;
  const dt = problem.slotHours;
  const slotsNeeded = (s: number, c: number) =>
    Math.ceil(hints.energy[s]! / (Math.max(1e-9, usablePower(problem, problem.stays[s]!, c)) * dt) - 1e-9);
  if (cj >= 0) {
    // Widen: each neighbour keeps the slots it needs at full power (at least one), the rest is j's.
    const trial = cloneAssignment(best);
    const seq = trial.sequence[cj]!;
    const i = seq.indexOf(j);
    let changed = false;
    if (i > 0) {
      const p = seq[i - 1]!;
      const h = Math.max(stay.arriveSlot, trial.from[p]! + Math.max(1, slotsNeeded(p, cj)));
      if (h < trial.from[j]!) {
        trial.from[j] = h;
        trial.to[p] = Math.min(trial.to[p]!, h);
        changed = true;
      }
    } else if (trial.from[j]! > stay.arriveSlot) {
      trial.from[j] = stay.arriveSlot;
      changed = true;
    }
    if (i < seq.length - 1) {
      const n = seq[i + 1]!;
      const h = Math.min(stay.departSlot, trial.to[n]! - Math.max(1, slotsNeeded(n, cj)));
      if (h > trial.to[j]!) {
        trial.to[j] = h;
        trial.from[n] = Math.max(trial.from[n]!, h);
        changed = true;
      }
    } else if (trial.to[j]! < stay.departSlot) {
      trial.to[j] = stay.departSlot;
      changed = true;
    }
    widened = changed;
    if (changed) out.push(trial);
  }
  // Move: the chargers with the most idle energy while the stay is at the depot.
  const idle: { c: number; kwh: number }[] = [];
  for (const charger of problem.chargers) {
    const c = charger.index;
    if (c === cj) continue;
    const kw = usablePower(problem, stay, c);
    if (kw <= 0) continue;
    let free = 0;
    for (let t = stay.arriveSlot; t < stay.departSlot; t++) if (!busy[c]![t]) free++;
    if (free > 0) idle.push({ c, kwh: free * kw * dt });
  }
  idle.sort((x, y) => y.kwh - x.kwh || x.c - y.c);
  for (const { c } of idle.slice(0, options.relocations)) {
    const trial = cloneAssignment(best);
    if (cj >= 0) trial.sequence[cj] = trial.sequence[cj]!.filter((x) => x !== j);
    trial.sequence[c]!.push(j);
    trial.chargerOf[j] = c;
    if (cj >= 0) arrangeCharger(problem, hints, trial, cj);
    arrangeCharger(problem, hints, trial, c);
    out.push(trial);
  }
  // Swap with a served stay on another charger: j takes its charger, it takes j's (if any).
  if (cj >= 0) {
    const partners: { o: number; score: number }[] = [];
    for (const other of problem.stays) {
      const o = other.id;
      const co = best.chargerOf[o]!;
      if (o === j || co < 0 || co === cj || short[o]! > 1e-6) continue;
      if (other.arriveSlot >= stay.departSlot || stay.arriveSlot >= other.departSlot) continue;
      if (usablePower(problem, other, cj) <= 0) continue;
      // What j would get there: its usable power over the overlap of its stay with the window.
      const from = Math.max(stay.arriveSlot, best.from[o]!);
      const to = Math.min(stay.departSlot, best.to[o]!);
      if (to <= from) continue;
      partners.push({ o, score: usablePower(problem, stay, co) * (to - from) });
    }
    partners.sort((x, y) => y.score - x.score || x.o - y.o);
    for (const { o } of partners.slice(0, options.swaps)) {
      const trial = cloneAssignment(best);
      const co = trial.chargerOf[o]!;
      trial.sequence[cj] = trial.sequence[cj]!.map((x) => (x === j ? o : x));
      trial.sequence[co] = trial.sequence[co]!.map((x) => (x === o ? j : x));
      trial.chargerOf[j] = co;
      trial.chargerOf[o] = cj;
      arrangeCharger(problem, hints, trial, cj);
      arrangeCharger(problem, hints, trial, co);
      out.push(trial);
    }
  }
  // The move to the charger with the most idle energy first (it is what serves most short
  // stays), then the widened window, then the other moves and the swaps.
  if (widened && out.length > 1) [out[0], out[1]] = [out[1]!, out[0]!];
  // Where every charger is held, a share of another stay's window first (see `insertions`).
  if (!room) return out;
  const others = problem.chargers.map((x) => x.index).filter((c) => c !== cj);
  return [...insertions(problem, best, j, others, room, slotsNeeded, options.relocations), ...out];
}

/** Crew moves still free in each slot under an assignment (Infinity: no limit). */
function crewRoom(problem: Problem, a: Assignment): Float64Array {
  const T = problem.slotCount;
  const room = new Float64Array(T + 1).fill(Infinity);
  const cap = problem.yard?.capacity;
  if (!cap) return room;
  for (let t = 0; t < T; t++) room[t] = cap[t]!;
  for (const stay of problem.stays) {
    if (a.chargerOf[stay.id]! < 0) continue;
    if (!startIsFree(problem, stay, a.from[stay.id]!)) room[a.from[stay.id]!]!--;
    if (!endIsFree(problem, stay, a.to[stay.id]!)) room[a.to[stay.id]!]!--;
  }
  return room;
}

/**
 * Stay j taken off its charger (its neighbour there keeps its slots) and given the part of another
 * stay's window that the other does not need at full power: after it (j takes the rest of the
 * window) or before it. The hand-over between them falls in a slot where the crew has room for
 * two moves, so nothing else need move; on a depot short of chargers this is how a bus left to
 * the morning rush gets the overnight hold of a bus that is full by midnight. The windows giving
 * j the most energy, over the given chargers, are tried.
 */
function insertions(
  problem: Problem,
  best: Assignment,
  j: number,
  chargers: number[],
  room: Float64Array,
  slotsNeeded: (s: number, c: number) => number,
  count: number,
): Assignment[] {
  const stay = problem.stays[j]!;
  const minJ = minWindow(problem, stay);
  const found: { c: number; s: number; after: boolean; h: number; kwh: number }[] = [];
  for (const c of chargers) {
    const kw = usablePower(problem, stay, c);
    for (const s of best.sequence[c]!) {
      const a = best.from[s]!;
      const b = best.to[s]!;
      const keep = Math.max(minWindow(problem, problem.stays[s]!), slotsNeeded(s, c));
      // After s: the earliest hand-over with room; before s: the latest.
      for (let h = Math.max(a + keep, stay.arriveSlot); h + minJ <= Math.min(b, stay.departSlot); h++) {
        if (room[h]! < 2) continue;
        found.push({ c, s, after: true, h, kwh: kw * (Math.min(b, stay.departSlot) - h) });
        break;
      }
      // A bus already plugged in (re-planning) keeps the start of its window.
      const pinned = problem.pinned !== undefined && problem.pinned[s]! >= 0;
      for (let h = b - keep; !pinned && h - minJ >= Math.max(a, stay.arriveSlot); h--) {
        if (room[h]! < 2) continue;
        found.push({ c, s, after: false, h, kwh: kw * (h - Math.max(a, stay.arriveSlot)) });
        break;
      }
    }
  }
  found.sort((x, y) => y.kwh - x.kwh || x.c - y.c || x.s - y.s || x.h - y.h);
  const out: Assignment[] = [];
  for (const f of found.slice(0, count)) {
    const trial = takeOff(problem, cloneAssignment(best), j);
    const seq = trial.sequence[f.c]!;
    seq.splice(seq.indexOf(f.s) + (f.after ? 1 : 0), 0, j);
    trial.chargerOf[j] = f.c;
    if (f.after) {
      trial.from[j] = f.h;
      trial.to[j] = Math.min(best.to[f.s]!, stay.departSlot);
      trial.to[f.s] = f.h;
    } else {
      trial.from[j] = Math.max(best.from[f.s]!, stay.arriveSlot);
      trial.to[j] = f.h;
      trial.from[f.s] = f.h;
    }
    out.push(trial);
  }
  return out;
}

/** Every stay of `order` moved to the charger with the most idle energy during its stay (distinct). */
function batchMove(
  problem: Problem,
  hints: AssignmentHints,
  best: Assignment,
  order: number[],
  busy: Uint8Array[],
): Assignment {
  const trial = cloneAssignment(best);
  const taken = busy.map((b) => b.slice());
  const touched = new Set<number>();
  const dt = problem.slotHours;
  for (const j of order) {
    const stay = problem.stays[j]!;
    const cj = trial.chargerOf[j]!;
    let bestC = -1;
    let bestKwh = 0;
    for (const charger of problem.chargers) {
      const c = charger.index;
      if (c === cj || touched.has(c)) continue;
      const kw = usablePower(problem, stay, c);
      if (kw <= 0) continue;
      let free = 0;
      for (let t = stay.arriveSlot; t < stay.departSlot; t++) if (!taken[c]![t]) free++;
      if (free * kw * dt > bestKwh + 1e-9) {
        bestKwh = free * kw * dt;
        bestC = c;
      }
    }
    if (bestC < 0) continue;
    if (cj >= 0) {
      trial.sequence[cj] = trial.sequence[cj]!.filter((x) => x !== j);
      touched.add(cj);
    }
    trial.sequence[bestC]!.push(j);
    trial.chargerOf[j] = bestC;
    touched.add(bestC);
    for (let t = stay.arriveSlot; t < stay.departSlot; t++) taken[bestC]![t] = 1;
  }
  for (const c of [...touched].sort((x, y) => x - y)) arrangeCharger(problem, hints, trial, c);
  return trial;
}

/**
 * Serves short stays by targeted changes (see above), while the plan is short and the budget of
 * LP solves lasts. Keeps only improvements: the result is never worse than the start.
 */
export function repairShort(
  problem: Problem,
  hints: AssignmentHints,
  lp: AssignedModel,
  start: Assignment,
  first: LpResult,
  limits: {
    deadline: number;
    maxSolves: number;
    target: number;
    relocations?: number;
    swaps?: number;
    /** Try moving all short stays at once before one at a time. */
    batch?: boolean;
    /** Also give a short stay the part of another stay's window that it does not need. */
    heldSpare?: boolean;
  },
): SearchResult {
  let best = start;
  let bestResult = first;
  let moves = 0;
  let accepted = 0;
  let iterations = 0;
  let lpMs = 0;
  const all = problem.buses.map((b) => b.index);
  // Stays all of whose changes were tried without a gain are not tried again.
  const exhausted = new Set<number>();
  const options = {
    relocations: limits.relocations ?? SHORT_REPAIR.relocations,
    swaps: limits.swaps ?? SHORT_REPAIR.swaps,
  };
  let timedOut = false;
  // The batch is tried again only after a change was kept.
  let batchTry = limits.batch ?? false;
  outer: while (moves < limits.maxSolves && bestResult.objective > limits.target) {
    const short = shortOf(problem, lp, bestResult);
    const order = problem.stays
      .filter((s) => short[s.id]! > 1e-3 && !exhausted.has(s.id))
      .map((s) => s.id)
      .sort((x, y) => short[y]! - short[x]! || x - y);
    if (order.length === 0) break;
    const busy = occupancy(problem, best);
    // Several short stays at once first: each moved to the charger with the most idle energy
    // while it is at the depot (one LP solve for all of them; on large depots the short stays are
    // spread over the yard and rarely compete for the same charger).
    const batch = batchTry && order.length > 1 ? batchMove(problem, hints, best, order, busy) : null;
    const room = limits.heldSpare ? crewRoom(problem, best) : null;
    const trials = (j: number) => changesFor(problem, hints, best, j, busy, short, options, room);
    for (const j of batch ? [-1, ...order] : order) {
      for (const trial of j < 0 ? [batch!] : trials(j)) {
        if (moves >= limits.maxSolves) break outer;
        if (performance.now() >= limits.deadline) {
          timedOut = true;
          break outer;
        }
        // A bus already plugged in (re-planning) is not moved off its charger.
        if (!keepsPins(problem, trial)) continue;
        moves++;
        if (problem.yard) fitCrew(problem, trial, hints.energy);
        lp.update(trial, all);
        const res = lp.solve();
        iterations += res.iterations;
        lpMs += res.ms;
        if (res.status === 'optimal' && cheaper(res.objective, bestResult.objective)) {
          best = trial;
          bestResult = res;
          accepted++;
          batchTry = limits.batch ?? false;
          continue outer;
        }
        lp.update(best, all);
        if (j < 0) batchTry = false;
      }
      if (j >= 0) exhausted.add(j);
    }
  }
  return { assignment: best, result: bestResult, moves, accepted, iterations, lpMs, timedOut };
}
