import type { Lp } from './highs-solver.js';
import type { PlugMap, Problem } from './problem.js';

// The charging LP of the scheduling brief. Columns: p[b,t] (grid kW to bus b in slot t, one per
// slot the bus spends at the depot), L[t] (site charging load), D_f and D_k (facility and period
// peaks), s (kWh short at a departure), C (cumulative grid energy, only where a taper can bind).
// The same model serves the lower bound ("relaxed": any bus may charge whenever it is present,
// only the total is capped by the strongest chargers) and a fixed assignment ("assigned": a bus
// may draw power only in slots where the plug map puts it on a charger).

export interface ModelOptions {
  mode: 'relaxed' | 'assigned';
  plug?: PlugMap;
  /** Variants used to explain a shortfall: lift the site limit or the cabinet limits. */
  siteUnlimited?: boolean;
  cabinetsUnlimited?: boolean;
  /** Tiny preference for earlier energy so equal-cost plans come out the same way every time. */
  tieBreak?: boolean;
  /**
   * Write every taper and ceiling row. By default rows are left out where the battery never
   * needs to be that full (see `energyNeedCap`); the caller checks the solution and rebuilds
   * with all rows in the rare case it overfilled a battery.
   */
  allRows?: boolean;
}

/**
 * Most energy a bus needs to hold during each stay: its arrival energy or a later departure's
 * requirement (after the runs in between). With a positive cost on every kWh, an optimal plan
 * never fills a battery above this, so taper and ceiling rows above it cannot bind; in the
 * lower bound, leaving rows out can only lower the bound, which keeps it valid.
 */
export function energyNeedCap(problem: Problem, b: number): number[] {
  const bus = problem.buses[b]!;
  const caps: number[] = [];
  let arrivalUpper = bus.arrivalKwh;
  bus.stays.forEach((stay, j) => {
    let cap = arrivalUpper;
    for (let k = j; k < bus.stays.length; k++) {
      const later = bus.stays[k]!;
      cap = Math.max(cap, later.requiredKwh + later.runsBeforeKwh - stay.runsBeforeKwh);
    }
    caps.push(cap);
    arrivalUpper = cap - stay.runKwh;
  });
  return caps;
}

export interface ChargeModel {
  lp: Lp;
  options: ModelOptions;
  /** pCol[b][t]: column of p[b,t], or -1 where the bus is away. */
  pCol: Int32Array[];
  loadCol: Int32Array;
  shortCol: Int32Array;
  departRow: Int32Array;
  /** cabinetRow[g][t]: row of the cabinet limit, or -1 (assigned mode, binding cabinets only). */
  cabinetRow: Int32Array[];
  /** Penalty and tie-break parts are not costs: this is how to strip them from an objective. */
  tieBreakCost: Float64Array;
  /** Columns of the facility peak D_f and of each period's peak D_k (-1: no demand charge there). */
  demandCols: { facility: number; periods: number[] };
  /** Per demand column (same order as demandCols), the row tying it to each slot's demand (-1: none). */
  demandRows: { facility: Int32Array; periods: Int32Array[] };
}

class Rows {
  starts: number[] = [0];
  indices: number[] = [];
  values: number[] = [];
  lower: number[] = [];
  upper: number[] = [];
  add(idx: number[], val: number[], lower: number, upper: number): number {
    for (let i = 0; i < idx.length; i++) {
      this.indices.push(idx[i]!);
      this.values.push(val[i]!);
    }
    this.starts.push(this.indices.length);
    this.lower.push(lower);
    this.upper.push(upper);
    return this.lower.length - 1;
  }
}

class Cols {
  cost: number[] = [];
  lower: number[] = [];
  upper: number[] = [];
  add(cost: number, lower: number, upper: number): number {
    this.cost.push(cost);
    this.lower.push(lower);
    this.upper.push(upper);
    return this.cost.length - 1;
  }
}

/** Upper bound of p[b,t] under a plug map. */
export function plugUpper(problem: Problem, b: number, t: number, charger: number): number {
  if (charger < 0) return 0;
  const c = problem.chargers[charger]!;
  return c.available[t] ? Math.min(problem.buses[b]!.maxKw, c.maxKw) : 0;
}

/**
 * Most power k buses can draw at once from distinct available chargers, cabinet limits
 * included. Per cabinet the best j chargers give a concave function of j, so taking the largest
 * marginal gains greedily is optimal.
 */
export function topChargerPower(problem: Problem, t: number, k: number, cabinetsUnlimited = false): number {
  const gains: number[] = [];
  const groups = new Map<number, number[]>();
  for (const c of problem.chargers) {
    if (!c.available[t]) continue;
    const g = cabinetsUnlimited || c.cabinet < 0 || !problem.cabinets[c.cabinet]!.binding ? -1 - c.index : c.cabinet;
    if (!groups.has(g)) groups.set(g, []);
    groups.get(g)!.push(c.maxKw);
  }
  for (const [g, powers] of groups) {
    powers.sort((x, y) => y - x);
    let left = g >= 0 ? problem.cabinets[g]!.limitKw : Infinity;
    for (const p of powers) {
      const gain = Math.min(p, left);
      left -= gain;
      gains.push(gain);
    }
  }
  gains.sort((x, y) => y - x);
  let sum = 0;
  for (let i = 0; i < Math.min(k, gains.length); i++) sum += gains[i]!;
  return sum;
}

export function buildChargeModel(problem: Problem, options: ModelOptions): ChargeModel {
  const { slotCount: T, slotHours: dt, eta, buses, slots, tariff } = problem;
  const cols = new Cols();
  const rows = new Rows();
  const plug = options.plug;
  const assigned = options.mode === 'assigned';
  if (assigned && !plug) throw new Error('assigned mode needs a plug map');
  const strongest = new Float64Array(T);
  for (let t = 0; t < T; t++) {
    for (const c of problem.chargers) if (c.available[t]) strongest[t] = Math.max(strongest[t]!, c.maxKw);
  }
  const positivePrices = slots.map((s) => s.price).filter((p) => p > 0);
  const eps = options.tieBreak ? 1e-7 * (positivePrices.length ? Math.min(...positivePrices) : 1) * dt : 0;

  // p columns
  const pCol = buses.map(() => new Int32Array(T).fill(-1));
  const tieBreakCost: number[] = [];
  for (const bus of buses) {
    for (const t of bus.slots) {
      const upper = assigned
        ? plugUpper(problem, bus.index, t, plug![bus.index]![t]!)
        : Math.min(bus.maxKw, strongest[t]!);
      const cost = eps * (1 + t / T);
      pCol[bus.index]![t] = cols.add(cost, 0, upper);
      tieBreakCost.push(cost);
    }
  }
  // L columns: the site limit (and, relaxed, the chargers' total) is a bound on L[t].
  const loadCol = new Int32Array(T);
  for (let t = 0; t < T; t++) {
    const s = slots[t]!;
    let upper = options.siteUnlimited ? Infinity : Math.max(0, s.limitKw - s.otherKw);
    if (!assigned) upper = Math.min(upper, topChargerPower(problem, t, problem.present[t]!, options.cabinetsUnlimited));
    loadCol[t] = cols.add(s.price * dt, 0, upper);
    tieBreakCost.push(0);
  }
  for (let t = 0; t < T; t++) {
    const idx = [loadCol[t]!];
    const val = [1];
    for (const bus of buses) {
      const c = pCol[bus.index]![t]!;
      if (c >= 0) {
        idx.push(c);
        val.push(-1);
      }
    }
    rows.add(idx, val, 0, 0);
  }
  // Demand: D >= site demand in each slot it covers; only the part above the peak so far costs.
  let offset = 0;
  const demandRowsOf: Int32Array[] = [];
  const demandVar = (rate: number, peakSoFar: number, slotSet: number[]): number => {
    const rowOf = new Int32Array(T).fill(-1);
    demandRowsOf.push(rowOf);
    if (rate <= 0 || slotSet.length === 0) return -1;
    let lower = peakSoFar;
    for (const t of slotSet) lower = Math.max(lower, slots[t]!.otherKw);
    const d = cols.add(rate, lower, Infinity);
    tieBreakCost.push(0);
    offset -= rate * peakSoFar;
    for (const t of slotSet) {
      if (problem.present[t]! > 0) rowOf[t] = rows.add([loadCol[t]!, d], [1, -1], -Infinity, -slots[t]!.otherKw);
    }
    return d;
  };
  const facilityDemandCol = demandVar(
    tariff.facilityDemandCharge,
    tariff.facilityPeakSoFarKw,
    slots.map((s) => s.index),
  );
  const periodDemandCols = tariff.periods.map((p, k) =>
    demandVar(
      p.demandCharge,
      p.peakSoFarKw,
      slots.filter((s) => s.period === k).map((s) => s.index),
    ),
  );

  // Departures and ceilings: energy at a departure is the arrival energy, minus earlier runs,
  // plus efficiency x grid energy delivered in this and earlier stays.
  const shortCol = new Int32Array(problem.stays.length).fill(-1);
  const departRow = new Int32Array(problem.stays.length).fill(-1);
  for (const bus of buses) {
    const idx: number[] = [];
    const val: number[] = [];
    let maxDelivered = 0;
    const needCap = energyNeedCap(problem, bus.index);
    for (const stay of bus.stays) {
      for (let t = stay.arriveSlot; t < stay.departSlot; t++) {
        idx.push(pCol[bus.index]![t]!);
        val.push(eta * dt);
        maxDelivered += eta * dt * Math.min(bus.maxKw, strongest[t]!);
      }
      const base = bus.arrivalKwh - stay.runsBeforeKwh;
      const need = stay.requiredKwh - base;
      if (need > 1e-9) {
        const s = cols.add(problem.shortfallPenalty, 0, need);
        tieBreakCost.push(0);
        shortCol[stay.id] = s;
        departRow[stay.id] = rows.add([...idx, s], [...val, 1], need, Infinity);
      }
      const room = bus.ceilingKwh - base;
      const needed = options.allRows || needCap[stay.indexOnBus]! > bus.ceilingKwh - 1e-9;
      if (needed && maxDelivered > room + 1e-9) rows.add([...idx], [...val], -Infinity, room);
    }
  }

  // Taper: p <= maxKw (Q - e) / (Q - taperFrom) with e the energy at the slot's start. Written
  // with a running total C of grid energy so each row stays short.
  for (const bus of buses) {
    if (bus.taperFromKwh === null) continue;
    const Q = bus.usableKwh;
    const m = bus.maxKw / (Q - bus.taperFromKwh);
    const stayOf = new Int32Array(T).fill(-1);
    for (const s of bus.stays) for (let t = s.arriveSlot; t < s.departSlot; t++) stayOf[t] = s.indexOnBus;
    const needCap = energyNeedCap(problem, bus.index);
    if (!options.allRows && needCap.every((c) => c <= bus.taperFromKwh! + 1e-9)) continue;
    const u = bus.slots;
    let prevC = -1;
    for (let i = 0; i < u.length; i++) {
      const t = u[i]!;
      const runsBefore = bus.stays[stayOf[t]!]!.runsBeforeKwh;
      const eMax = Math.min(bus.ceilingKwh, bus.arrivalKwh - runsBefore + eta * dt * bus.maxKw * i);
      if (prevC < 0 && eMax <= bus.taperFromKwh + 1e-9) continue;
      const c = cols.add(0, 0, Infinity);
      tieBreakCost.push(0);
      if (prevC < 0) {
        const idx = [c];
        const val = [1];
        for (let j = 0; j < i; j++) {
          idx.push(pCol[bus.index]![u[j]!]!);
          val.push(-1);
        }
        rows.add(idx, val, 0, 0);
      } else {
        rows.add([c, prevC, pCol[bus.index]![u[i - 1]!]!], [1, -1, -1], 0, 0);
      }
      prevC = c;
      rows.add([pCol[bus.index]![t]!, c], [1, m * eta * dt], -Infinity, m * (Q - bus.arrivalKwh + runsBefore));
    }
  }

  // Cabinets (assigned mode): the buses on a cabinet's chargers share its limit.
  const cabinetRow = problem.cabinets.map(() => new Int32Array(T).fill(-1));
  if (assigned && !options.cabinetsUnlimited) {
    problem.cabinets.forEach((cab, g) => {
      if (!cab.binding) return;
      for (let t = 0; t < T; t++) {
        if (problem.present[t] === 0) continue;
        const idx: number[] = [];
        const val: number[] = [];
        for (const bus of buses) {
          const ch = plug![bus.index]![t]!;
          if (ch >= 0 && problem.chargers[ch]!.cabinet === g && pCol[bus.index]![t]! >= 0) {
            idx.push(pCol[bus.index]![t]!);
            val.push(1);
          }
        }
        cabinetRow[g]![t] = rows.add(idx, val, -Infinity, cab.limitKw);
      }
    });
  }

  const lp: Lp = {
    numCols: cols.cost.length,
    numRows: rows.lower.length,
    colCost: Float64Array.from(cols.cost),
    colLower: Float64Array.from(cols.lower),
    colUpper: Float64Array.from(cols.upper),
    rowLower: Float64Array.from(rows.lower),
    rowUpper: Float64Array.from(rows.upper),
    starts: Int32Array.from(rows.starts),
    indices: Int32Array.from(rows.indices),
    values: Float64Array.from(rows.values),
    offset,
  };
  return {
    lp,
    options,
    pCol,
    loadCol,
    shortCol,
    departRow,
    cabinetRow,
    tieBreakCost: Float64Array.from(tieBreakCost),
    demandCols: { facility: facilityDemandCol, periods: periodDemandCols },
    demandRows: { facility: demandRowsOf[0]!, periods: demandRowsOf.slice(1) },
  };
}

/**
 * The cabinet rows of an assigned model (the last rows it has) for another plug map, in row
 * order, as CSR: what `buildChargeModel` would write for that map. Null if it has none.
 */
export function cabinetRowsFor(
  problem: Problem,
  model: ChargeModel,
  plug: PlugMap,
): {
  from: number;
  lower: Float64Array;
  upper: Float64Array;
  starts: Int32Array;
  indices: Int32Array;
  values: Float64Array;
} | null {
  const rowsOf: [number, number, number][] = [];
  model.cabinetRow.forEach((byT, g) => byT.forEach((r, t) => r >= 0 && rowsOf.push([r, g, t])));
  if (rowsOf.length === 0) return null;
  rowsOf.sort((a, b) => a[0] - b[0]);
  const from = rowsOf[0]![0];
  if (rowsOf[rowsOf.length - 1]![0] !== model.lp.numRows - 1 || rowsOf.length !== model.lp.numRows - from) return null;
  const T = problem.slotCount;
  // Row position of each (cabinet, slot), then the columns of each row bucketed bus by bus.
  const position = new Map<number, number>();
  rowsOf.forEach(([, g, t], i) => position.set(g * T + t, i));
  const counts = new Int32Array(rowsOf.length);
  const entry = (b: number, t: number): number => {
    const ch = plug[b]![t]!;
    if (ch < 0 || model.pCol[b]![t]! < 0) return -1;
    const g = problem.chargers[ch]!.cabinet;
    return g >= 0 ? (position.get(g * T + t) ?? -1) : -1;
  };
  for (const bus of problem.buses)
    for (const t of bus.slots) {
      const i = entry(bus.index, t);
      if (i >= 0) counts[i] = counts[i]! + 1;
    }
  const starts = new Int32Array(rowsOf.length + 1);
  for (let i = 0; i < rowsOf.length; i++) starts[i + 1] = starts[i]! + counts[i]!;
  const fill = starts.slice(0, rowsOf.length);
  const indices = new Int32Array(starts[rowsOf.length]!);
  for (const bus of problem.buses)
    for (const t of bus.slots) {
      const i = entry(bus.index, t);
      if (i >= 0) {
        indices[fill[i]!] = model.pCol[bus.index]![t]!;
        fill[i] = fill[i]! + 1;
      }
    }
  const lower = new Float64Array(rowsOf.length).fill(-Infinity);
  const upper = Float64Array.from(rowsOf, ([, g]) => problem.cabinets[g]!.limitKw);
  return {
    from,
    lower,
    upper,
    starts,
    indices,
    values: new Float64Array(indices.length).fill(1),
  };
}

/** Grid kW per bus per slot from a solution (tiny solver noise cleared). */
export function powerFrom(problem: Problem, model: ChargeModel, x: Float64Array): Float64Array[] {
  return problem.buses.map((bus) => {
    const out = new Float64Array(problem.slotCount);
    for (const t of bus.slots) {
      const v = x[model.pCol[bus.index]![t]!]!;
      out[t] = v > 1e-7 ? v : 0;
    }
    return out;
  });
}
