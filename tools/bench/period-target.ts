// The billing-period demand target's LP (libs/scheduling/src/period-target.ts) on generated
// periods: 31 nights of 40 and of 200 buses (each night its own seeded depot day, moved to its
// date), chargers = buses / 2. Prints the LP's size, the time to build and solve it, the time of
// the marginal-value re-solves included, and the target. BENCH_PERIOD_SIZES=40 picks sizes.
import { parseScenario, solvePeriodTarget, loadSolver, shiftScenario, type PeriodNight } from '@nightyard/scheduling';
import { generateDepot } from '../../libs/scheduling/src/testing/generate-depot.js';

const SIZES = (process.env['BENCH_PERIOD_SIZES'] ?? '40,200').split(',').map(Number);
const NIGHTS = Number(process.env['BENCH_PERIOD_NIGHTS'] ?? 31);

function nightsOf(buses: number): PeriodNight[] {
  const out: PeriodNight[] = [];
  for (let k = 0; k < NIGHTS; k++) {
    const parsed = parseScenario(shiftScenario(generateDepot({ buses, seed: 5000 + buses * 100 + k }), k));
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems.slice(0, 3)));
    out.push({ label: `night ${k + 1}`, scenario: parsed.scenario, basis: 'runs' });
  }
  return out;
}

const solver = await loadSolver();
console.log(`\nBilling-period demand target: ${NIGHTS} nights, one LP (facility + on-peak peaks shared)`);
console.log(
  'buses/night | columns | rows | iterations | build+solve s (HiGHS s) | with marginals s | target kW (facility / on-peak)',
);
for (const size of SIZES) {
  const nights = nightsOf(size);
  const t0 = performance.now();
  const bare = solvePeriodTarget(nights, solver, { marginal: false });
  const s0 = (performance.now() - t0) / 1000;
  const t1 = performance.now();
  const t = solvePeriodTarget(nights, solver);
  const s = (performance.now() - t1) / 1000;
  console.log(
    `${String(size).padStart(11)} | ${String(t.stats.columns).padStart(7)} | ${String(t.stats.rows).padStart(6)} | ${String(bare.stats.iterations).padStart(10)} | ${`${s0.toFixed(2)} (${(bare.stats.ms / 1000).toFixed(2)})`.padStart(24)} | ${s.toFixed(2).padStart(16)} | ${t.targets.map((x) => x.kw.toFixed(1)).join(' / ')}`,
  );
  console.log(`            binding: ${t.binding?.sentence ?? 'none (the peaks so far hold)'}`);
}
