import { describe, expect, it } from 'vitest';
import { solveCrewBound } from './crew-bound.js';
import { loadSolver } from './highs-solver.js';
import { solveLowerBound } from './lower-bound.js';
import { defaultTimeBudgetMs, planScenario, type PlanOptions } from './plan.js';
import { prepareProblem } from './problem.js';
import { generateDepot } from './testing/generate-depot.js';
import { checkPlan } from './testing/plan-checker.js';
import { parsedScenario, testYard } from './testing/crew-yard.js';

// Depots short of chargers (4-5 buses per charger) with the yard crew, beyond the MILP's reach:
// the crew-aware bound as an LP (crew-bound.ts, `relaxed`) proves the gap, and the crew's-night
// candidates from its rounded holders serve buses the charger-by-charger searches left short.

/** A depot of the generator with the tests' crew scaled to it (100 buses: 8 and 5 moves per slot). */
function depot(buses: number, chargers: number, seed: number) {
  return { ...generateDepot({ buses, chargers, seed }), yard: testYard(Math.max(1, buses / 40)) };
}

/**
 * Plans a test depot with room to end on its counted budgets; the plan keeps every rule. With it
 * the depot's problem and the plan's penalised cost (cost + shortfall penalty, what bounds bound).
 */
async function planChecked(input: ReturnType<typeof depot>, options: PlanOptions = {}) {
  const scenario = parsedScenario(input);
  const plan = await planScenario(scenario, { timeBudgetMs: 120_000, ...options });
  expect(plan.stats.stoppedBy).not.toBe('time');
  expect(checkPlan(input, plan)).toEqual([]);
  const problem = prepareProblem(scenario);
  const penalised = plan.cost.total + plan.stats.shortfallKwh * problem.shortfallPenalty;
  return { scenario, plan, problem, penalised };
}

describe('depots short of chargers, with the crew', () => {
  it("the safety net grows with the bus-slots where the crew's night runs as an LP, and only there", () => {
    const problemOf = (buses: number, chargers: number, crew: boolean) => {
      const input = generateDepot({ buses, chargers, seed: 1 });
      return prepareProblem(parsedScenario(crew ? { ...input, yard: testYard(buses / 40) } : input));
    };
    const busSlots = (p: ReturnType<typeof problemOf>) => p.buses.reduce((a, b) => a + b.slots.length, 0);
    // 40 buses on 10 chargers with the crew: 4 stays a charger.
    const scarce = problemOf(40, 10, true);
    expect(busSlots(scarce)).toBeGreaterThan(600);
    expect(defaultTimeBudgetMs(scarce)).toBe(20 * busSlots(scarce));
    // The same depot without crew windows, or with 2 buses a charger: the 12 s net.
    expect(defaultTimeBudgetMs(problemOf(40, 10, false))).toBe(12_000);
    expect(defaultTimeBudgetMs(problemOf(40, 20, true))).toBe(12_000);
    // 200 buses (above the whole-sequence search's 120 stays): 12 ms a bus.
    expect(defaultTimeBudgetMs(problemOf(200, 40, true))).toBe(12_000);
    expect(defaultTimeBudgetMs(problemOf(1_000, 250, true))).toBe(12_000);
  });

  it('7 buses on 2 chargers (seed 4): the optimum, proven by its own bound, where the few best-scored splits missed it by 4.2 %', async () => {
    const { plan, penalised } = await planChecked(depot(7, 2, 4));
    // HiGHS's MILP (`solveExact`, one plug-in per stay, no node limit) run for 150 s from the
    // plan of 692.10 found 664.05 and nothing cheaper, its bound then at 643.97 (measured
    // 2026-12-03). The whole-sequence search sending every split to the LP finds it too, and the
    // plan's own bound (the crew-aware MILP, one session per stay) proves it optimal.
    expect(penalised).toBeLessThanOrEqual(664.05 + 0.01);
    expect(plan.lowerBound).toBeLessThanOrEqual(penalised);
    expect(plan.gap).toBeLessThan(0.001);
  }, 120_000);

  it('6 buses on 2 chargers (seed 3): the exact optimum, which the searches missed by 2.42 %, from the exact MILP the plan runs on small crew depots above their bound', async () => {
    const { plan, penalised } = await planChecked(depot(6, 2, 3));
    // The optimum, 461.58: HiGHS's MILP (`solveExact`, one plug-in per stay, no node limit) run
    // from the searches' plan of 472.76 proved it in 150 s (measured 2026-12-03; the depot was
    // held out while the searches were tuned). The plan's own MILP (30 nodes) finds it, and its
    // bound (454.39 after 30 nodes) is the one the review shows.
    expect(penalised).toBeLessThanOrEqual(461.58 + 0.01);
    expect(plan.stats.construction).toMatch(/\+exact$/);
    expect(plan.lowerBound).toBeLessThanOrEqual(penalised);
    expect(plan.gap).toBeLessThan(0.02);
  }, 120_000);

  it('40 buses on 10 chargers: the crew-aware bound proves a gap the relaxation cannot; other starts find a cheaper plan', async () => {
    const { plan, problem } = await planChecked(depot(40, 10, 3));
    expect(plan.stats.shortfallKwh).toBeLessThan(1e-3);
    // The relaxation lets a charger pass from bus to bus while nobody is in the yard: far below
    // the plan here. Measured: bound 4,182.31, plan 4,343.99, gap 3.7 %.
    const relaxation = solveLowerBound(problem, await loadSolver()).penalisedObjective;
    expect(plan.stats.crewBound?.nodes).toBe(0);
    expect(plan.lowerBound).toBeGreaterThan(relaxation * 1.2);
    expect(plan.lowerBound).toBeLessThanOrEqual(plan.cost.total);
    expect(plan.gap).toBeLessThan(0.05);
    // Three starts (restarts.ts), the cheapest kept: measured 4,456.56, 4,462.45 and 4,343.99, so
    // the depot listed in another order gave a plan 2.5 % cheaper than the first start's.
    const starts = plan.stats.starts!;
    // Each start ends on its budgets, not the clock: the same figures on every run and machine.
    expect(starts).toEqual([4456.56, 4462.45, 4343.99]);
    expect(plan.cost.total - (plan.crewTrade?.extraCost ?? 0)).toBeCloseTo(Math.min(...starts), 2);
    expect(Math.min(...starts)).toBeLessThan(starts[0]! * 0.98);
  }, 180_000);

  it('100 buses on 20 chargers: every bus served, where the searches alone left 1,210 kWh short', async () => {
    // The first start alone (restarts.ts): it serves every bus already.
    const { plan } = await planChecked(depot(100, 20, 3), { restarts: 0 });
    expect(plan.status).toBe('feasible');
    expect(plan.stats.shortfallKwh).toBeLessThan(1e-3);
    expect(plan.gap).toBeLessThan(0.12);
  }, 120_000);

  it('100 buses on 20 chargers, seed 2, left short: its bound holds for every plan at most as short', async () => {
    // The crew-aware LP serves every bus here, so the plan's bound is that LP's optimum less the
    // plan's shortfall priced at the LP's dearest departure dual. Checked against the same LP
    // solved again with the shortfall free of penalty up to the plan's (a bound by construction).
    // The plan is built without the whole-sequence search and the repair's shared windows, each of
    // which serves every bus here: the searches before them leave 29.6 kWh short.
    const { plan, problem } = await planChecked(depot(100, 20, 2), { lns: false, shareWindows: false, restarts: 0 });
    const solver = await loadSolver();
    expect(plan.status).toBe('short');
    const capped = solveCrewBound(problem, solver, { relaxed: true, shortfallCapKwh: plan.stats.shortfallKwh });
    expect(plan.lowerBound).toBeLessThanOrEqual(capped.penalisedBound + 1e-6);
    // Measured: plan 12,788.48 and 29.6 kWh short, its bound 10,727.71, the capped LP the same.
    const relaxation = solveLowerBound(problem, solver);
    const served = relaxation.penalisedObjective - Math.max(...relaxation.stayDual) * plan.stats.shortfallKwh;
    expect(plan.lowerBound).toBeGreaterThan(served * 1.2);
    expect(plan.gap).toBeLessThan(0.2);
  }, 120_000);
});
