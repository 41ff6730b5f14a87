import { cloneAssignment, takeOff, usablePower, type Assignment } from './assignment.js';
import { countCrewMoves, endIsFree, fitCrew, keepsPins, startIsFree } from './crew.js';
import type { LpResult } from './highs-solver.js';
import type { AssignedModel } from './local-search.js';
import type { Problem } from './problem.js';

// Fewer crew moves by using the chargers that stand idle. A plan can rotate many buses through
// the strongest chargers, two crew moves at each hand-over, while weaker chargers stand idle all
// night (on a weekend, C5-C8 idle for 62 hours while D1 took 8 buses in turn: 36 moves). A bus
// put on an idle charger for its whole stay is plugged in and unplugged by its driver, and the
// hand-overs around it on its old charger become one: two moves fewer, and often no dearer
// where there is time to charge at any power. Each such move is judged by the LP and kept only
// within the depot's cost tolerance.

/** LP solves at most for moving buses whole onto idle chargers. */
export const WHOLE_STAY_SOLVES = 24;

/** Is charger c free and in service through the whole of stay j under assignment a? */
function freeThrough(problem: Problem, a: Assignment, c: number, j: number): boolean {
  const stay = problem.stays[j]!;
  const charger = problem.chargers[c]!;
  for (let t = stay.arriveSlot; t < stay.departSlot; t++) if (!charger.available[t]) return false;
  return a.sequence[c]!.every((o) => a.to[o]! <= stay.arriveSlot || a.from[o]! >= stay.departSlot);
}

/** Crew moves at the two ends of stay j's session under assignment a. */
function movesOf(problem: Problem, a: Assignment, j: number): number {
  const stay = problem.stays[j]!;
  return (startIsFree(problem, stay, a.from[j]!) ? 0 : 1) + (endIsFree(problem, stay, a.to[j]!) ? 0 : 1);
}

/**
 * Buses moved whole onto chargers idle through their stay, one at a time, each kept where it
 * saves crew moves and the plan stays at or under `limit` (LP objective). The stays that cost the
 * crew most go first, the smallest need first among them; each to the weakest idle charger that
 * can give it its energy in a quarter of its stay. Returns the assignment and its LP solution,
 * or null when nothing was kept; leaves `live` on the returned assignment (or on `start`).
 */
export function wholeStaysOnIdle(
  problem: Problem,
  energy: Float64Array,
  live: AssignedModel,
  start: Assignment,
  limit: number,
  deadline: number,
): { assignment: Assignment; result: LpResult } | null {
  if (!problem.yard) return null;
  const all = problem.buses.map((b) => b.index);
  let best = start;
  let found: { assignment: Assignment; result: LpResult } | null = null;
  let solves = 0;
  const tried = new Set<number>();
  search: for (;;) {
    const candidates = problem.stays
      .filter((s) => best.chargerOf[s.id]! >= 0 && !tried.has(s.id) && movesOf(problem, best, s.id) > 0)
      .filter((s) => !problem.pinned || problem.pinned[s.id]! < 0)
      .sort(
        (x, y) =>
          movesOf(problem, best, y.id) - movesOf(problem, best, x.id) || energy[x.id]! - energy[y.id]! || x.id - y.id,
      );
    let kept = false;
    for (const stay of candidates) {
      if (solves >= WHOLE_STAY_SOLVES || performance.now() >= deadline) break search;
      tried.add(stay.id);
      const hours = (stay.departSlot - stay.arriveSlot) * problem.slotHours;
      const target = problem.chargers
        .map((c) => c.index)
        .filter((c) => c !== best.chargerOf[stay.id] && usablePower(problem, stay, c) > 0)
        .filter((c) => usablePower(problem, stay, c) * hours >= 4 * energy[stay.id]!)
        .filter((c) => freeThrough(problem, best, c, stay.id))
        .sort((x, y) => usablePower(problem, stay, x) - usablePower(problem, stay, y) || x - y)[0];
      if (target === undefined) continue;
      const trial = takeOff(problem, cloneAssignment(best), stay.id);
      trial.chargerOf[stay.id] = target;
      trial.from[stay.id] = stay.arriveSlot;
      trial.to[stay.id] = stay.departSlot;
      trial.sequence[target] = [...trial.sequence[target]!, stay.id].sort((x, y) => trial.from[x]! - trial.from[y]!);
      fitCrew(problem, trial, energy);
      if (!keepsPins(problem, trial) || countCrewMoves(problem, trial) >= countCrewMoves(problem, best)) continue;
      solves++;
      live.update(trial, all);
      const res = live.solve();
      if (res.status === 'optimal' && res.objective <= limit) {
        best = trial;
        found = { assignment: trial, result: res };
        kept = true;
        break;
      }
    }
    if (!kept) break;
  }
  live.update(best, all);
  return found;
}
