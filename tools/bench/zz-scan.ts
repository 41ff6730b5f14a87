import { loadSolver, parseScenario, planScenario } from '@nightyard/scheduling';
import { generateDepot } from '/work/wt-engine/libs/scheduling/src/testing/generate-depot.js';
await loadSolver();
const yard = { minPlugInMinutes: 45, driversPlugIn: true, crew: [
  { from: '2026-01-14T15:00', to: '2026-01-14T23:30', movesPerSlot: 3 },
  { from: '2026-01-15T04:30', to: '2026-01-15T07:00', movesPerSlot: 2 } ] };
for (const [n, c] of [[8, 2], [12, 3], [16, 4], [20, 4], [12, 2], [24, 5]]) for (const seed of [1, 2, 3, 4]) {
  const input = { ...generateDepot({ buses: n!, chargers: c!, seed }), yard };
  const parsed = parseScenario(input); if (!parsed.ok) throw 1;
  const p = await planScenario(parsed.scenario);
  const nosess = p.buses.filter((b) => !p.sessions.some((s) => s.bus === b.id)).length;
  console.log(`${n}/${c} s${seed} ${p.status} short ${p.stats.shortfallKwh} unavoid ${p.stats.unavoidableShortfallKwh} nosession ${nosess} gap ${(p.gap*100).toFixed(2)}% ${p.stats.construction} ${p.solveMs}ms moves ${p.stats.localSearchMoves}`);
}
