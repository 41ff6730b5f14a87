import type { Assignment } from './assignment.js';
import { crewGaps } from './crew-bound.js';
import { endIsFree, minWindow, startIsFree } from './crew.js';
import { createMilp, type Solver } from './highs-solver.js';
import { buildChargeModel, energyNeedCap, type ChargeModel } from './lp-model.js';
import { emptyPlugMap, type Problem } from './problem.js';

// The exact assignment problem as a mixed-integer program (HiGHS), over the engine's plan space:
// each stay plugged in at most once (one session per stay), on one charger, for a contiguous
// window; the charging LP decides the power inside. With crew rules the windows keep the
// minimum plug-in, and every crew move (a plug-in after the stay's first slot, an unplug before
// its last) falls in a slot where the crew has room.
//
// Binaries per free stay s, charger c and slot t: x (s on c in t) and y (s plugged into c at t);
// with crew room limited also z (s unplugged from c at the start of t). Rows:
//   x[t] <= x[t-1] + y[t]; sum over c, t of y <= 1 (one plug-in per stay);
//   m y[t] <= x[t] + ... + x[t+m-1] (minimum plug-in m);  z[t] >= x[t-1] - x[t];
//   sum over free stays of x[s,c,t] <= 1 (one bus per charger); sum over c of x[s,c,t] <= 1;
//   p[b,t] <= sum_c min(bus, charger kW) x[s,c,t] (a cabinet's chargers through q[s,c,t]);
//   crew moves per slot (free stays' y and z, the fixed stays' moves) <= the crew's room.
// Used three ways: the whole depot when it is small (its optimum, or its bound), a neighbourhood
// of a few chargers with the rest of the plan fixed (large-neighbourhood search), and to prove a
// shortfall necessary. HiGHS is single-threaded here and stops on a node limit, so the same model
// gives the same answer; its time limit is only a safety net.

export interface ExactOptions {
  /** Stays free to be placed (default: all). Every other stay keeps its place in `fixed`. */
  stays?: number[];
  /** Chargers the free stays may use (default: all). Must hold none of the fixed stays. */
  chargers?: number[];
  /** The plan the other stays keep (required when `stays` is given). */
  fixed?: Assignment;
  /** A plan to start from (its free stays' places are given to HiGHS as a first solution). */
  start?: Assignment;
  maxNodes?: number;
  timeLimitMs?: number;
}

export interface ExactResult {
  /** optimal: proven; feasible: a plan found, not proven; infeasible: none (cannot happen with
   *  shortfall columns unless crew rules leave no room); limit: nothing found in the limits. */
  status: 'optimal' | 'feasible' | 'infeasible' | 'limit';
  assignment: Assignment | null;
  /** Penalised objective of the best plan found (cost + shortfall penalty), NaN if none. */
  objective: number;
  /** Proven lower bound on the penalised objective of every plan of this space. */
  bound: number;
  /** kWh short in the best plan found. */
  shortfallKwh: number;
  nodes: number;
  binaries: number;
  ms: number;
  /** HiGHS stopped on the time cap (the safety net), not on its node limit or an optimum. */
  timeLimited: boolean;
}

/** Number of binaries the exact model of a whole depot would have (to decide whether to try it). */
export function exactSize(problem: Problem, stays?: number[], chargers?: number[]): number {
  const cs = chargers ?? problem.chargers.map((c) => c.index);
  const ss = stays ?? problem.stays.map((s) => s.id);
  const perSlot = problem.yard?.capacity ? 3 : 2;
  let n = 0;
  for (const id of ss) {
    const s = problem.stays[id]!;
    n += (s.departSlot - s.arriveSlot) * cs.length * perSlot;
  }
  return n;
}

export function solveExact(problem: Problem, solver: Solver, options: ExactOptions = {}): ExactResult {
  const t0 = performance.now();
  const { slotCount: T } = problem;
  const freeStays = options.stays ?? problem.stays.filter((s) => s.departSlot > s.arriveSlot).map((s) => s.id);
  const freeSet = new Set(freeStays);
  const chargers = options.chargers ?? problem.chargers.map((c) => c.index);
  const fixed = options.fixed;
  const yard = problem.yard;
  const capacity = yard?.capacity ?? null;

  // The LP part: fixed stays on their chargers, free buses' power bounded below by binaries.
  const plug = emptyPlugMap(problem);
  if (fixed) {
    for (const s of problem.stays) {
      if (freeSet.has(s.id)) continue;
      const c = fixed.chargerOf[s.id]!;
      if (c < 0) continue;
      for (let t = fixed.from[s.id]!; t < fixed.to[s.id]!; t++)
        if (problem.chargers[c]!.available[t]) plug[s.bus]![t] = c;
    }
  }
  const model: ChargeModel = buildChargeModel(problem, {
    mode: 'assigned',
    plug,
    cabinetsUnlimited: true,
    allRows: true,
  });
  const lp = model.lp;
  const cost = Array.from(lp.colCost);
  const lower = Array.from(lp.colLower);
  const upper = Array.from(lp.colUpper);
  const integrality: number[] = new Array(cost.length).fill(0);
  const starts = Array.from(lp.starts);
  const indices = Array.from(lp.indices);
  const values = Array.from(lp.values);
  const rowLower = Array.from(lp.rowLower);
  const rowUpper = Array.from(lp.rowUpper);
  const col = (c: number, lo: number, hi: number, integer: boolean) => {
    cost.push(c);
    lower.push(lo);
    upper.push(hi);
    integrality.push(integer ? 1 : 0);
    return cost.length - 1;
  };
  const row = (idx: number[], val: number[], lo: number, hi: number) => {
    for (let i = 0; i < idx.length; i++) {
      indices.push(idx[i]!);
      values.push(val[i]!);
    }
    starts.push(indices.length);
    rowLower.push(lo);
    rowUpper.push(hi);
  };

  const bindingCab = (c: number) => {
    const g = problem.chargers[c]!.cabinet;
    return g >= 0 && problem.cabinets[g]!.binding ? g : -1;
  };
  // Per charger and slot: the x columns of free stays; per cabinet and slot: q columns.
  const onCharger = new Map<number, number[]>();
  const cabTerms = new Map<number, number[]>();
  const key = (c: number, t: number) => c * (T + 1) + t;
  // Crew moves per slot: columns (with coefficient 1) and moves the fixed stays already make.
  const moveCols: number[][] = Array.from({ length: T + 1 }, () => []);
  const xCol = new Map<number, Int32Array[]>(); // stay -> per charger slot -> column
  const yCols: { stay: number; c: number; t: number; col: number }[] = [];
  let binaries = 0;
  const bin = () => {
    binaries++;
    return col(0, 0, 1, true);
  };
  for (const id of freeStays) {
    const s = problem.stays[id]!;
    const bus = problem.buses[s.bus]!;
    const pinnedTo = problem.pinned && problem.pinned[id]! >= 0 ? problem.pinned[id]! : -1;
    const m = minWindow(problem, s);
    const perCharger: Int32Array[] = [];
    const startsOfStay: number[] = [];
    const xsBySlot: number[][] = Array.from({ length: s.departSlot - s.arriveSlot }, () => []);
    const powerTerms: { idx: number[]; val: number[] }[] = Array.from({ length: s.departSlot - s.arriveSlot }, () => ({
      idx: [],
      val: [],
    }));
    let widest = 0;
    for (const c of chargers) {
      const xs = new Int32Array(T).fill(-1);
      perCharger[c] = xs;
      if (pinnedTo >= 0 && c !== pinnedTo) continue;
      const ch = problem.chargers[c]!;
      const cap = Math.min(bus.maxKw, ch.maxKw);
      if (cap <= 0) continue;
      widest = Math.max(widest, cap);
      const g = bindingCab(c);
      for (let t = s.arriveSlot; t < s.departSlot; t++) if (ch.available[t]) xs[t] = bin();
      for (let t = s.arriveSlot; t < s.departSlot; t++) {
        const x = xs[t]!;
        if (x < 0) continue;
        xsBySlot[t - s.arriveSlot]!.push(x);
        const k = key(c, t);
        if (!onCharger.has(k)) onCharger.set(k, []);
        onCharger.get(k)!.push(x);
        if (g >= 0) {
          const q = col(0, 0, cap, false);
          row([q, x], [1, -cap], -Infinity, 0);
          powerTerms[t - s.arriveSlot]!.idx.push(q);
          powerTerms[t - s.arriveSlot]!.val.push(-1);
          const gk = g * (T + 1) + t;
          if (!cabTerms.has(gk)) cabTerms.set(gk, []);
          cabTerms.get(gk)!.push(q);
        } else {
          powerTerms[t - s.arriveSlot]!.idx.push(x);
          powerTerms[t - s.arriveSlot]!.val.push(-cap);
        }
        // A plug-in at t: allowed if the window [t, t+m) fits and the move can be made.
        let y = -1;
        const fits = t + m <= s.departSlot && (pinnedTo < 0 || t === s.arriveSlot);
        let whole = fits;
        for (let u = t; u < t + m && whole; u++) if (!ch.available[u]) whole = false;
        const free = startIsFree(problem, s, t);
        const crewOk = free || !capacity || capacity[t]! > 0;
        if (whole && crewOk) {
          y = bin();
          startsOfStay.push(y);
          yCols.push({ stay: id, c, t, col: y });
          if (!free) moveCols[t]!.push(y);
          // Minimum plug-in: m y <= x[t..t+m-1].
          if (m > 1) {
            const idx = [y];
            const val = [m];
            for (let u = t; u < t + m; u++) {
              idx.push(xs[u]!);
              val.push(-1);
            }
            row(idx, val, -Infinity, 0);
          }
          if (pinnedTo >= 0) {
            lower[y] = 1;
          }
        }
        // Contiguity: x[t] <= x[t-1] + y[t].
        const prev = t > s.arriveSlot ? xs[t - 1]! : -1;
        const idx = [x];
        const val = [1];
        if (prev >= 0) {
          idx.push(prev);
          val.push(-1);
        }
        if (y >= 0) {
          idx.push(y);
          val.push(-1);
        }
        row(idx, val, -Infinity, 0);
        // Unplug at the start of t (end of slot t-1) before the stay's end.
        if (prev >= 0) {
          const freeEnd = endIsFree(problem, s, t);
          if (!freeEnd && capacity) {
            if (capacity[t]! <= 0) {
              row([prev, x], [1, -1], -Infinity, 0); // no one to unplug it: stays on
            } else {
              const z = bin();
              row([z, prev, x], [1, -1, 1], 0, Infinity);
              moveCols[t]!.push(z);
            }
          }
        }
      }
      // Unplug at the stay's end, when that is a crew move (drivers do not unplug).
      if (s.departSlot < T && !endIsFree(problem, s, s.departSlot) && capacity && xs[s.departSlot - 1]! >= 0)
        moveCols[s.departSlot]!.push(xs[s.departSlot - 1]!);
    }
    if (startsOfStay.length)
      row(
        startsOfStay,
        startsOfStay.map(() => 1),
        -Infinity,
        1,
      );
    for (let t = s.arriveSlot; t < s.departSlot; t++) {
      const xs = xsBySlot[t - s.arriveSlot]!;
      if (xs.length > 1)
        row(
          xs,
          xs.map(() => 1),
          -Infinity,
          1,
        );
      const pc = model.pCol[s.bus]![t]!;
      if (pc < 0) continue;
      upper[pc] = Math.min(bus.maxKw, widest);
      const pt = powerTerms[t - s.arriveSlot]!;
      row([pc, ...pt.idx], [1, ...pt.val], -Infinity, 0);
    }
    xCol.set(id, perCharger);
  }
  // Crew-less stretches (see crew-bound.ts): a stay is on a charger through the whole stretch
  // or on none, and takes there at most the energy it needs (every kWh has a price) times that.
  // Redundant for integer x; it cuts the relaxation's spreading of the night over all buses.
  if (capacity && problem.slots.every((sl) => sl.price > 0)) {
    for (const [first, last] of crewGaps(problem)) {
      for (const id of freeStays) {
        const s = problem.stays[id]!;
        if (s.departSlot <= first || s.arriveSlot > last) continue;
        const perCharger = xCol.get(id)!;
        const bus = problem.buses[s.bus]!;
        const most =
          Math.max(0, energyNeedCap(problem, s.bus)[s.indexOnBus]! - (bus.arrivalKwh - s.runsBeforeKwh)) / problem.eta;
        const idx: number[] = [];
        const val: number[] = [];
        for (let t = first; t <= last; t++) {
          const pc = model.pCol[s.bus]![t]!;
          if (pc < 0) continue;
          idx.push(pc);
          val.push(problem.slotHours);
        }
        const n = idx.length;
        if (n === 0) continue;
        for (const c of chargers) {
          const xs = perCharger[c];
          if (!xs) continue;
          // The charger's x at the stretch's first slot it is available in.
          for (let t = first; t <= last; t++)
            if (xs[t]! >= 0) {
              idx.push(xs[t]!);
              val.push(-most);
              break;
            }
        }
        if (idx.length > n) row(idx, val, -Infinity, 0);
      }
    }
  }
  for (const xs of onCharger.values())
    if (xs.length > 1)
      row(
        xs,
        xs.map(() => 1),
        -Infinity,
        1,
      );

  // Cabinets: fixed buses on the cabinet's chargers plus the free stays' q columns.
  problem.cabinets.forEach((cab, g) => {
    if (!cab.binding) return;
    for (let t = 0; t < T; t++) {
      const idx: number[] = [];
      for (const bus of problem.buses) {
        const c = plug[bus.index]![t]!;
        if (c >= 0 && problem.chargers[c]!.cabinet === g && model.pCol[bus.index]![t]! >= 0)
          idx.push(model.pCol[bus.index]![t]!);
      }
      for (const q of cabTerms.get(g * (T + 1) + t) ?? []) idx.push(q);
      if (idx.length)
        row(
          idx,
          idx.map(() => 1),
          -Infinity,
          cab.limitKw,
        );
    }
  });

  // Crew room per slot, less the moves the fixed stays make.
  if (capacity) {
    const fixedMoves = new Int32Array(T + 1);
    if (fixed) {
      for (const s of problem.stays) {
        if (freeSet.has(s.id)) continue;
        const c = fixed.chargerOf[s.id]!;
        const from = fixed.from[s.id]!;
        const to = fixed.to[s.id]!;
        if (c < 0 || to <= from) continue;
        if (!startIsFree(problem, s, from)) fixedMoves[from]!++;
        if (!endIsFree(problem, s, to)) fixedMoves[to]!++;
      }
    }
    for (let t = 0; t < T; t++) {
      const cols = moveCols[t]!;
      if (cols.length === 0) continue;
      const room = capacity[t]! - fixedMoves[t]!;
      row(
        cols,
        cols.map(() => 1),
        -Infinity,
        Math.max(0, room),
      );
    }
  }

  const milp = createMilp(
    solver,
    { offset: lp.offset, cost, lower, upper, rowLower, rowUpper, starts, indices, values, integrality },
    { timeLimitMs: options.timeLimitMs ?? 3000, maxNodes: options.maxNodes ?? 2000 },
  );
  try {
    if (options.start) {
      // Only the binaries: HiGHS completes the continuous part by solving the LP.
      const start = options.start;
      const idx: number[] = [];
      const val: number[] = [];
      for (const [id, perCharger] of xCol) {
        const s = problem.stays[id]!;
        const c = start.chargerOf[id]!;
        const from = start.from[id]!;
        const to = start.to[id]!;
        for (const ch of chargers) {
          const xs = perCharger[ch];
          if (!xs) continue;
          for (let t = s.arriveSlot; t < s.departSlot; t++) {
            if (xs[t]! < 0) continue;
            idx.push(xs[t]!);
            val.push(ch === c && t >= from && t < to ? 1 : 0);
          }
        }
      }
      for (const y of yCols) {
        idx.push(y.col);
        val.push(start.chargerOf[y.stay] === y.c && start.from[y.stay] === y.t && start.to[y.stay]! > y.t ? 1 : 0);
      }
      try {
        milp.setSolution({ indices: Int32Array.from(idx), values: Float64Array.from(val) } as never);
      } catch {
        // A start HiGHS cannot read is only a lost hint.
      }
    }
    const run = milp.run();
    const code = run.modelStatus as number;
    const info = (name: string) => {
      try {
        return Number(milp.info.get(name));
      } catch {
        return NaN;
      }
    };
    const nodes = info('mip_node_count');
    const hasSolution = info('primal_solution_status') === 2;
    const primal = hasSolution ? (milp as unknown as { getObjectiveValue(): number }).getObjectiveValue() : NaN;
    let bound = info('mip_dual_bound');
    let status: ExactResult['status'] =
      code === 7 ? 'optimal' : code === 8 ? 'infeasible' : hasSolution ? 'feasible' : 'limit';
    if (status === 'optimal' && !hasSolution) status = 'limit';
    if (!Number.isFinite(bound)) bound = -Infinity;
    if (status === 'optimal') bound = Math.max(bound, primal - Math.max(1e-6, 1e-6 * Math.abs(primal)));
    let assignment: Assignment | null = null;
    let shortfall = NaN;
    if (status === 'optimal' || status === 'feasible') {
      const x = milp.getSolution().colValue;
      assignment = {
        chargerOf: fixed ? fixed.chargerOf.slice() : new Int32Array(problem.stays.length).fill(-1),
        from: fixed ? fixed.from.slice() : new Int32Array(problem.stays.length),
        to: fixed ? fixed.to.slice() : new Int32Array(problem.stays.length),
        sequence: [],
      };
      for (const id of freeStays) {
        assignment.chargerOf[id] = -1;
        assignment.from[id] = 0;
        assignment.to[id] = 0;
      }
      for (const [id, perCharger] of xCol) {
        const s = problem.stays[id]!;
        for (const c of chargers) {
          const xs = perCharger[c];
          if (!xs) continue;
          let first = -1;
          let last = -1;
          for (let t = s.arriveSlot; t < s.departSlot; t++) {
            if (xs[t]! >= 0 && x[xs[t]!]! > 0.5) {
              if (first < 0) first = t;
              last = t;
            }
          }
          if (first >= 0) {
            assignment.chargerOf[id] = c;
            assignment.from[id] = first;
            assignment.to[id] = last + 1;
          }
        }
      }
      assignment.sequence = problem.chargers.map(() => []);
      for (const s of problem.stays) {
        const c = assignment.chargerOf[s.id]!;
        if (c >= 0) assignment.sequence[c]!.push(s.id);
      }
      for (const seq of assignment.sequence) seq.sort((p, q) => assignment!.from[p]! - assignment!.from[q]! || p - q);
      shortfall = 0;
      for (const s of problem.stays) if (model.shortCol[s.id]! >= 0) shortfall += x[model.shortCol[s.id]!]!;
    }
    return {
      status,
      assignment,
      objective: status === 'optimal' || status === 'feasible' ? primal : NaN,
      bound,
      shortfallKwh: shortfall,
      nodes,
      binaries,
      ms: performance.now() - t0,
      timeLimited: code === 13,
    };
  } finally {
    milp.dispose();
  }
}
