// Plans against the exact MILP optimum on small depots short of chargers.
import { loadSolver, parseScenario, planScenario, prepareProblem } from '@nightyard/scheduling';
import { solveExact } from '../../libs/scheduling/src/exact.js';
import { generateDepot } from '../../libs/scheduling/src/testing/generate-depot.js';

const solver = await loadSolver();
const yard = { minPlugInMinutes: 45, driversPlugIn: true, crew: [
  { from: '2026-01-14T15:00', to: '2026-01-14T23:30', movesPerSlot: 3 },
  { from: '2026-01-15T04:30', to: '2026-01-15T07:00', movesPerSlot: 2 } ] };
const cases: [number, number, number][] = [[6, 2, 1], [7, 2, 2], [8, 2, 3], [9, 3, 4], [10, 3, 5], [12, 3, 6], [8, 2, 7], [10, 2, 8], [11, 3, 9], [12, 2, 10]];
const nodes = Number(process.env.NODES ?? 5000);
for (const crew of [false, true]) for (const [n, c, seed] of cases) {
  const input = { ...generateDepot({ buses: n, chargers: c, seed }), ...(crew ? { yard } : {}) };
  const parsed = parseScenario(input);
  if (!parsed.ok) throw new Error('bad');
  const plan = await planScenario(parsed.scenario);
  const problem = prepareProblem(parsed.scenario);
  const pen = plan.cost.total + problem.shortfallPenalty * plan.stats.shortfallKwh;
  const ex = solveExact(problem, solver, { maxNodes: nodes, timeLimitMs: 60000 });
  console.log(`${crew ? 'crew' : '    '} ${n}/${c} s${seed}: plan ${pen.toFixed(2)} short ${plan.stats.shortfallKwh} (${plan.solveMs} ms ${plan.stats.stoppedBy}) | exact ${ex.status} ${ex.objective.toFixed(2)} bound ${ex.bound.toFixed(2)} short ${ex.shortfallKwh?.toFixed(2)} nodes ${ex.nodes} bin ${ex.binaries} ${Math.round(ex.ms)} ms | plan vs exact ${(((pen - ex.objective) / ex.objective) * 100).toFixed(3)} %`);
}
