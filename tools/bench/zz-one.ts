import { loadSolver, parseScenario, planScenario } from '@nightyard/scheduling';
import { generateDepot } from '/work/wt-engine/libs/scheduling/src/testing/generate-depot.js';
await loadSolver();
const n = Number(process.argv[2] ?? 200);
const s = n / 40;
const yard = { minPlugInMinutes: 45, driversPlugIn: true, crew: [
  { from: '2026-01-14T15:00', to: '2026-01-14T23:30', movesPerSlot: Math.max(3, Math.ceil(3 * s)) },
  { from: '2026-01-15T04:30', to: '2026-01-15T07:00', movesPerSlot: Math.max(2, Math.ceil(2 * s)) } ] };
const input = { ...generateDepot({ buses: n, seed: 42 }), yard };
const parsed = parseScenario(input); if (!parsed.ok) throw 1;
const p = await planScenario(parsed.scenario);
console.log(n, p.solveMs, p.stats.stoppedBy, p.stats.construction, p.stats.localSearchMoves, p.stats.lowerBoundMs, p.status, p.gap, p.stats.simplexIterations);
