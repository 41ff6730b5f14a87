// The yard crew benchmark: plans with crew rules (45-minute minimum plug-in, drivers plug in on
// pulling in and unplug on pulling out, an evening crew 15:00-23:30 and an early-morning crew
// 04:30-07:00, no one between), at 200/500/1,000 buses and on depots short of chargers:
// solve time and what stopped the search, crew moves per bus, the shortest plug-in, buses moved
// by a re-plan after one charger fails, and whether two runs give the same plan.
//   npx tsx tools/bench/crew.ts [--quick]
import { readFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { DateTime } from 'luxon';
import {
  loadSolver,
  parseScenario,
  planScenario,
  prepareProblem,
  replan,
  type Plan,
  type ScenarioInput,
} from '@nightyard/scheduling';
import { solveCrewBound } from '../../libs/scheduling/src/crew-bound.js';
import { solveExact } from '../../libs/scheduling/src/exact.js';
import { generateDepot } from '../../libs/scheduling/src/testing/generate-depot.js';
import { checkPlan } from '../../libs/scheduling/src/testing/plan-checker.js';
import { testYard } from '../../libs/scheduling/src/testing/crew-yard.js';
import { assignmentOfPlan as assignmentOf } from '../../libs/scheduling/src/testing/plan-assignment.js';

const quick = process.argv.includes('--quick');
const withCrew = (input: ScenarioInput, scale = 1): ScenarioInput => ({ ...input, yard: testYard(scale) });
const parse = (input: ScenarioInput) => {
  const parsed = parseScenario(input);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return parsed.scenario;
};
const minutes = (s: { start: string; end: string }) => (Date.parse(s.end) - Date.parse(s.start)) / 60_000;
const median = (xs: number[]) => xs.slice().sort((a, b) => a - b)[Math.floor(xs.length / 2)] ?? NaN;
const pct = (x: number) => `${(x * 100).toFixed(2)} %`;

/** Buses whose sessions differ between two plans (from the cut-off on). */
function movedBuses(before: Plan, after: Plan, fromMs: number): string[] {
  const key = (p: Plan, bus: string) =>
    p.sessions
      .filter((s) => s.bus === bus && Date.parse(s.end) > fromMs)
      .map((s) => `${s.charger}@${Math.max(Date.parse(s.start), fromMs)}-${s.end}`)
      .join(',');
  const buses = new Set([...before.sessions, ...after.sessions].map((s) => s.bus));
  return [...buses].filter((b) => key(before, b) !== key(after, b)).sort();
}

/**
 * The narrower measure: buses on another charger from the cut-off on (or losing or gaining a
 * session). A bus on the same charger at other times is left out here, though its plug-in or
 * unplug moved (the crew walks at another time): `movedBuses` counts it.
 */
function otherCharger(before: Plan, after: Plan, fromMs: number): string[] {
  const key = (p: Plan, bus: string) =>
    [...new Set(p.sessions.filter((s) => s.bus === bus && Date.parse(s.end) > fromMs).map((s) => s.charger))]
      .sort()
      .join(',');
  const buses = new Set([...before.sessions, ...after.sessions].map((s) => s.bus));
  return [...buses].filter((b) => key(before, b) !== key(after, b)).sort();
}

const solver = await loadSolver();
const load = () =>
  loadavg()
    .map((x) => x.toFixed(2))
    .join(' ');
console.log(
  `load average at start: ${load()} (2 shared cores: times are inflated by other work; node counts, LP solves and iterations are not)`,
);
console.log('Plans with the yard crew (45-min minimum, drivers at pull-in/out, crew 15:00-23:30 and 04:30-07:00)');
console.log(
  'buses  chargers  solve ms  stopped (2 runs)  status    gap      crew moves/bus  shortest plug-in  checker  same plan twice  LP iterations  load',
);
// BENCH_SECTIONS picks sections (size,small,scarce,midday,replan,regen); default all.
const sections = new Set((process.env.BENCH_SECTIONS ?? 'size,small,scarce,midday,replan,regen').split(','));
const sizes = !sections.has('size') ? [] : quick ? [200] : [200, 500, 1000];
if (sizes.length) {
  // The API plans in a long-lived engine thread, where HiGHS's WebAssembly is already compiled to
  // its fast tier. A fresh process's first plans still run partly on the baseline tier (200
  // buses: about 3.0 / 1.8 / 1.4 / 0.95 s CPU for the first four plans), so two warm-up plans of
  // other depots come first, and their times are printed beside the figures.
  const warmUp = await planScenario(parse(withCrew(generateDepot({ buses: 200, seed: 1 }), 5)));
  const again = await planScenario(parse(withCrew(generateDepot({ buses: 200, seed: 2 }), 5)));
  console.log(
    `warm-up (first plans in this process, 200 buses, seeds 1 and 2): ${Math.round(warmUp.solveMs)} ms, ${Math.round(again.solveMs)} ms  ${load()}`,
  );
}
for (const n of sizes) {
  const input = withCrew(generateDepot({ buses: n, seed: 42 }), n / 40);
  const scenario = parse(input);
  const a = await planScenario(scenario);
  const b = await planScenario(scenario);
  const errors = checkPlan(input, a);
  const same = JSON.stringify(a.sessions) === JSON.stringify(b.sessions) && a.cost.total === b.cost.total;
  console.log(
    `${String(n).padStart(5)}  ${String(scenario.chargers.length).padStart(8)}  ${String(Math.round(Math.min(a.solveMs, b.solveMs))).padStart(8)}  ${`${a.stats.stoppedBy}/${b.stats.stoppedBy}`.padEnd(11)}  ${a.status.padEnd(8)}  ${pct(a.gap).padStart(7)}  ${(a.crewMoves / n).toFixed(2).padStart(14)}  ${String(Math.min(...a.sessions.map(minutes))).padStart(13)} min  ${errors.length ? `${errors.length} errors` : 'ok'.padEnd(7)}  ${same ? 'yes' : 'NO '}  ${String(a.stats.simplexIterations).padStart(13)}  ${load()}`,
  );
}

// Small depots short of chargers: the plan (with and without the large-neighbourhood search)
// against the exact optimum of the same plan space (one plug-in per stay), solved by the MILP.
console.log(
  '\nSmall depots short of chargers: plan against the exact MILP optimum (penalised cost: cost + shortfall penalty)',
);
console.log(
  'crew  buses  chargers  seed  plan        no LNS      exact       MILP      gap      gap no LNS  plan bound  proven gap  same twice  solve ms  load',
);
const gaps: number[] = [];
const gapsNoLns: number[] = [];
// Per depot, with the crew: the plan's distance to the exact optimum as far as it is proven
// (to the MILP's optimum where HiGHS proves one, else the plan's gap to the best proven bound:
// its own lower bound, the MILP's dual bound, the crew-aware bound without a node limit; the
// optimum cannot be below any of them).
const provenGaps: number[] = [];
const solveTimes: number[] = [];
const small: [number, number, number][] = quick
  ? [[8, 2, 3]]
  : [
      [6, 2, 1],
      [7, 2, 2],
      [8, 2, 3],
      [9, 3, 4],
      [10, 3, 5],
      [12, 3, 6],
      [6, 2, 7],
      [8, 2, 8],
      [10, 2, 9],
      [12, 3, 10],
      // Held out when the engine was tuned, checked against the exact MILP afterwards.
      [6, 2, 3],
      [7, 2, 3],
      [7, 2, 4],
    ];
const exactSeconds = Number(process.env.BENCH_EXACT_S ?? 60);
for (const crew of sections.has('small') ? [false, true] : []) {
  for (const [n, c, seed] of small) {
    const input = crew
      ? withCrew(generateDepot({ buses: n, chargers: c, seed }))
      : generateDepot({ buses: n, chargers: c, seed });
    const scenario = parse(input);
    const problem = prepareProblem(scenario);
    const penalised = (p: Plan) => p.cost.total + problem.shortfallPenalty * p.stats.shortfallKwh;
    const p = await planScenario(scenario);
    const again = await planScenario(scenario);
    const off = await planScenario(scenario, { lns: false });
    const errors = checkPlan(input, p);
    // Started from the better of the two plans: HiGHS proves it or beats it.
    const ex = solveExact(problem, solver, {
      maxNodes: 1e9,
      timeLimitMs: exactSeconds * 1000,
      start: assignmentOf(problem, penalised(p) <= penalised(off) ? p : off),
    });
    const best = Math.min(Number.isFinite(ex.objective) ? ex.objective : Infinity, penalised(p), penalised(off));
    // Proven: the MILP's optimum, or a plan at the lower bound (the bound is below every plan).
    const proven = ex.status === 'optimal' || p.gap <= 1e-6;
    const reference = ex.status === 'optimal' ? ex.objective : best;
    const gap = (penalised(p) - reference) / penalised(p);
    const gapOff = (penalised(off) - reference) / penalised(off);
    if (proven) {
      gaps.push(Math.max(0, gap));
      gapsNoLns.push(Math.max(0, gapOff));
    }
    const same = JSON.stringify(p.sessions) === JSON.stringify(again.sessions);
    // Unproven by the MILP: the crew-aware bound (one session per stay: the MILP's own plan
    // space) given the same time and no node limit may still close the gap the plan's 30 nodes left.
    let crewBound = -Infinity;
    if (crew && ex.status !== 'optimal' && p.gap > 1e-6) {
      const cb = solveCrewBound(problem, solver, {
        oneSession: true,
        maxNodes: 1e9,
        timeLimitMs: exactSeconds * 1000,
      });
      crewBound = cb.penalisedBound;
    }
    const provenBound = Math.max(p.lowerBound, Number.isFinite(ex.bound) ? ex.bound : -Infinity, crewBound);
    const provenGap =
      ex.status === 'optimal' ? Math.max(0, gap) : Math.max(0, (penalised(p) - provenBound) / penalised(p));
    if (crew) {
      provenGaps.push(provenGap);
      solveTimes.push(p.solveMs);
    }
    console.log(
      `${crew ? 'yes ' : 'no  '}  ${String(n).padStart(5)}  ${String(c).padStart(8)}  ${String(seed).padStart(4)}  ${penalised(p).toFixed(2).padStart(10)}  ${penalised(off).toFixed(2).padStart(10)}  ${(Number.isFinite(ex.objective) ? ex.objective.toFixed(2) : '-').padStart(10)}  ${(p.gap <= 1e-6 ? 'at bound' : ex.status).padEnd(8)}  ${pct(Math.max(0, gap)).padStart(7)}  ${pct(Math.max(0, gapOff)).padStart(10)}  ${p.lowerBound.toFixed(2).padStart(10)}  ${pct(provenGap).padStart(10)}  ${same ? 'yes' : 'NO '}         ${String(Math.round(p.solveMs)).padStart(8)}  ${load()}${errors.length ? `  ${errors.length} checker errors` : ''}`,
    );
  }
}
console.log(
  `best MILP solutions not proven optimal are the reference elsewhere (a plan above it is behind a known plan)`,
);
if (provenGaps.length)
  console.log(
    `with the crew, proven distance to the exact optimum (MILP optimum, else the plan's gap to the best proven bound: its own, the MILP's, the crew-aware one without a node limit): median ${pct(median(provenGaps))}, worst ${pct(Math.max(...provenGaps))} (${provenGaps.length} depots); solve ms median ${Math.round(median(solveTimes))}, worst ${Math.round(Math.max(...solveTimes))}`,
  );
console.log(
  `gap to the exact optimum (depots where it is proven: MILP optimum or plan at the lower bound): median ${pct(median(gaps))}, worst ${pct(Math.max(0, ...gaps))} (${gaps.length} depots); without the large-neighbourhood search: median ${pct(median(gapsNoLns))}, worst ${pct(Math.max(0, ...gapsNoLns))}`,
);

console.log('\nDepots short of chargers (3-6 buses per charger), with the crew: cost against the lower bound');
console.log(
  'buses  chargers  seed  status    cost       bound      gap       crew moves  moves/bus  shortest  solve ms  LNS (pairs/kept)  load',
);
const scarce: [number, number][] = !sections.has('scarce')
  ? []
  : quick
    ? [
        [12, 3],
        [40, 10],
      ]
    : [
        [8, 2],
        [12, 3],
        [15, 3],
        [40, 10],
        [100, 20],
        [200, 40],
      ];
for (const [n, c] of scarce) {
  for (const seed of quick ? [1] : [1, 2, 3]) {
    const input = withCrew(generateDepot({ buses: n, chargers: c, seed }), n / 40);
    const p = await planScenario(parse(input));
    const errors = checkPlan(input, p);
    console.log(
      `${String(n).padStart(5)}  ${String(c).padStart(8)}  ${String(seed).padStart(4)}  ${p.status.padEnd(8)}  ${p.cost.total.toFixed(2).padStart(9)}  ${p.lowerBound.toFixed(2).padStart(9)}  ${pct(p.gap).padStart(8)}  ${String(p.crewMoves).padStart(10)}  ${(p.crewMoves / n).toFixed(2).padStart(9)}  ${String(Math.min(...p.sessions.map(minutes))).padStart(5)} min  ${String(Math.round(p.solveMs)).padStart(8)}  ${`${p.stats.lns.neighbourhoods}/${p.stats.lns.accepted}`.padStart(16)}  ${load()}${errors.length ? `  ${errors.length} checker errors` : ''}`,
    );
  }
}

// A heavy weekday at an invented 24-bus depot on 10 chargers (four 60 kW, four 30 kW, two 120 kW
// on a 150 kW cabinet), midday layovers included, nobody in the yard from 23:30 to 04:30, under
// demand targets: 48 stays on 10 chargers, so it gets restarts and the crew's night as an LP.
// Each start took 13.3 s on an idle machine; the safety net of 12 s cut the first, so the plan
// depended on the machine's load (now 20 ms a bus-slot there, see defaultTimeBudgetMs).
if (sections.has('midday')) {
  console.log(
    '\nA crew-bound weekday with midday layovers (24 buses, 10 chargers, tools/bench/scenarios/crew-gap-midday.json)',
  );
  console.log(
    'run  solve ms  stopped  status    cost      bound     gap      starts (penalised)          short kWh  checker  load',
  );
  const input = JSON.parse(
    readFileSync(new URL('./scenarios/crew-gap-midday.json', import.meta.url), 'utf8'),
  ) as ScenarioInput;
  const runs: Plan[] = [];
  for (const run of quick ? [1] : [1, 2]) {
    const p = await planScenario(parse(input));
    runs.push(p);
    const errors = checkPlan(input, p);
    console.log(
      `${String(run).padStart(3)}  ${String(Math.round(p.solveMs)).padStart(8)}  ${p.stats.stoppedBy.padEnd(7)}  ${p.status.padEnd(8)}  ${p.cost.total.toFixed(2).padStart(8)}  ${p.lowerBound.toFixed(2).padStart(8)}  ${pct(p.gap).padStart(7)}  ${JSON.stringify(p.stats.starts ?? []).padEnd(26)}  ${String(p.stats.shortfallKwh).padStart(9)}  ${errors.length ? `${errors.length} errors` : 'clean'.padEnd(7)}  ${load()}`,
    );
  }
  if (runs.length === 2)
    console.log(
      `same plan twice: ${JSON.stringify(runs[0]!.sessions) === JSON.stringify(runs[1]!.sessions) ? 'yes' : 'no'}`,
    );
}

console.log('\nRe-plan after one charger fails at 22:00 (with the crew): buses moved');
console.log(
  'buses  chargers  seed  failed  buses on it  moved  on it + 1  freed chargers  allowed (on it + 1 per freed charger)  other charger  kept (extra $)  short kWh before/after  penalised cost  same twice  re-plan ms  load',
);
const moved: number[] = [];
const movedCharger: number[] = [];
const allowed: number[] = [];
const allowedFreed: number[] = [];
const replanMs: number[] = [];
for (const [n, c] of !sections.has('replan')
  ? []
  : quick
    ? [[40, 10]]
    : [
        [40, 10],
        [40, 20],
        [100, 25],
      ]) {
  for (const seed of quick ? [1] : [1, 2, 3]) {
    const input = withCrew(generateDepot({ buses: n, chargers: c, seed }), n / 40);
    const scenario = parse(input);
    const plan = await planScenario(scenario);
    const now = '2026-01-14T22:00';
    const nowMs = DateTime.fromISO(now, { zone: scenario.timezone }).toMillis();
    const busiest = [...new Set(plan.sessions.map((s) => s.charger))]
      .map((ch) => ({
        ch,
        n: new Set(plan.sessions.filter((s) => s.charger === ch && Date.parse(s.end) > nowMs).map((s) => s.bus)).size,
      }))
      .sort((x, y) => y.n - x.n || (x.ch < y.ch ? -1 : 1))[0]!;
    // Buses on a charger at the cut-off stay plugged in (as the yard reports them).
    const plugged = Object.fromEntries(
      plan.sessions
        .filter((s) => s.charger !== busiest.ch && Date.parse(s.start) < nowMs && Date.parse(s.end) > nowMs)
        .map((s) => [s.bus, s.charger]),
    );
    const state = { now, outOfService: [busiest.ch], previous: plan, plugged };
    const r = await replan(scenario, state);
    const again = await replan(scenario, state);
    const sameReplan = JSON.stringify(r.sessions) === JSON.stringify(again.sessions);
    const m = movedBuses(plan, r, nowMs);
    const mc = otherCharger(plan, r, nowMs);
    const replanErrors = checkPlan(r.replan.scenario, r, { plugged });
    // Penalised cost of the re-plan: its cost plus the shortfall at the engine's penalty per kWh.
    const penalised = r.cost.total + prepareProblem(r.replan.scenario).shortfallPenalty * r.stats.shortfallKwh;
    moved.push(m.length);
    movedCharger.push(mc.length);
    allowed.push(busiest.n + 1);
    // The issue's allowance: the failed charger's buses, plus one bus for each other charger that
    // gives up time to them (a charger whose bus of the plan before moved: "freed").
    const displaced = new Set(
      plan.sessions.filter((s) => s.charger === busiest.ch && Date.parse(s.end) > nowMs).map((s) => s.bus),
    );
    const freed = new Set(
      plan.sessions
        .filter(
          (s) => s.charger !== busiest.ch && Date.parse(s.end) > nowMs && m.includes(s.bus) && !displaced.has(s.bus),
        )
        .map((s) => s.charger),
    );
    allowedFreed.push(busiest.n + freed.size);
    replanMs.push(r.solveMs);
    console.log(
      `${String(n).padStart(5)}  ${String(c).padStart(8)}  ${String(seed).padStart(4)}  ${busiest.ch.padEnd(6)}  ${String(busiest.n).padStart(11)}  ${String(m.length).padStart(5)}  ${String(busiest.n + 1).padStart(9)}  ${String(freed.size).padStart(14)}  ${String(busiest.n + freed.size).padStart(7)}${' '.repeat(30)}${String(mc.length).padStart(13)}  ${(r.keptPrevious ? `yes (${r.keptPrevious.extraCost.toFixed(2)})` : 'no (afresh)').padEnd(14)}  ${`${plan.stats.shortfallKwh.toFixed(1)}/${r.stats.shortfallKwh.toFixed(1)}`.padStart(21)}  ${penalised.toFixed(2).padStart(14)}  ${sameReplan ? 'yes' : 'NO '}         ${String(Math.round(r.solveMs)).padStart(10)}  ${load()}${replanErrors.length ? `  ${replanErrors.length} checker errors` : ''}`,
    );
  }
}
if (moved.length)
  console.log(
    `median buses moved: ${median(moved)}; median allowed (buses on the failed charger + 1): ${median(allowed)}; median moved minus allowed: ${median(moved.map((x, i) => x - allowed[i]!))}; depots within: ${moved.filter((x, i) => x <= allowed[i]!).length} of ${moved.length}; with one bus per freed charger: median allowed ${median(allowedFreed)}, depots within ${moved.filter((x, i) => x <= allowedFreed[i]!).length} of ${moved.length}; median on another charger: ${median(movedCharger)}; median re-plan ${Math.round(median(replanMs))} ms`,
  );

// Regeneration: the night planned again after one bus's pull-in moved two hours later, made
// against the published plan (`previous`) and afresh; buses whose charging differs from the
// published plan, and the cost of each.
if (sections.has('regen')) {
  console.log(
    '\nRegeneration after one bus pulls in two hours later (with the crew): buses changed against the published plan',
  );
  console.log(
    'buses  chargers  seed  late bus  fresh: changed  cost        regenerated: changed  cost        kept (extra $)  ms',
  );
  const fresh: number[] = [];
  const regen: number[] = [];
  for (const [n, c] of quick
    ? [[40, 10]]
    : [
        [40, 10],
        [40, 20],
        [100, 25],
      ]) {
    for (const seed of quick ? [1] : [1, 2, 3]) {
      const input = withCrew(generateDepot({ buses: n, chargers: c, seed }), n / 40);
      const published = await planScenario(parse(input));
      const late = structuredClone(input);
      const stay = late.buses[0]!.stays[0]!;
      const later = DateTime.fromISO(stay.arrive).plus({ hours: 2 });
      stay.arrive = later.toFormat("yyyy-MM-dd'T'HH:mm");
      const scenario = parse(late);
      const f = await planScenario(scenario);
      const r = await planScenario(scenario, { previous: published });
      const fm = movedBuses(published, f, 0).length;
      const rm = r.moved!.buses.length;
      fresh.push(fm);
      regen.push(rm);
      console.log(
        `${String(n).padStart(5)}  ${String(c).padStart(8)}  ${String(seed).padStart(4)}  ${late.buses[0]!.id.padEnd(8)}  ${String(fm).padStart(14)}  ${f.cost.total.toFixed(2).padStart(10)}  ${String(rm).padStart(20)}  ${r.cost.total.toFixed(2).padStart(10)}  ${(r.keptPrevious ? `yes (${r.keptPrevious.extraCost.toFixed(2)})` : 'no (afresh)').padEnd(14)}  ${Math.round(r.solveMs)}  ${load()}`,
      );
    }
  }
  console.log(`median buses changed: fresh ${median(fresh)}, regenerated ${median(regen)}`);
}
