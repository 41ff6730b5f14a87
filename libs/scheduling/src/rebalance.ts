import { cloneAssignment, layoutCharger, type Assignment, type AssignmentHints } from './assignment.js';
import type { Lp, Solver } from './highs-solver.js';
import { buildChargeModel, powerFrom } from './lp-model.js';
import { emptyPlugMap, type Problem } from './problem.js';

// Hand-overs placed together. Shifting one hand-over at a time cannot move a charger's whole
// chain of stays (five buses on one charger all need a little more room to lower the peak by a
// kilowatt). The shared-charger LP keeps each stay on its charger, lets every stay use the whole
// of its stay there, and lets the stays of a charger share it within a slot (sum of p / maxima
// <= 1): a relaxation of every order and hand-over on these chargers. Its powers then order each
// charger's stays and place each hand-over where it cuts the least of that LP's charging.

/** Grid kW per bus per slot in the shared-charger LP of an assignment, or null if it failed. */
export function sharedChargerPower(problem: Problem, solver: Solver, assignment: Assignment): Float64Array[] | null {
  const plug = emptyPlugMap(problem);
  const onCharger = problem.chargers.map(() => [] as number[]);
  for (const stay of problem.stays) {
    const c = assignment.chargerOf[stay.id]!;
    if (c < 0) continue;
    onCharger[c]!.push(stay.id);
    for (let t = stay.arriveSlot; t < stay.departSlot; t++)
      if (problem.chargers[c]!.available[t]) plug[stay.bus]![t] = c;
  }
  const model = buildChargeModel(problem, { mode: 'assigned', plug, tieBreak: true });
  const lp = model.lp;
  // Many optima tie here; among them prefer the one that keeps the current service order (a
  // stay later in its charger's order charges later): it is the one hand-overs can follow.
  const colCost = Float64Array.from(lp.colCost);
  const prices = problem.slots.map((x) => x.price).filter((x) => x > 0);
  // Large enough to count against the solver's tolerances, small against any real price.
  const eps = 1e-3 * (prices.length ? Math.min(...prices) : 1) * problem.slotHours;
  assignment.sequence.forEach((seq) => {
    seq.forEach((s, pos) => {
      const stay = problem.stays[s]!;
      for (let t = stay.arriveSlot; t < stay.departSlot; t++) {
        const col = model.pCol[stay.bus]![t]!;
        if (col >= 0) colCost[col] = colCost[col]! - (eps * pos * t) / problem.slotCount;
      }
    });
  });
  const starts = Array.from(lp.starts);
  const indices = Array.from(lp.indices);
  const values = Array.from(lp.values);
  const lower = Array.from(lp.rowLower);
  const upper = Array.from(lp.rowUpper);
  problem.chargers.forEach((charger, c) => {
    if (onCharger[c]!.length < 2) return;
    for (let t = 0; t < problem.slotCount; t++) {
      const idx: number[] = [];
      const val: number[] = [];
      for (const s of onCharger[c]!) {
        const stay = problem.stays[s]!;
        if (t < stay.arriveSlot || t >= stay.departSlot || plug[stay.bus]![t] !== c) continue;
        idx.push(model.pCol[stay.bus]![t]!);
        val.push(1 / Math.min(problem.buses[stay.bus]!.maxKw, charger.maxKw));
      }
      if (idx.length < 2) continue;
      indices.push(...idx);
      values.push(...val);
      starts.push(indices.length);
      lower.push(-Infinity);
      upper.push(1);
    }
  });
  const shared: Lp = {
    ...lp,
    colCost,
    numRows: lower.length,
    starts: Int32Array.from(starts),
    indices: Int32Array.from(indices),
    values: Float64Array.from(values),
    rowLower: Float64Array.from(lower),
    rowUpper: Float64Array.from(upper),
  };
  const res = solver.solve(shared);
  return res.status === 'optimal' ? powerFrom(problem, model, res.x) : null;
}

/** The assignment with each charger's stays ordered and handed over by the given powers. */
export function rebalanced(
  problem: Problem,
  hints: AssignmentHints,
  assignment: Assignment,
  power: Float64Array[],
): Assignment {
  const dt = problem.slotHours;
  const energy = new Float64Array(problem.stays.length);
  const centre = new Float64Array(problem.stays.length);
  const weight = new Float64Array(problem.slotCount);
  for (const stay of problem.stays) {
    let e = 0;
    let m = 0;
    for (let t = stay.arriveSlot; t < stay.departSlot; t++) {
      e += power[stay.bus]![t]! * dt;
      m += power[stay.bus]![t]! * dt * (t + 0.5);
    }
    energy[stay.id] = e;
    centre[stay.id] = e > 1e-9 ? m / e : (stay.arriveSlot + stay.departSlot) / 2;
  }
  for (const row of power) for (let t = 0; t < problem.slotCount; t++) weight[t] = weight[t]! + row[t]!;
  const h: AssignmentHints = { ...hints, energy, centre, weight, power, handover: 'least-cut' };
  const out = cloneAssignment(assignment);
  out.sequence.forEach((seq, c) => {
    if (seq.length < 2 || seq.some((s) => problem.pinned && problem.pinned[s]! >= 0)) return;
    seq.sort((x, y) => centre[x]! - centre[y]! || problem.stays[x]!.departSlot - problem.stays[y]!.departSlot || x - y);
    layoutCharger(problem, h, out, c);
  });
  return out;
}
