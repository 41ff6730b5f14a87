import { loadSolver, parseScenario, planScenario, prepareProblem } from '@nightyard/scheduling';
import { solveExact } from '/work/wt-engine/libs/scheduling/src/exact.js';
import { generateDepot } from '/work/wt-engine/libs/scheduling/src/testing/generate-depot.js';
const solver = await loadSolver();
const [n, c, seed, nodes, crew] = process.argv.slice(2).map(Number);
const yard = { minPlugInMinutes: 45, driversPlugIn: true, crew: [
  { from: '2026-01-14T15:00', to: '2026-01-14T23:30', movesPerSlot: 3 },
  { from: '2026-01-15T04:30', to: '2026-01-15T07:00', movesPerSlot: 2 } ] };
const input = { ...generateDepot({ buses: n!, chargers: c!, seed: seed! }), ...(crew ? { yard } : {}) };
const parsed = parseScenario(input); if (!parsed.ok) throw 1;
const plan = await planScenario(parsed.scenario);
const problem = prepareProblem(parsed.scenario);
const start = { chargerOf: new Int32Array(problem.stays.length).fill(-1), from: new Int32Array(problem.stays.length), to: new Int32Array(problem.stays.length), sequence: [] as number[][] };
const t0 = Date.parse(problem.slots[0]!.start); const ms = 15 * 60000;
for (const s of plan.sessions) { const b = problem.buses.find((x) => x.id === s.bus)!; const st = b.stays[0]!; start.chargerOf[st.id] = problem.chargers.findIndex((x) => x.id === s.charger); start.from[st.id] = Math.round((Date.parse(s.start) - t0) / ms); start.to[st.id] = Math.round((Date.parse(s.end) - t0) / ms); }
const pen = plan.cost.total + problem.shortfallPenalty * plan.stats.shortfallKwh;
console.log('plan', pen, plan.stats.shortfallKwh, plan.lowerBound);
const ex = solveExact(problem, solver, { maxNodes: nodes, timeLimitMs: 60000, start });
console.log(ex.status, ex.objective, ex.bound, ex.shortfallKwh, ex.nodes, ex.binaries, Math.round(ex.ms));
