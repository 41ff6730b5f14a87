import type { Solver } from './highs-solver.js';
import { buildChargeModel, powerFrom } from './lp-model.js';
import type { Problem } from './problem.js';

export interface LowerBound {
  /** Optimum of the relaxation, shortfall penalty included (a bound on the penalised cost). */
  penalisedObjective: number;
  /** kWh short in the relaxation, summed over departures: no plan can do better. */
  shortfallKwh: number;
  /** Grid kW per bus per slot in the relaxation: a hint for the charger assignment. */
  power: Float64Array[];
  /** Dual value (marginal cost per kWh) of each stay's departure row, 0 if none. */
  stayDual: Float64Array;
  iterations: number;
  ms: number;
  numCols: number;
  numRows: number;
}

/**
 * The relaxation in which any bus may charge whenever it is at the depot, limited only by its
 * own acceptance, the strongest charger, and per slot by the most power the available chargers
 * can give as many buses as are present (cabinets included). Every plan that respects the real
 * limits is feasible here, so its optimum bounds every plan's cost from below.
 */
export function solveLowerBound(
  problem: Problem,
  solver: Solver,
  variant: { siteUnlimited?: boolean; cabinetsUnlimited?: boolean } = {},
): LowerBound {
  const model = buildChargeModel(problem, { mode: 'relaxed', tieBreak: false, ...variant });
  const result = solver.solve(model.lp);
  if (result.status !== 'optimal')
    throw new Error(`lower-bound LP ended ${result.status}; the model should always be solvable`);
  let shortfall = 0;
  const stayDual = new Float64Array(problem.stays.length);
  for (const stay of problem.stays) {
    const c = model.shortCol[stay.id]!;
    if (c >= 0) shortfall += result.x[c]!;
    const r = model.departRow[stay.id]!;
    if (r >= 0) stayDual[stay.id] = Math.abs(result.rowDual[r]!);
  }
  return {
    penalisedObjective: result.objective,
    shortfallKwh: shortfall,
    power: powerFrom(problem, model, result.x),
    stayDual,
    iterations: result.iterations,
    ms: result.ms,
    numCols: model.lp.numCols,
    numRows: model.lp.numRows,
  };
}
