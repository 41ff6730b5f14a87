import { createMilp, type Lp, type Solver } from './highs-solver.js';
import { buildChargeModel, energyNeedCap, powerFrom } from './lp-model.js';
import type { Problem } from './problem.js';

// A lower bound that knows the crew's hours. Between two crew windows (e.g. 23:30 to 04:30)
// nobody can plug in or unplug a bus, so every charger holds the same bus (or none) through the
// whole stretch; only drivers move, at a pull-in or a pull-out. The relaxation of lower-bound.ts
// lets the chargers pass from bus to bus in every slot, so there the night's energy can be spread
// over all the buses, which no plan can do. Here the relaxation gets, per crew-less stretch in
// which no bus pulls in or out, binaries h[s,k]: stay s holds a charger of group k (chargers of
// the same power, cabinet and availability) through the stretch. Rows: at most as many holders
// as the group has chargers, a stay holds at most one charger, and in every slot of the stretch
// a stay draws at most min(bus kW, group kW) times its holder binaries (zero if it holds none).
// Every plan the crew can carry out (one session per stay or several) is feasible here, so the
// MILP's optimum, and its dual bound when a node budget stops it, bound every plan's cost. On
// larger depots the LP alone (`relaxed`) keeps most of that: a fractional holder still takes at
// most its share of the energy it needs, so the night's energy cannot be spread over every bus
// (40 buses on 10 chargers: relaxation 3,072.53, this LP 3,557.35, the MILP's root 3,561.85).
//
// The stretch runs from the last crew slot before it (a plug-in at that slot's start is the last
// change) to the slot before the next crew window (an unplug at that slot's end is the first).

export interface CrewBound {
  /** Bound on the penalised cost (cost + shortfall penalty) of every plan; -Infinity if none. */
  penalisedBound: number;
  /** HiGHS proved its optimum (else the bound is the dual bound at the node budget). */
  optimal: boolean;
  /** kWh short in the optimum (with `optimal`, or from `relaxed`'s LP, no plan is less short). */
  shortfallKwh: number;
  /** `relaxed` only: the LP's optima rounded (holders fixed, powers solved again); the first is `power`/`holders`. */
  roundings?: { power: Float64Array[]; holders: Int32Array }[];
  /** `relaxed` only: per stay, the LP's price of a kWh less at its departure (null: none). */
  stayDual?: Float64Array | null;
  /** Grid kW per bus per slot in the best solution found (null: none): who charges when, holders kept. */
  power: Float64Array[] | null;
  /** Per stay, the charger it holds through the first stretch in that solution (-1: none); null: no solution. */
  holders: Int32Array | null;
  /** Stretches without crew the bound used, as [first, last] slots. */
  stretches: [number, number][];
  binaries: number;
  nodes: number;
  ms: number;
  /** Stopped by the time cap (the safety net): the bound is then left unused by the engine. */
  timeLimited: boolean;
}

export interface CrewBoundOptions {
  maxNodes?: number;
  /**
   * One session per stay (the engine's plan space): a stay holding no charger through the
   * stretch charges on one side of it only. A bound on the engine's plans, not on every plan;
   * used for the stage-1 hints (who charges in the evening, who in the morning).
   */
  oneSession?: boolean;
  /** Above this many binaries the chargers are taken as one group (default 2,000). */
  maxBinaries?: number;
  timeLimitMs?: number;
  /**
   * Integrality dropped (larger depots): the LP's optimum is still a bound on every plan, a
   * little weaker than the MILP's, in a fraction of its time. Its solution's holders are rounded
   * (per stretch, the stays with the largest h take the group's chargers) and the LP is solved
   * again with them fixed, for powers that keep one bus per charger through the stretch.
   */
  relaxed?: boolean;
  /** Shortfall left free of penalty up to this many kWh in all (checks of a short plan's bound). */
  shortfallCapKwh?: number;
}

/** Crew-less stretches [first, last] (slots) in which no stay begins or ends and some stay is present. */
export function crewGaps(problem: Problem): [number, number][] {
  const capacity = problem.yard?.capacity;
  if (!capacity) return [];
  const T = problem.slotCount;
  const out: [number, number][] = [];
  let t = 0;
  while (t < T) {
    if (capacity[t]! > 0) {
      t++;
      continue;
    }
    let u = t;
    while (u < T && capacity[u] === 0) u++;
    // No change at the starts of slots t..u-1: the pairs are fixed on slots [t-1, u-1].
    const first = Math.max(0, t - 1);
    const last = u - 1;
    t = u;
    if (last <= first) continue;
    let clean = true;
    let present = false;
    for (const s of problem.stays) {
      if (s.departSlot <= first || s.arriveSlot > last) continue;
      present = true;
      if (s.arriveSlot > first || s.departSlot <= last) clean = false;
    }
    if (clean && present) out.push([first, last]);
  }
  return out;
}

export function solveCrewBound(problem: Problem, solver: Solver, options: CrewBoundOptions = {}): CrewBound {
  const t0 = performance.now();
  const stretches = crewGaps(problem);
  const none: CrewBound = {
    penalisedBound: -Infinity,
    optimal: false,
    shortfallKwh: 0,
    power: null,
    holders: null,
    stretches,
    binaries: 0,
    nodes: 0,
    ms: 0,
    timeLimited: false,
  };
  if (stretches.length === 0) return none;
  const model = buildChargeModel(problem, { mode: 'relaxed', tieBreak: false });
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
  const row = (idx: number[], val: number[], lo: number, hi: number) => {
    for (let i = 0; i < idx.length; i++) {
      indices.push(idx[i]!);
      values.push(val[i]!);
    }
    starts.push(indices.length);
    rowLower.push(lo);
    rowUpper.push(hi);
  };
  let binaries = 0;
  // The energy rows below rest on every kWh having a price (no slot free or paid to draw).
  const useful = problem.slots.every((s) => s.price > 0);
  // The first stretch's holder columns (stay, column, the group's chargers): who holds which charger.
  const holderCols: { stay: number; col: number; chargers: number[] }[] = [];
  // Every stretch's holder columns, for rounding the relaxed solution.
  const allHolders: { stretch: number; stay: number; col: number; group: number; count: number }[] = [];
  for (const [stretch, [first, last]] of stretches.entries()) {
    // Charger groups: same power, same binding cabinet, same availability in the stretch.
    const groups = new Map<string, { kw: number; count: number; avail: number[]; chargers: number[] }>();
    for (const c of problem.chargers) {
      const avail: number[] = [];
      for (let t = first; t <= last; t++) avail.push(c.available[t] ? 1 : 0);
      if (!avail.some((v) => v)) continue;
      const g = c.cabinet >= 0 && problem.cabinets[c.cabinet]!.binding ? c.cabinet : -1;
      const key = `${c.maxKw}|${g}|${avail.join('')}`;
      const group = groups.get(key);
      if (group) {
        group.count++;
        group.chargers.push(c.index);
      } else groups.set(key, { kw: c.maxKw, count: 1, avail, chargers: [c.index] });
    }
    let list = [...groups.entries()].sort((x, y) => (x[0] < y[0] ? -1 : x[0] > y[0] ? 1 : 0)).map((e) => e[1]);
    // Many stays and many kinds of charger: one group of all of them at the strongest power and
    // available wherever any is (weaker, still a bound), so the model stays small.
    let through = 0;
    for (const s of problem.stays) if (s.departSlot > first && s.arriveSlot <= last) through++;
    if (through * list.length > (options.maxBinaries ?? (options.relaxed ? 6000 : 2000)) && list.length > 1)
      list = [
        {
          kw: Math.max(...list.map((g) => g.kw)),
          count: list.reduce((a, g) => a + g.count, 0),
          avail: list[0]!.avail.map((_, i) => (list.some((g) => g.avail[i]) ? 1 : 0)),
          chargers: list
            .flatMap((g) => g.chargers)
            .sort((x, y) => problem.chargers[y]!.maxKw - problem.chargers[x]!.maxKw || x - y),
        },
      ];
    const holders: number[][] = list.map(() => []);
    for (const s of problem.stays) {
      if (s.departSlot <= first || s.arriveSlot > last) continue;
      const bus = problem.buses[s.bus]!;
      const hs: { col: number; cap: number; group: number }[] = [];
      list.forEach((g, k) => {
        const cap = Math.min(bus.maxKw, g.kw);
        if (cap <= 0) return;
        cost.push(0);
        lower.push(0);
        upper.push(1);
        integrality.push(1);
        binaries++;
        const col = cost.length - 1;
        hs.push({ col, cap, group: k });
        if (stretch === 0) holderCols.push({ stay: s.id, col, chargers: g.chargers });
        allHolders.push({ stretch, stay: s.id, col, group: k, count: g.count });
        holders[k]!.push(col);
      });
      if (options.oneSession) {
        // One session per stay: a stay that holds no charger through the stretch charges before
        // it (e) or after it (m), not both.
        const e = cost.length;
        const m = e + 1;
        for (let i = 0; i < 2; i++) {
          cost.push(0);
          lower.push(0);
          upper.push(1);
          integrality.push(1);
          binaries++;
        }
        const kw = Math.max(0, ...hs.map((h) => h.cap));
        for (let t = s.arriveSlot; t < s.departSlot; t++) {
          if (t >= first && t <= last) continue;
          const p = model.pCol[s.bus]![t]!;
          if (p < 0) continue;
          row([p, t < first ? e : m, ...hs.map((h) => h.col)], [1, -kw, ...hs.map(() => -kw)], -Infinity, 0);
        }
        row([e, m, ...hs.map((h) => h.col)], [1, 1, ...hs.map(() => 1)], -Infinity, 1);
      } else if (hs.length > 1)
        row(
          hs.map((h) => h.col),
          hs.map(() => 1),
          -Infinity,
          1,
        );
      // Energy: a stay takes at most what brings it to the most it needs (an optimal plan never
      // charges more, every kWh having a price), so through the stretch at most that times h.
      if (useful) {
        const base = bus.arrivalKwh - s.runsBeforeKwh;
        const most = Math.max(0, energyNeedCap(problem, s.bus)[s.indexOnBus]! - base) / problem.eta;
        const idx: number[] = [];
        const val: number[] = [];
        for (let t = first; t <= last; t++) {
          const p = model.pCol[s.bus]![t]!;
          if (p < 0) continue;
          idx.push(p);
          val.push(problem.slotHours);
        }
        for (const h of hs) {
          idx.push(h.col);
          val.push(-most);
        }
        if (idx.length > hs.length) row(idx, val, -Infinity, 0);
      }
      for (let t = first; t <= last; t++) {
        const p = model.pCol[s.bus]![t]!;
        if (p < 0) continue;
        const idx = [p];
        const val = [1];
        for (const h of hs) {
          if (!list[h.group]!.avail[t - first]) continue;
          idx.push(h.col);
          val.push(-h.cap);
        }
        row(idx, val, -Infinity, 0);
      }
    }
    list.forEach((g, k) => {
      const cols = holders[k]!;
      if (cols.length > g.count)
        row(
          cols,
          cols.map(() => 1),
          -Infinity,
          g.count,
        );
    });
  }

  const holdersOf = (x: Float64Array) => {
    const out = new Int32Array(problem.stays.length).fill(-1);
    const next = new Map<number[], number>();
    for (const h of holderCols) {
      if (x[h.col]! < 0.5) continue;
      const i = next.get(h.chargers) ?? 0;
      next.set(h.chargers, i + 1);
      out[h.stay] = h.chargers[i] ?? -1;
    }
    return out;
  };
  if (options.shortfallCapKwh !== undefined) {
    // Shortfall free of penalty up to the cap in all: a bound for plans at most that short.
    const short = problem.stays.map((st) => model.shortCol[st.id]!).filter((c) => c >= 0);
    for (const c of short) cost[c] = 0;
    row(
      short,
      short.map(() => 1),
      -Infinity,
      options.shortfallCapKwh,
    );
  }
  // The model as built: the relaxed LPs and the MILP below differ only in integrality.
  const parts = { offset: lp.offset, cost, lower, upper, rowLower, rowUpper, starts, indices, values };
  if (options.relaxed) {
    const asLp = (lo: number[], hi: number[]): Lp => ({
      numCols: cost.length,
      numRows: rowLower.length,
      offset: lp.offset,
      colCost: Float64Array.from(cost),
      colLower: Float64Array.from(lo),
      colUpper: Float64Array.from(hi),
      rowLower: Float64Array.from(rowLower),
      rowUpper: Float64Array.from(rowUpper),
      starts: Int32Array.from(starts),
      indices: Int32Array.from(indices),
      values: Float64Array.from(values),
    });
    const first = solver.solve(asLp(lower, upper));
    const x = first.status === 'optimal' ? first.x : null;
    const roundings: { power: Float64Array[]; holders: Int32Array }[] = [];
    // The LP's optimum is as short as any plan must be (the shortfall penalty outweighs every
    // cost, as in the relaxation of lower-bound.ts); its departure rows' duals price a kWh short.
    let shortfall = 0;
    let stayDual: Float64Array | null = null;
    if (x) {
      stayDual = new Float64Array(problem.stays.length);
      for (const s of problem.stays) {
        if (model.shortCol[s.id]! >= 0) shortfall += x[model.shortCol[s.id]!]!;
        const r = model.departRow[s.id]!;
        if (r >= 0) stayDual[s.id] = Math.abs(first.rowDual[r]!);
      }
      // Rounded: per stretch, the largest h first (ties by stay), while its group has a charger
      // left and the stay holds none yet; the rest may not hold one. The LP has many optima (the
      // night's energy can sit with one holder or another at the same cost), and which one is
      // rounded decides the candidates: both HiGHS's LP path and its MIP path (integrality
      // dropped) give one, and each is rounded (with either alone, a depot of 40-200 buses was
      // up to 11 % dearer or up to 70 kWh shorter, measured before the later steps).
      const second = createMilp(
        solver,
        { ...parts, integrality: integrality.map(() => 0) },
        { timeLimitMs: options.timeLimitMs ?? 5000, maxNodes: 1 },
      );
      let x2: Float64Array | null = null;
      try {
        if ((second.run().modelStatus as number) === 7) x2 = second.getSolution().colValue;
      } finally {
        second.dispose();
      }
      const seen = new Set<string>();
      for (const sol of x2 ? [x, x2] : [x]) {
        const fixedUpper = upper.slice();
        const fixedLower = lower.slice();
        const order = allHolders
          .slice()
          .sort((a, b) => sol[b.col]! - sol[a.col]! || a.stretch - b.stretch || a.col - b.col);
        const used = new Map<string, number>();
        const holding = new Set<string>();
        for (const h of order) {
          const g = `${h.stretch}|${h.group}`;
          const stay = `${h.stretch}|${h.stay}`;
          if (sol[h.col]! > 1e-6 && (used.get(g) ?? 0) < h.count && !holding.has(stay)) {
            used.set(g, (used.get(g) ?? 0) + 1);
            holding.add(stay);
            fixedLower[h.col] = 1;
          } else fixedUpper[h.col] = 0;
        }
        const key = fixedLower.join();
        if (seen.has(key)) continue;
        seen.add(key);
        const fixed = solver.solve(asLp(fixedLower, fixedUpper));
        if (fixed.status !== 'optimal') continue;
        roundings.push({ power: powerFrom(problem, model, fixed.x), holders: holdersOf(fixed.x) });
      }
    }
    return {
      penalisedBound: x ? first.objective - 1e-6 * Math.max(1, Math.abs(first.objective)) : -Infinity,
      optimal: false,
      shortfallKwh: shortfall,
      stayDual,
      power: roundings[0]?.power ?? null,
      holders: roundings[0]?.holders ?? null,
      roundings,
      stretches,
      binaries,
      nodes: 0,
      ms: performance.now() - t0,
      timeLimited: false,
    };
  }

  const milp = createMilp(
    solver,
    { ...parts, integrality },
    { timeLimitMs: options.timeLimitMs ?? 5000, maxNodes: options.maxNodes ?? 200 },
  );
  try {
    const run = milp.run();
    const code = run.modelStatus as number;
    const info = (name: string) => {
      try {
        return Number(milp.info.get(name));
      } catch {
        return NaN;
      }
    };
    const hasSolution = info('primal_solution_status') === 2;
    const optimal = code === 7 && hasSolution;
    let bound = info('mip_dual_bound');
    let shortfall = 0;
    let power: Float64Array[] | null = null;
    let holders: Int32Array | null = null;
    if (hasSolution) {
      const x = milp.getSolution().colValue;
      power = powerFrom(problem, model, x);
      holders = holdersOf(x);
      if (optimal) {
        const primal = milp.getObjectiveValue();
        bound = Math.max(Number.isFinite(bound) ? bound : -Infinity, primal - Math.max(1e-6, 1e-6 * Math.abs(primal)));
        for (const s of problem.stays) if (model.shortCol[s.id]! >= 0) shortfall += x[model.shortCol[s.id]!]!;
      }
    }
    return {
      penalisedBound: Number.isFinite(bound) ? bound : -Infinity,
      optimal,
      shortfallKwh: shortfall,
      power,
      holders,
      stretches,
      binaries,
      nodes: info('mip_node_count'),
      ms: performance.now() - t0,
      timeLimited: code === 13,
    };
  } finally {
    milp.dispose();
  }
}
