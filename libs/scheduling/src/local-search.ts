import {
  arrangeCharger,
  cloneAssignment,
  layoutCharger,
  plugMapOf,
  usablePower,
  type Assignment,
  type AssignmentHints,
} from './assignment.js';
import { fitCrew } from './crew.js';
import type { LiveLp, LpBasis, LpResult, Solver } from './highs-solver.js';
import { buildChargeModel, cabinetRowsFor, plugUpper, type ChargeModel } from './lp-model.js';
import type { PlugMap, Problem } from './problem.js';

/** Above this many cabinet coefficient changes an update rewrites the cabinet rows at once. */
export const BULK_COEFFICIENTS = 32;

/**
 * Depots above this many stays are large: each LP re-solve costs a large share of the plan's time,
 * so the search saves re-solves there (cabinet rows rewritten in bulk, bases reused, no shared-
 * charger LP; see plan.ts). Smaller depots keep the search as it was, step for step.
 */
export const LARGE_STAYS = 300;

/**
 * The LP of one assignment, kept alive in HiGHS. Changing a stay's charger or window changes
 * only column bounds and cabinet-row coefficients, so each candidate is re-solved from the
 * previous basis.
 */
export class AssignedModel {
  readonly model: ChargeModel;
  private readonly live: LiveLp;
  plug: PlugMap;
  constructor(
    private readonly problem: Problem,
    solver: Solver,
    assignment: Assignment,
  ) {
    this.plug = plugMapOf(problem, assignment);
    this.model = buildChargeModel(problem, { mode: 'assigned', plug: this.plug, tieBreak: true });
    this.live = solver.open(this.model.lp);
    this.live.keepBasis = true;
  }
  /** Moves the model to a new assignment, touching only the slots that changed. */
  update(assignment: Assignment, buses: Iterable<number>): void {
    const next = plugMapOf(this.problem, assignment);
    const cols: number[] = [];
    const lower: number[] = [];
    const upper: number[] = [];
    const coefficients: [number, number, number][] = [];
    for (const b of buses) {
      const oldRow = this.plug[b]!;
      const newRow = next[b]!;
      for (const t of this.problem.buses[b]!.slots) {
        const before = oldRow[t]!;
        const after = newRow[t]!;
        if (before === after) continue;
        const col = this.model.pCol[b]![t]!;
        cols.push(col);
        lower.push(0);
        upper.push(plugUpper(this.problem, b, t, after));
        const gOld = before >= 0 ? this.problem.chargers[before]!.cabinet : -1;
        const gNew = after >= 0 ? this.problem.chargers[after]!.cabinet : -1;
        if (gOld !== gNew) {
          const rOld = gOld >= 0 ? this.model.cabinetRow[gOld]![t]! : -1;
          const rNew = gNew >= 0 ? this.model.cabinetRow[gNew]![t]! : -1;
          if (rOld >= 0) coefficients.push([rOld, col, 0]);
          if (rNew >= 0) coefficients.push([rNew, col, 1]);
        }
        oldRow[t] = after;
      }
    }
    // Many cabinet changes (a whole new candidate): the cabinet rows rewritten in one go.
    const bulk =
      this.problem.stays.length > LARGE_STAYS && coefficients.length > BULK_COEFFICIENTS
        ? cabinetRowsFor(this.problem, this.model, this.plug)
        : null;
    if (bulk) this.live.replaceTailRows(bulk.from, bulk);
    else for (const [r, c, v] of coefficients) this.live.setCoefficient(r, c, v);
    this.live.setColBounds(cols, lower, upper);
  }
  solve(): LpResult {
    return this.live.solve();
  }
  /** The optimal basis of the last solve, to come back to it later without simplex iterations. */
  basis(): LpBasis | null {
    return this.live.lastBasis();
  }
  restoreBasis(basis: LpBasis): void {
    this.live.restoreBasis(basis);
  }
  setColBounds(cols: number[], lower: number[], upper: number[]): void {
    this.live.setColBounds(cols, lower, upper);
  }
  setRowBounds(row: number, lower: number, upper: number): void {
    this.live.setRowBounds(row, lower, upper);
  }
  dispose(): void {
    this.live.dispose();
  }
}

/** Small deterministic generator so a run with the same move limit gives the same plan. */
function rng(seed: number) {
  let s = seed >>> 0 || 1;
  return () => {
    s ^= s << 13;
    s ^= s >>> 17;
    s ^= s << 5;
    return (s >>> 0) / 4294967296;
  };
}

export interface SearchResult {
  assignment: Assignment;
  result: LpResult;
  moves: number;
  accepted: number;
  iterations: number;
  lpMs: number;
  /** The search ended on the deadline (safety net), not on its move budget or the bound. */
  timedOut?: boolean;
}

/**
 * Local search over stage 1: move a stay to another charger, swap two stays between chargers,
 * or shift a hand-over; re-solve the LP and keep improvements. Stays whose departure energy is
 * dearest at the margin (largest dual) are tried first: they are the ones the windows hurt.
 */
export function localSearch(
  problem: Problem,
  hints: AssignmentHints,
  lp: AssignedModel,
  start: Assignment,
  first: LpResult,
  limits: {
    deadline: number;
    maxMoves: number;
    target: number;
    /** Smallest gain (currency) worth a change; default any. */ minGain?: number;
  },
): SearchResult {
  let best = cloneAssignment(start);
  let bestResult = first;
  let moves = 0;
  let accepted = 0;
  let iterations = first.iterations;
  let lpMs = first.ms;
  const random = rng(12345);
  const C = problem.chargers.length;
  // Re-planning: a charger that holds a stay already plugged in is left as it is.
  const locked = new Uint8Array(C);
  if (problem.pinned) for (const s of problem.stays) if (problem.pinned[s.id]! >= 0) locked[problem.pinned[s.id]!] = 1;
  const jobs = problem.stays
    .filter(
      (s) =>
        (best.chargerOf[s.id]! >= 0 || hints.energy[s.id]! > 1e-6) &&
        !(best.chargerOf[s.id]! >= 0 && locked[best.chargerOf[s.id]!]),
    )
    .map((s) => s.id);
  if (jobs.length === 0 || C === 0) return { assignment: best, result: bestResult, moves, accepted, iterations, lpMs };

  const dualOf = (res: LpResult) => {
    const d = new Float64Array(problem.stays.length);
    for (const s of problem.stays) {
      const r = lp.model.departRow[s.id]!;
      if (r >= 0 && res.rowDual.length) d[s.id] = Math.abs(res.rowDual[r]!);
    }
    return d;
  };
  let duals = dualOf(bestResult);
  // Tournament on the dual: dear stays are picked more often, none is starved. Three draws, and
  // on large depots as many as keep the chance of drawing one of the few dearest stays (a short
  // bus) what it is on a depot of a hundred stays.
  const draws = problem.stays.length > LARGE_STAYS ? Math.round((3 * jobs.length) / 100) : 3;
  const pickJob = (): number => {
    let pick = jobs[Math.floor(random() * jobs.length)]!;
    for (let i = 0; i < draws - 1; i++) {
      const other = jobs[Math.floor(random() * jobs.length)]!;
      if (duals[other]! > duals[pick]!) pick = other;
    }
    return pick;
  };
  const overlaps = (x: number, y: number) => {
    const a = problem.stays[x]!;
    const b = problem.stays[y]!;
    return a.arriveSlot < b.departSlot && b.arriveSlot < a.departSlot;
  };

  while (moves < limits.maxMoves && performance.now() < limits.deadline && bestResult.objective > limits.target) {
    moves++;
    const trial = cloneAssignment(best);
    const j = pickJob();
    const cj = trial.chargerOf[j]!;
    const touched = new Set<number>();
    const extra: number[] = [];
    // Moves: relocate, swap, shift a hand-over, or swap two neighbours in a charger's service
    // order (with one charger only the last two make sense).
    let kind = random();
    if (C === 1) kind = 0.85 + 0.15 * kind;
    if (kind >= 0.95 && cj >= 0) {
      const seq = trial.sequence[cj]!;
      const i = seq.indexOf(j);
      const k = random() < 0.5 ? i + 1 : i - 1;
      if (k < 0 || k >= seq.length) continue;
      seq[i] = seq[k]!;
      seq[k] = j;
      layoutCharger(problem, hints, trial, cj);
      for (const s of seq) extra.push(problem.stays[s]!.bus);
    } else if (kind < 0.45 || cj < 0) {
      // Relocate j to another charger.
      let c = Math.floor(random() * C);
      if (c === cj) c = (c + 1) % C;
      if (c === cj || locked[c] || usablePower(problem, problem.stays[j]!, c) <= 0) continue;
      if (cj >= 0) trial.sequence[cj] = trial.sequence[cj]!.filter((x) => x !== j);
      trial.sequence[c]!.push(j);
      trial.chargerOf[j] = c;
      if (cj >= 0) touched.add(cj);
      touched.add(c);
    } else if (kind < 0.8) {
      // Swap j with a stay on another charger that is at the depot at the same time.
      let other = -1;
      for (let tries = 0; tries < 8 && other < 0; tries++) {
        const o = jobs[Math.floor(random() * jobs.length)]!;
        const co = trial.chargerOf[o]!;
        if (co >= 0 && co !== cj && !locked[co] && overlaps(j, o)) other = o;
      }
      if (other < 0) continue;
      const co = trial.chargerOf[other]!;
      trial.sequence[cj] = trial.sequence[cj]!.map((x) => (x === j ? other : x));
      trial.sequence[co] = trial.sequence[co]!.map((x) => (x === other ? j : x));
      trial.chargerOf[j] = co;
      trial.chargerOf[other] = cj;
      touched.add(cj);
      touched.add(co);
    } else {
      // Shift the hand-over after (or before) j on its charger.
      const seq = trial.sequence[cj]!;
      const i = seq.indexOf(j);
      const later = random() < 0.5;
      const delta = [1, 2, 4][Math.floor(random() * 3)]!;
      const k = later ? i + 1 : i - 1;
      if (k < 0 || k >= seq.length) continue;
      const n = seq[k]!;
      if (later) {
        const h = Math.min(trial.to[j]! + delta, problem.stays[j]!.departSlot, trial.to[n]! - 1);
        if (h <= trial.to[j]! || h < problem.stays[n]!.arriveSlot) continue;
        trial.to[j] = h;
        trial.from[n] = Math.max(trial.from[n]!, h);
      } else {
        const h = Math.max(trial.from[j]! - delta, problem.stays[j]!.arriveSlot, trial.from[n]! + 1);
        if (h >= trial.from[j]! || h > problem.stays[n]!.departSlot) continue;
        trial.from[j] = h;
        trial.to[n] = Math.min(trial.to[n]!, h);
      }
      extra.push(problem.stays[n]!.bus);
    }
    for (const c of touched) arrangeCharger(problem, hints, trial, c);
    const buses = new Set<number>();
    if (problem.yard) {
      // Crew room is shared by the whole yard: a change on one charger can move hand-overs on any.
      fitCrew(problem, trial, hints.energy);
      for (const b of problem.buses) buses.add(b.index);
    }
    for (const c of touched) for (const s of trial.sequence[c]!) buses.add(problem.stays[s]!.bus);
    buses.add(problem.stays[j]!.bus);
    for (const b of extra) buses.add(b);
    lp.update(trial, buses);
    const res = lp.solve();
    iterations += res.iterations;
    lpMs += res.ms;
    if (
      res.status === 'optimal' &&
      res.objective <
        bestResult.objective - Math.max(limits.minGain ?? 0, 1e-9 * Math.max(1, Math.abs(bestResult.objective)))
    ) {
      best = trial;
      bestResult = res;
      duals = dualOf(res);
      accepted++;
    } else {
      lp.update(best, buses);
    }
  }
  const timedOut =
    moves < limits.maxMoves && bestResult.objective > limits.target && performance.now() >= limits.deadline;
  return { assignment: best, result: bestResult, moves, accepted, iterations, lpMs, timedOut };
}
