// Re-planning speed on the demo depot (the yard's "within 2 seconds"): the engine re-plans the
// rest of the night after a charger fails at several hours of the night. Median of 3 per cut-off.
import { readFileSync } from 'node:fs';
import { DateTime } from 'luxon';
import { loadSolver, parseScenario, planScenario, replan } from '@nightyard/scheduling';

const file = JSON.parse(
  readFileSync(new URL('../../libs/scheduling/examples/demo-depot.json', import.meta.url), 'utf8'),
);
const parsed = parseScenario(file);
if (!parsed.ok) throw new Error('demo example is not valid');
const scenario = parsed.scenario;
await loadSolver();
const plan = await planScenario(scenario);
const median = (xs: number[]) => xs.slice().sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const start = DateTime.fromISO(scenario.start, { zone: scenario.timezone });

console.log(
  `Re-plan after a charger failure, demo depot (${scenario.buses.length} buses, ${scenario.chargers.length} chargers)`,
);
console.log('cut-off   charger  re-plan ms (median of 3)  cost of the rest');
for (const hours of [6, 9, 12, 15]) {
  const cut = start.plus({ hours });
  if (cut.toFormat("yyyy-MM-dd'T'HH:mm") >= scenario.end) continue;
  const busiest = plan.sessions.filter((s) => Date.parse(s.end) > cut.toMillis()).sort((a, b) => b.kwh - a.kwh)[0];
  if (!busiest) continue;
  const times: number[] = [];
  let cost = 0;
  for (let i = 0; i < 3; i++) {
    const t0 = performance.now();
    const r = await replan(scenario, {
      now: cut.toFormat("yyyy-MM-dd'T'HH:mm"),
      outOfService: [busiest.charger],
      previous: plan,
    });
    times.push(performance.now() - t0);
    cost = r.cost.total;
  }
  console.log(
    `${cut.toFormat('ccc HH:mm')}  ${busiest.charger.padEnd(7)}  ${median(times).toFixed(0).padStart(8)}                  ${cost.toFixed(2)}`,
  );
}
