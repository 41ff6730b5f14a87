// `npm run bench`: the scheduling engine on generated depots (seeded), 96 slots, chargers =
// buses / 2. Per size: engine time (median of 3, model build included), cost, lower bound, gap,
// savings against the cheaper baseline (charge on arrival or timer, within the limits), peak cut, why the search stopped and whether the three
// runs gave the same plan. BENCH_SIZES=25,50 picks sizes; BENCH_SEEDS=5 adds four more seeds per
// size (one run each). Then one 50-bus LP solved by HiGHS and by javascript-lp-solver (in a
// worker thread, ended after BENCH_JSLP_LIMIT_MS, default 120 s) for the speed ratio.
import { Worker } from 'node:worker_threads';
import {
  buildChargeModel,
  initialAssignment,
  loadSolver,
  parseScenario,
  planScenario,
  plugMapOf,
  prepareProblem,
  solveLowerBound,
  type Lp,
  type Plan,
} from '@nightyard/scheduling';
import { generateDepot } from '../libs/scheduling/src/testing/generate-depot.js';

const SIZES = (process.env['BENCH_SIZES'] ?? '25,50,100,200,500').split(',').map(Number);
const RUNS = 3;
const SEEDS = Number(process.env['BENCH_SEEDS'] ?? 1);
const JS_LIMIT_MS = Number(process.env['BENCH_JSLP_LIMIT_MS'] ?? 120_000);

const median = (xs: number[]) => xs.slice().sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const pad = (s: string | number, n: number) => String(s).padStart(n);

function scenarioOf(buses: number, seed = 1000 + buses) {
  const parsed = parseScenario(generateDepot({ buses, seed }));
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems.slice(0, 5)));
  return parsed.scenario;
}

/** The same LP in javascript-lp-solver's JSON form (variables are >= 0 there, as here). */
function toJsLp(lp: Lp) {
  const variables: Record<string, Record<string, number>> = {};
  const constraints: Record<string, { min?: number; max?: number; equal?: number }> = {};
  for (let j = 0; j < lp.numCols; j++) {
    if (lp.colLower[j] !== 0 && lp.colLower[j] !== -Infinity) constraints[`lo${j}`] = { min: lp.colLower[j]! };
    if (lp.colUpper[j] !== Infinity) constraints[`up${j}`] = { max: lp.colUpper[j]! };
    variables[`x${j}`] = { cost: lp.colCost[j]! };
    if (constraints[`lo${j}`]) variables[`x${j}`]![`lo${j}`] = 1;
    if (constraints[`up${j}`]) variables[`x${j}`]![`up${j}`] = 1;
  }
  for (let i = 0; i < lp.numRows; i++) {
    const lo = lp.rowLower[i]!;
    const hi = lp.rowUpper[i]!;
    constraints[`r${i}`] =
      lo === hi ? { equal: lo } : lo === -Infinity ? { max: hi } : hi === Infinity ? { min: lo } : { min: lo, max: hi };
    for (let k = lp.starts[i]!; k < lp.starts[i + 1]!; k++) variables[`x${lp.indices[k]}`]![`r${i}`] = lp.values[k]!;
  }
  return { optimize: 'cost', opType: 'min', constraints, variables };
}

function runJsLp(model: unknown): Promise<{ ms: number; feasible?: boolean; result?: number; timedOut: boolean }> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(new URL('./bench/jslp-worker.mjs', import.meta.url), { workerData: { model } });
    const timer = setTimeout(() => {
      void worker.terminate();
      resolve({ ms: JS_LIMIT_MS, timedOut: true });
    }, JS_LIMIT_MS);
    worker.once('message', (m) => {
      clearTimeout(timer);
      void worker.terminate();
      resolve({ ...m, timedOut: false });
    });
    worker.once('error', (e) => {
      clearTimeout(timer);
      reject(e);
    });
  });
}

/** Same sessions, powers and costs: the plan a yard timeline would show. */
const fingerprint = (p: Plan) => JSON.stringify([p.sessions, p.cost]);

async function main() {
  const solver = await loadSolver();
  console.log('Nightyard scheduling engine benchmark (96 slots, chargers = buses / 2, seeded)');
  const head = [
    'buses',
    'chargers',
    'time ms',
    'cost $',
    'bound $',
    'gap %',
    'savings %',
    'peak cut %',
    'plug-ins',
    'LS moves',
    'stopped',
    'same x3',
  ];
  console.log(head.map((h, i) => pad(h, i < 2 ? 8 : 11)).join('') + '  construction');
  const gaps: number[] = [];
  for (const n of SIZES) {
    const scenario = scenarioOf(n);
    const times: number[] = [];
    const prints = new Set<string>();
    let plan: Plan | null = null;
    for (let r = 0; r < RUNS; r++) {
      const t0 = performance.now();
      plan = await planScenario(scenario);
      times.push(performance.now() - t0);
      prints.add(fingerprint(plan));
    }
    const p = plan!;
    gaps.push(p.gap);
    console.log(
      [
        pad(n, 8),
        pad(scenario.chargers.length, 8),
        pad(median(times).toFixed(0), 11),
        pad(p.cost.total.toFixed(2), 11),
        pad(p.lowerBound.toFixed(2), 11),
        pad((p.gap * 100).toFixed(3), 11),
        pad((p.savings.share * 100).toFixed(1), 11),
        pad((p.savings.peakCut * 100).toFixed(1), 11),
        pad(p.stats.plugIns, 11),
        pad(p.stats.localSearchMoves, 11),
        pad(p.stats.stoppedBy, 11),
        pad(prints.size === 1 ? 'yes' : 'NO', 11),
      ].join('') +
        `  ${p.stats.construction}` +
        (p.status === 'short' ? '  (short!)' : ''),
    );
  }
  console.log(`median gap: ${(median(gaps) * 100).toFixed(3)} %`);

  // More seeds per size (BENCH_SEEDS > 1): one run each, gap and time only.
  if (SEEDS > 1) {
    console.log(`\nOther seeds (${SEEDS - 1} per size, one run each): gap % median / max, time ms median / max`);
    for (const n of SIZES) {
      const g: number[] = [];
      const ms: number[] = [];
      for (let k = 1; k < SEEDS; k++) {
        const scenario = scenarioOf(n, 1000 + n + 7919 * k);
        const t0 = performance.now();
        const p = await planScenario(scenario);
        ms.push(performance.now() - t0);
        g.push(p.gap);
      }
      console.log(
        `${pad(n, 8)}  gap ${(median(g) * 100).toFixed(3)} / ${(Math.max(...g) * 100).toFixed(3)}   time ${median(ms).toFixed(0)} / ${Math.max(...ms).toFixed(0)}`,
      );
    }
  }

  // Speed ratio on one 50-bus stage-2 LP (the first assignment of the two-stage method).
  const problem = prepareProblem(scenarioOf(50));
  const lb = solveLowerBound(problem, solver);
  const energy = new Float64Array(problem.stays.length);
  const centre = new Float64Array(problem.stays.length);
  const weight = new Float64Array(problem.slotCount);
  for (const s of problem.stays) {
    let e = 0;
    for (let t = s.arriveSlot; t < s.departSlot; t++) e += lb.power[s.bus]![t]! * problem.slotHours;
    energy[s.id] = e;
    centre[s.id] = (s.arriveSlot + s.departSlot) / 2;
  }
  for (const row of lb.power) for (let t = 0; t < problem.slotCount; t++) weight[t] = weight[t]! + row[t]!;
  const assignment = initialAssignment(problem, {
    energy,
    weight,
    power: lb.power,
    centre,
    order: 'departure',
    handover: 'share',
  });
  const model = buildChargeModel(problem, { mode: 'assigned', plug: plugMapOf(problem, assignment) });
  const highsTimes: number[] = [];
  let highsObjective = NaN;
  for (let r = 0; r < RUNS; r++) {
    const t0 = performance.now();
    const res = solver.solve(model.lp);
    highsTimes.push(performance.now() - t0);
    highsObjective = res.objective;
  }
  console.log(`\n50-bus stage-2 LP: ${model.lp.numCols} columns, ${model.lp.numRows} rows`);
  console.log(`  HiGHS (wasm):          ${median(highsTimes).toFixed(1)} ms, objective ${highsObjective.toFixed(6)}`);
  const js = await runJsLp(toJsLp(model.lp));
  if (js.timedOut) {
    console.log(
      `  javascript-lp-solver:  no answer within ${JS_LIMIT_MS / 1000} s (ended); ratio > ${(JS_LIMIT_MS / median(highsTimes)).toFixed(0)}x`,
    );
  } else {
    // javascript-lp-solver has no objective constant: add the model's offset back.
    const jsObjective = (js.result ?? NaN) + (model.lp.offset ?? 0);
    const agree = js.feasible ? Math.abs((jsObjective - highsObjective) / highsObjective) : NaN;
    console.log(
      `  javascript-lp-solver:  ${js.ms.toFixed(0)} ms, feasible ${js.feasible}, objective ${jsObjective.toFixed(6)} (relative difference ${agree.toExponential(1)})`,
    );
    console.log(`  speed ratio: ${(js.ms / median(highsTimes)).toFixed(0)}x`);
  }
}

main().then(
  () => process.exit(0),
  (e) => {
    console.error(e);
    process.exit(1);
  },
);
