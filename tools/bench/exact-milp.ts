// The exact problem of a small depot as a MILP, to see how far a plan and the lower bound are
// from the true optimum where chargers are scarce (the lower bound lets a charger switch buses
// from slot to slot; a plan plugs each bus in once per stay).
//   npx tsx tools/bench/exact-milp.ts BUSES CHARGERS SEED [TIME_LIMIT_S]
//   e.g. npx tsx tools/bench/exact-milp.ts 5 1 5   (generateDepot({ buses: 5, chargers: 1, seed: 5 }))
// Model: the engine's LP with every bus allowed on every charger in every slot of its stays, plus
// binaries x[b,c,t] (bus b on charger c in slot t) and y[b,c,t] (a plug-in starts there):
// p[b,t] <= sum_c min(maxKw) x[b,c,t]; one bus per charger and one charger per bus per slot;
// x[b,c,t] <= x[b,c,t-1] + y[b,c,t]; at most one start per stay (summed over chargers). With one
// charger per bus in a slot the bus's power is capped by that charger; cabinets are left out
// (use a depot without them: generateDepot is called with cabinets: false).
import {
  buildChargeModel,
  emptyPlugMap,
  loadSolver,
  parseScenario,
  planScenario,
  prepareProblem,
} from '@nightyard/scheduling';
import type { Model } from 'highs';
import { generateDepot } from '../../libs/scheduling/src/testing/generate-depot.js';

const [buses, chargers, seed, limit] = process.argv.slice(2).map(Number);
const solver = await loadSolver();
const input = generateDepot({ buses: buses ?? 5, chargers: chargers ?? 1, seed: seed ?? 5, cabinets: false });
const parsed = parseScenario(input);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
const plan = await planScenario(parsed.scenario);
console.log(
  `plan ${plan.cost.total} (short ${plan.stats.shortfallKwh} kWh), lower bound ${plan.lowerBound}, gap ${(plan.gap * 100).toFixed(3)} %`,
);

const problem = prepareProblem(parsed.scenario);
// Every bus "on" the strongest charger in the LP part; the binaries decide the real one.
const strongest = problem.chargers.reduce((a, c) => (c.maxKw > a.maxKw ? c : a));
const plug = emptyPlugMap(problem);
for (const b of problem.buses) for (const t of b.slots) plug[b.index]![t] = strongest.index;
const model = buildChargeModel(problem, { mode: 'assigned', plug });
const lp = model.lp;
const cost = Array.from(lp.colCost);
const lower = Array.from(lp.colLower);
const upper = Array.from(lp.colUpper);
const starts = Array.from(lp.starts);
const indices = Array.from(lp.indices);
const values = Array.from(lp.values);
const rowLower = Array.from(lp.rowLower);
const rowUpper = Array.from(lp.rowUpper);
const integer: number[] = [];
const binary = () => {
  cost.push(0);
  lower.push(0);
  upper.push(1);
  integer.push(cost.length - 1);
  return cost.length - 1;
};
const row = (idx: number[], val: number[], lo: number, hi: number) => {
  indices.push(...idx);
  values.push(...val);
  starts.push(indices.length);
  rowLower.push(lo);
  rowUpper.push(hi);
};
const C = problem.chargers.length;
const x = problem.buses.map(() => problem.chargers.map(() => new Int32Array(problem.slotCount).fill(-1)));
for (const b of problem.buses) {
  for (const st of b.stays) {
    const startsOfStay: number[] = [];
    for (let t = st.arriveSlot; t < st.departSlot; t++) {
      const xs: number[] = [];
      const caps: number[] = [];
      for (let c = 0; c < C; c++) {
        const xc = binary();
        const yc = binary();
        x[b.index]![c]![t] = xc;
        startsOfStay.push(yc);
        xs.push(xc);
        caps.push(-Math.min(b.maxKw, problem.chargers[c]!.maxKw));
        if (t > st.arriveSlot) row([xc, x[b.index]![c]![t - 1]!, yc], [1, -1, -1], -Infinity, 0);
        else row([xc, yc], [1, -1], -Infinity, 0);
      }
      row([model.pCol[b.index]![t]!, ...xs], [1, ...caps], -Infinity, 0);
      row(
        xs,
        xs.map(() => 1),
        -Infinity,
        1,
      );
    }
    row(
      startsOfStay,
      startsOfStay.map(() => 1),
      -Infinity,
      1,
    );
  }
}
for (let c = 0; c < C; c++) {
  for (let t = 0; t < problem.slotCount; t++) {
    const on = problem.buses.map((b) => x[b.index]![c]![t]!).filter((v) => v >= 0);
    if (on.length > 1)
      row(
        on,
        on.map(() => 1),
        -Infinity,
        1,
      );
  }
}
const highs = solver.highs;
const inf = (v: number) => (v === Infinity ? highs.infinity : v === -Infinity ? -highs.infinity : v);
const milp = highs.createModel({
  numCols: cost.length,
  numRows: rowLower.length,
  sense: highs.constants.objectiveSense.minimize,
  offset: lp.offset ?? 0,
  colCost: Float64Array.from(cost),
  colLower: Float64Array.from(lower.map(inf)),
  colUpper: Float64Array.from(upper.map(inf)),
  rowLower: Float64Array.from(rowLower.map(inf)),
  rowUpper: Float64Array.from(rowUpper.map(inf)),
  matrix: {
    format: 'csr',
    numRows: rowLower.length,
    numCols: cost.length,
    starts: Int32Array.from(starts),
    indices: Int32Array.from(indices),
    values: Float64Array.from(values),
  },
} as never) as Model & { dispose(): void };
milp.options.set({ output_flag: false, time_limit: limit ?? 240, mip_rel_gap: 1e-7 });
for (const c of integer) milp.changeColIntegrality(c, 1);
const t0 = performance.now();
const run = milp.run();
const objective = milp.getObjectiveValue();
const solution = milp.getSolution();
let short = 0;
for (const s of problem.stays) if (model.shortCol[s.id]! >= 0) short += solution.colValue[model.shortCol[s.id]!];
console.log(
  `MILP (${integer.length} binaries): status ${run.modelStatus} (7 = optimal) in ${((performance.now() - t0) / 1000).toFixed(1)} s, ` +
    `objective ${objective} (cost ${objective - problem.shortfallPenalty * short}, short ${short.toFixed(3)} kWh), dual bound ${milp.info.get('mip_dual_bound')}`,
);
milp.dispose();
