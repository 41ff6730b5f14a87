import { parseScenario, planScenario, loadSolver } from '@nightyard/scheduling';
import { generateDepot } from '/work/main/tools/bench/generate.ts';
await loadSolver();
for (const n of (process.argv[2] ?? '25,50,100,200').split(',').map(Number)) {
  const parsed = parseScenario(generateDepot({ buses: n, seed: n }));
  if (!parsed.ok) { console.log(parsed.problems); continue; }
  const t0 = performance.now();
  const plan = await planScenario(parsed.scenario, { timeBudgetMs: 100000, maxMoves: Number(process.argv[3] ?? 0) });
  console.log(n, 'ms', (performance.now() - t0).toFixed(0), plan.status, 'cost', plan.cost.total.toFixed(2), 'lb', plan.lowerBound.toFixed(2), 'gap%', (plan.gap * 100).toFixed(3), 'base', plan.baseline.total.toFixed(0), 'save', (plan.savings.share*100).toFixed(1), 'peak', plan.savings.peakKw.toFixed(0), plan.savings.baselinePeakKw.toFixed(0), JSON.stringify(plan.stats));
}
