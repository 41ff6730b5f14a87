// Robustness of the engine beyond the benchmark's one depot per size: several seeds per size and
// depot variants, one run each, every plan through the independent checker.
//   npx tsx tools/bench/robustness.ts SIZES SEEDS VARIANT
//   e.g. npx tsx tools/bench/robustness.ts 25,100,200 5 tight
// Variants: base (chargers = buses / 2), tight (site limit other + 25 kW per bus), tighter
// (other + 14 kW per bus), third (chargers = buses / 3), nocab (no shared power cabinets).
import { loadSolver, parseScenario, planScenario } from '@nightyard/scheduling';
import { generateDepot } from '../../libs/scheduling/src/testing/generate-depot.js';
import { checkPlan } from '../../libs/scheduling/src/testing/plan-checker.js';

await loadSolver();
const sizes = (process.argv[2] ?? '25,100').split(',').map(Number);
const seeds = Number(process.argv[3] ?? 5);
const variant = process.argv[4] ?? 'base';
for (const n of sizes) {
  const gaps: number[] = [];
  for (let seed = 1; seed <= seeds; seed++) {
    const ratio = variant === 'third' ? 3 : 2;
    const input = generateDepot({
      buses: n,
      seed: 77 * seed + n,
      chargers: Math.max(1, Math.floor(n / ratio)),
      cabinets: variant !== 'nocab',
    });
    if (variant === 'tight') input.site.limitKw = Math.round(input.site.otherLoadKw! + 25 * n);
    if (variant === 'tighter') input.site.limitKw = Math.round(input.site.otherLoadKw! + 14 * n);
    const parsed = parseScenario(input);
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
    const t0 = performance.now();
    const plan = await planScenario(parsed.scenario);
    const ms = performance.now() - t0;
    const errors = checkPlan(input, plan);
    gaps.push(plan.gap);
    console.log(
      `${variant} n=${n} seed=${seed} ms=${ms.toFixed(0)} gap=${(plan.gap * 100).toFixed(3)}% status=${plan.status} ` +
        `${plan.stats.construction} ${plan.stats.stoppedBy} moves=${plan.stats.localSearchMoves}/${plan.stats.localSearchAccepted} ` +
        `short=${plan.stats.shortfallKwh} checker=${errors.length ? errors.slice(0, 3).join('; ') : 'ok'}`,
    );
  }
  gaps.sort((a, b) => a - b);
  console.log(
    `${variant} n=${n} median gap ${(gaps[Math.floor(gaps.length / 2)]! * 100).toFixed(3)}% max ${(gaps[gaps.length - 1]! * 100).toFixed(3)}%`,
  );
}
