import loadHighs, { type Highs, type Model } from 'highs';

/** A linear program in sparse row form (CSR), minimised. */
export interface Lp {
  numCols: number;
  numRows: number;
  colCost: Float64Array;
  colLower: Float64Array;
  colUpper: Float64Array;
  rowLower: Float64Array;
  rowUpper: Float64Array;
  starts: Int32Array;
  indices: Int32Array;
  values: Float64Array;
  offset?: number;
  maximize?: boolean;
}

/** HiGHS basis statuses of the columns and rows. */
export interface LpBasis {
  colStatus: Int32Array;
  rowStatus: Int32Array;
}

export type LpStatus = 'optimal' | 'infeasible' | 'unbounded' | 'limit' | 'error';

export interface LpResult {
  status: LpStatus;
  /** Objective value; meaningful only when status is optimal. */
  objective: number;
  x: Float64Array;
  rowDual: Float64Array;
  iterations: number;
  ms: number;
}

/** Strictly cheaper than `than` beyond a relative 1e-9 (the LP's tolerance): a tie keeps what is there. */
export function cheaper(objective: number, than: number): boolean {
  return objective < than - 1e-9 * Math.max(1, Math.abs(than));
}

const INF = Infinity;
let loading: Promise<Highs> | null = null;
let loaded: Highs | null = null;

function statusOf(highs: Highs, code: number): LpStatus {
  void highs;
  if (code === 7) return 'optimal';
  if (code === 8) return 'infeasible';
  if (code === 9 || code === 10) return 'unbounded';
  if (code >= 11 && code <= 17) return 'limit';
  return 'error';
}

function modelData(highs: Highs, lp: Lp) {
  const fix = (a: Float64Array) => a.map((v) => (v === INF ? highs.infinity : v === -INF ? -highs.infinity : v));
  return {
    numCols: lp.numCols,
    numRows: lp.numRows,
    sense: lp.maximize ? highs.constants.objectiveSense.maximize : highs.constants.objectiveSense.minimize,
    offset: lp.offset ?? 0,
    colCost: lp.colCost,
    colLower: fix(lp.colLower),
    colUpper: fix(lp.colUpper),
    rowLower: fix(lp.rowLower),
    rowUpper: fix(lp.rowUpper),
    matrix: {
      format: 'csr' as const,
      numRows: lp.numRows,
      numCols: lp.numCols,
      starts: lp.starts,
      indices: lp.indices,
      values: lp.values,
    },
  };
}

/**
 * A model kept alive in HiGHS so that small changes (window bounds, cabinet membership) are
 * re-solved from the previous basis: a few milliseconds instead of a fresh solve.
 */
export class LiveLp {
  private model: Model & { dispose(): void };
  private readonly numRows: number;
  private readonly numCols: number;
  /** Keep each solve's basis, for `replaceTailRows`. */
  keepBasis = false;
  constructor(
    private readonly highs: Highs,
    lp: Lp,
  ) {
    this.model = highs.createModel(modelData(highs, lp));
    this.model.options.set({ output_flag: false });
    this.numRows = lp.numRows;
    this.numCols = lp.numCols;
  }
  /**
   * Replaces the rows from `from` to the last with new ones (as many, same bounds meaning),
   * keeping the basis: one bulk delete and add instead of a wasm call per changed coefficient
   * (each of which moves the rest of HiGHS's column-wise matrix).
   */
  replaceTailRows(
    from: number,
    rows: { lower: Float64Array; upper: Float64Array; starts: Int32Array; indices: Int32Array; values: Float64Array },
  ): void {
    const count = this.numRows - from;
    if (count <= 0) return;
    if (rows.lower.length !== count) throw new Error('replaceTailRows: row count differs');
    const basis = this.basis;
    const inf = this.highs.infinity;
    this.model.deleteRows({ kind: 'range', from, to: this.numRows - 1 });
    this.model.addRows({
      lower: rows.lower.map((v) => (v === -INF ? -inf : v)),
      upper: rows.upper.map((v) => (v === INF ? inf : v)),
      matrix: {
        format: 'csr',
        numRows: count,
        numCols: this.numCols,
        starts: rows.starts,
        indices: rows.indices,
        values: rows.values,
      },
    });
    if (basis) this.model.setBasis({ colStatus: basis.colStatus, rowStatus: basis.rowStatus });
  }
  setColBounds(cols: number[], lower: number[], upper: number[]): void {
    if (cols.length === 0) return;
    // HiGHS wants a strictly increasing set; the last change of a column wins.
    const byCol = new Map<number, number>();
    cols.forEach((c, i) => byCol.set(c, i));
    const order = [...byCol.keys()].sort((a, b) => a - b);
    const inf = this.highs.infinity;
    this.model.changeColsBounds(
      { kind: 'set', indices: order },
      order.map((c) => lower[byCol.get(c)!]!),
      order.map((c) => (upper[byCol.get(c)!]! === INF ? inf : upper[byCol.get(c)!]!)),
    );
  }
  setCoefficient(row: number, col: number, value: number): void {
    this.model.changeCoefficient(row, col, value);
  }
  setRowBounds(row: number, lower: number, upper: number): void {
    const inf = this.highs.infinity;
    this.model.changeRowBounds(row, lower === -INF ? -inf : lower, upper === INF ? inf : upper);
  }
  private solved = false;
  /** The basis of the last solve (HiGHS will not hand it out once the model has changed). */
  private basis: LpBasis | null = null;
  /** The optimal basis of the last solve (with `keepBasis`), or null. */
  lastBasis(): LpBasis | null {
    return this.basis;
  }
  /** Starts the next solve from this basis (e.g. an earlier solve's, after changes were undone). */
  restoreBasis(basis: LpBasis): void {
    this.model.setBasis({ colStatus: basis.colStatus, rowStatus: basis.rowStatus });
    this.basis = basis;
  }
  solve(): LpResult {
    const t0 = performance.now();
    // After the first solve, presolve would throw the basis away: re-solve from the basis.
    if (this.solved) this.model.options.set({ presolve: 'off' });
    this.solved = true;
    const run = this.model.run();
    const status = statusOf(this.highs, run.modelStatus);
    const sol = status === 'optimal' ? this.model.getSolution() : null;
    if (this.keepBasis) this.basis = status === 'optimal' ? this.model.getBasis() : null;
    return {
      status,
      objective: status === 'optimal' ? this.model.getObjectiveValue() : NaN,
      x: sol ? sol.colValue : new Float64Array(0),
      rowDual: sol ? sol.rowDual : new Float64Array(0),
      iterations: Number(this.model.info.get('simplex_iteration_count')),
      ms: performance.now() - t0,
    };
  }
  dispose(): void {
    this.model.dispose();
  }
}

export class Solver {
  constructor(readonly highs: Highs) {}
  /** Solves one LP and frees its memory in HiGHS (wasm memory is not garbage-collected). */
  solve(lp: Lp): LpResult {
    const live = new LiveLp(this.highs, lp);
    try {
      return live.solve();
    } finally {
      live.dispose();
    }
  }
  open(lp: Lp): LiveLp {
    return new LiveLp(this.highs, lp);
  }
}

/** The parts of a mixed-integer program built row by row (CSR rows, bounds may be infinite). */
export interface MilpParts {
  offset?: number;
  cost: number[];
  lower: number[];
  upper: number[];
  rowLower: number[];
  rowUpper: number[];
  starts: number[];
  indices: number[];
  values: number[];
  integrality: number[];
}

/** A HiGHS MIP model as the engine uses it: dispose of it when done (wasm memory). */
export interface MilpModel {
  options: { set(values: Record<string, unknown>): unknown };
  info: { get(name: string): number | bigint };
  run(): { modelStatus: number };
  getObjectiveValue(): number;
  getSolution(): { colValue: Float64Array };
  setSolution(solution: unknown): unknown;
  dispose(): void;
}

/**
 * Creates a minimising MIP in HiGHS with the engine's settings: single-threaded, stopped on a node
 * limit (so the same model gives the same answer), the time limit only a safety net.
 */
export function createMilp(
  solver: Solver,
  parts: MilpParts,
  limits: { timeLimitMs: number; maxNodes: number },
): MilpModel {
  const highs = solver.highs;
  const inf = (v: number) => (v === Infinity ? highs.infinity : v === -Infinity ? -highs.infinity : v);
  const numCols = parts.cost.length;
  const numRows = parts.rowLower.length;
  const milp = highs.createModel({
    numCols,
    numRows,
    sense: highs.constants.objectiveSense.minimize,
    offset: parts.offset ?? 0,
    colCost: Float64Array.from(parts.cost),
    colLower: Float64Array.from(parts.lower.map(inf)),
    colUpper: Float64Array.from(parts.upper.map(inf)),
    rowLower: Float64Array.from(parts.rowLower.map(inf)),
    rowUpper: Float64Array.from(parts.rowUpper.map(inf)),
    matrix: {
      format: 'csr',
      numRows,
      numCols,
      starts: Int32Array.from(parts.starts),
      indices: Int32Array.from(parts.indices),
      values: Float64Array.from(parts.values),
    },
    integrality: Int32Array.from(parts.integrality),
  } as never) as unknown as MilpModel;
  milp.options.set({
    output_flag: false,
    time_limit: limits.timeLimitMs / 1000,
    mip_max_nodes: limits.maxNodes,
    mip_rel_gap: 1e-6,
    mip_abs_gap: 1e-6,
    random_seed: 1,
  });
  return milp;
}

/** Builds an Lp from rows given as (indices, values) lists. */
export function lpFromRows(
  cols: { cost: number; lower: number; upper: number }[],
  rows: { indices: number[]; values: number[]; lower: number; upper: number }[],
  options: { maximize?: boolean; offset?: number } = {},
): Lp {
  const nnz = rows.reduce((a, r) => a + r.indices.length, 0);
  const starts = new Int32Array(rows.length + 1);
  const indices = new Int32Array(nnz);
  const values = new Float64Array(nnz);
  let k = 0;
  rows.forEach((r, i) => {
    starts[i] = k;
    for (let j = 0; j < r.indices.length; j++) {
      indices[k] = r.indices[j]!;
      values[k++] = r.values[j]!;
    }
  });
  starts[rows.length] = k;
  return {
    numCols: cols.length,
    numRows: rows.length,
    colCost: Float64Array.from(cols.map((c) => c.cost)),
    colLower: Float64Array.from(cols.map((c) => c.lower)),
    colUpper: Float64Array.from(cols.map((c) => c.upper)),
    rowLower: Float64Array.from(rows.map((r) => r.lower)),
    rowUpper: Float64Array.from(rows.map((r) => r.upper)),
    starts,
    indices,
    values,
    ...options,
  };
}

let solverInstance: Solver | null = null;

/** Loads HiGHS once per process and warms it with a small solve (the first solve is slow). */
export async function loadSolver(): Promise<Solver> {
  if (solverInstance) return solverInstance;
  loading ??= loadHighs();
  loaded = await loading;
  const solver = new Solver(loaded);
  // Warm-up: a small LP of the same shape as the engine's (sums and bounds).
  const n = 40;
  const cols = Array.from({ length: n }, (_, i) => ({ cost: 1 + (i % 7), lower: 0, upper: 10 }));
  const rows = Array.from({ length: 10 }, (_, r) => ({
    indices: Array.from({ length: 4 }, (_, j) => r * 4 + j),
    values: [1, 1, 1, 1],
    lower: 5 + r,
    upper: INF,
  }));
  solver.solve(lpFromRows(cols, rows));
  solverInstance = solver;
  return solver;
}
