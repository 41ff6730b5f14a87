import { arrangeCharger, cloneAssignment, type Assignment, type AssignmentHints } from './assignment.js';
import { fitCrew } from './crew.js';
import { cheaper, type LpResult } from './highs-solver.js';
import type { AssignedModel, SearchResult } from './local-search.js';
import type { Problem } from './problem.js';

// Large-neighbourhood search over whole charger sequences. Shifting one hand-over or one stay at
// a time cannot exchange whole sequences of buses between chargers (two 150 kW buses on a 60 kW
// charger and the 90 kW buses on the 150 kW one: the better plan does the reverse, and every
// single step towards it costs more first). Here a neighbourhood is two chargers: all their
// stays (and the stays no charger holds) are freed and every split of them between the two is
// laid out (service order and hand-overs as in stage 1, then the crew's rules); the splits whose
// windows hold their stays' energy best go to the LP, the best plan is kept. A neighbourhood
// with more stays than `maxStays` is skipped. Pairs are taken strongest-weakest first; passes
// repeat while one improves. Everything is counted (splits, LP solves), nothing timed, so the
// same scenario gives the same plan; the clock is only the safety net.

export interface LnsLimits {
  deadline: number;
  target: number;
  /** Largest number of stays freed at once (2^n splits are laid out). */
  maxStays: number;
  /** LP solves per neighbourhood (the best-laid-out splits), and more with hand-overs at pull-ins and pull-outs (crew). */
  evaluate: number;
  evaluateAtEnds: number;
  /** Passes over all pairs. */
  passes: number;
  /** Splits laid out again with the best order and the crew's rules, per neighbourhood. */
  shortlist: number;
  /** Splits laid out in all (a budget on work). */
  maxSplits: number;
  /** LP solves in all. */
  maxLpSolves: number;
  /** Every laid-out split of the shortlist goes to the LP, not only the best-scored few. */
  everySplit?: boolean;
}

export interface LnsResult extends SearchResult {
  neighbourhoods: number;
  splits: number;
}

export function defaultLnsLimits(problem: Problem, deadline: number, target: number): LnsLimits {
  const n = problem.stays.length;
  return {
    deadline,
    target,
    maxStays: 12,
    evaluate: 3,
    evaluateAtEnds: problem.yard ? 2 : 0,
    shortlist: 24,
    passes: 3,
    maxSplits: Math.max(2000, 40_000 - 100 * n),
    maxLpSolves: Math.max(12, Math.min(150, Math.round(3000 / (25 + n)))),
  };
}

/** How badly an assignment's windows on some chargers hold their stays' energy (lower is better). */
function splitScore(problem: Problem, hints: AssignmentHints, a: Assignment, stays: number[]): number {
  const dt = problem.slotHours;
  let score = 0;
  for (const id of stays) {
    const stay = problem.stays[id]!;
    const need = hints.energy[id]!;
    const c = a.chargerOf[id]!;
    if (c < 0) {
      score += 1000 * need;
      continue;
    }
    const kw = 0.85 * Math.min(problem.buses[stay.bus]!.maxKw, problem.chargers[c]!.maxKw);
    const from = a.from[id]!;
    const to = a.to[id]!;
    score += 1000 * Math.max(0, need - kw * dt * Math.max(0, to - from));
    // The relaxation's charging left outside the window (it would have to move to dearer slots).
    const p = hints.power[stay.bus]!;
    for (let t = stay.arriveSlot; t < stay.departSlot; t++) if (t < from || t >= to) score += p[t]! * dt;
  }
  return score;
}

export function pairSearch(
  problem: Problem,
  hints: AssignmentHints,
  lp: AssignedModel,
  start: Assignment,
  first: LpResult,
  limits: LnsLimits,
): LnsResult {
  let best = cloneAssignment(start);
  let bestResult = first;
  let moves = 0;
  let accepted = 0;
  let iterations = 0;
  let lpMs = 0;
  let neighbourhoods = 0;
  let splits = 0;
  let timedOut = false;
  const C = problem.chargers.length;
  // Re-planning: a charger holding a stay already plugged in is left as it is (re-splitting
  // them was measured to move more buses in re-plans, for little).
  const pin = problem.pinned;
  const locked = new Uint8Array(C);
  if (pin) for (const s of problem.stays) if (pin[s.id]! >= 0) locked[pin[s.id]!] = 1;
  const usable = problem.chargers
    .filter((c) => !locked[c.index] && c.available.some((v) => v === 1))
    .map((c) => c.index);
  // Strongest with weakest first: where exchanging whole sequences changes most.
  const pairs: [number, number][] = [];
  for (let i = 0; i < usable.length; i++)
    for (let j = i + 1; j < usable.length; j++) pairs.push([usable[i]!, usable[j]!]);
  const kw = (c: number) => problem.chargers[c]!.maxKw;
  // Chargers whose stays are dearest at the margin (the LP's departure duals) first.
  const dear = new Float64Array(C);
  for (const s of problem.stays) {
    const c = start.chargerOf[s.id]!;
    const r = lp.model.departRow[s.id]!;
    if (c >= 0 && r >= 0 && first.rowDual.length)
      dear[c] = Math.max(dear[c]!, Math.round(Math.abs(first.rowDual[r]!) * 1e4) / 1e4);
  }
  const pairKey = (p: [number, number]) => Math.max(dear[p[0]]!, dear[p[1]]!);
  pairs.sort(
    (p, q) =>
      pairKey(q) - pairKey(p) ||
      Math.abs(kw(q[0]) - kw(q[1])) - Math.abs(kw(p[0]) - kw(p[1])) ||
      p[0] - q[0] ||
      p[1] - q[1],
  );
  const all = problem.buses.map((b) => b.index);
  const arrangeHints: AssignmentHints = { ...hints, order: 'best', handover: 'least-cut' };
  const quickHints: AssignmentHints = { ...hints, order: 'departure', handover: 'least-cut' };
  const better = (res: LpResult, than: LpResult) => res.status === 'optimal' && cheaper(res.objective, than.objective);

  for (let pass = 0; pass < limits.passes; pass++) {
    let improvedThisPass = false;
    for (const [c1, c2] of pairs) {
      if (bestResult.objective <= limits.target) break;
      if (performance.now() > limits.deadline) {
        timedOut = true;
        break;
      }
      // Stays no charger holds: the two that need most come along (present while either charger is).
      const unplaced = problem.stays
        .filter(
          (s) =>
            best.chargerOf[s.id]! < 0 &&
            hints.energy[s.id]! > 1e-6 &&
            s.departSlot > s.arriveSlot &&
            (!pin || pin[s.id]! < 0),
        )
        .sort((x, y) => hints.energy[y.id]! - hints.energy[x.id]! || x.id - y.id)
        .slice(0, 2)
        .map((s) => s.id);
      const all2 = [...best.sequence[c1]!, ...best.sequence[c2]!, ...unplaced];
      // Stays plugged in at a re-plan's start stay where they are; the rest are split.
      const fixedOn = all2.filter((id) => pin && pin[id]! >= 0);
      const union = all2.filter((id) => !(pin && pin[id]! >= 0));
      if (union.length === 0 || union.length > limits.maxStays) continue;
      if (moves + 2 * (limits.evaluate + limits.evaluateAtEnds) > limits.maxLpSolves) break;
      if (splits + (1 << union.length) > limits.maxSplits) continue;
      neighbourhoods++;
      const scored: { score: number; trial: Assignment; mask: number }[] = [];
      // Every split laid out quickly (stays by departure), the most promising again with the
      // best service order and the crew's rules, the best of those to the LP.
      const split = (mask: number, hintsFor: AssignmentHints): Assignment => {
        const trial = cloneAssignment(best);
        trial.sequence[c1] = fixedOn.filter((id) => pin![id] === c1);
        trial.sequence[c2] = fixedOn.filter((id) => pin![id] === c2);
        union.forEach((id, i) => {
          const c = mask & (1 << i) ? c2 : c1;
          trial.chargerOf[id] = c;
          trial.sequence[c]!.push(id);
        });
        arrangeCharger(problem, hintsFor, trial, c1);
        arrangeCharger(problem, hintsFor, trial, c2);
        return trial;
      };
      const quick: { score: number; mask: number }[] = [];
      for (let mask = 0; mask < 1 << union.length; mask++) {
        splits++;
        quick.push({ score: splitScore(problem, hints, split(mask, quickHints), union), mask });
      }
      quick.sort((x, y) => x.score - y.score || x.mask - y.mask);
      for (const { mask } of quick.slice(0, limits.shortlist * (union.length <= 8 ? 2 : 1))) {
        const trial = split(mask, arrangeHints);
        if (problem.yard) {
          // Hand-overs placed two ways: nearest the proposed slot, or at pull-ins and pull-outs
          // first (fewer moves, and often room for a stay the first way leaves out).
          const other = cloneAssignment(trial);
          fitCrew(problem, trial, hints.energy);
          fitCrew(problem, other, hints.energy, true);
          scored.push({
            score: splitScore(problem, hints, other, union),
            trial: other,
            mask: mask + (1 << union.length),
          });
        }
        scored.push({ score: splitScore(problem, hints, trial, union), trial, mask });
      }
      scored.sort((x, y) => x.score - y.score || x.mask - y.mask);
      // The best-laid-out splits of each way of placing hand-overs go to the LP (neighbourhoods
      // of up to 8 stays twice as many; with `everySplit`, all of the shortlist).
      const extra = union.length <= 8 ? 2 : 1;
      const nearest = scored
        .filter((x) => x.mask < 1 << union.length)
        .slice(0, limits.everySplit ? undefined : limits.evaluate * extra);
      const atEnds = scored
        .filter((x) => x.mask >= 1 << union.length)
        .slice(0, limits.everySplit ? undefined : limits.evaluateAtEnds * extra);
      let improved: { trial: Assignment; res: LpResult } | null = null;
      for (const cand of [...nearest, ...atEnds]) {
        moves++;
        lp.update(cand.trial, all);
        const res = lp.solve();
        iterations += res.iterations;
        lpMs += res.ms;
        if (better(res, improved?.res ?? bestResult)) improved = { trial: cand.trial, res };
      }
      if (improved) {
        best = improved.trial;
        bestResult = improved.res;
        accepted++;
        improvedThisPass = true;
      }
      lp.update(best, all);
    }
    if (!improvedThisPass || timedOut || bestResult.objective <= limits.target) break;
  }
  // Leave the live model on the best plan, its solution current.
  lp.update(best, all);
  const final = lp.solve();
  if (final.status === 'optimal') bestResult = final;
  return { assignment: best, result: bestResult, moves, accepted, iterations, lpMs, timedOut, neighbourhoods, splits };
}
