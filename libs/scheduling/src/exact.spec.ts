import { describe, expect, it } from 'vitest';
import { solveExact } from './exact.js';
import { loadSolver } from './highs-solver.js';
import { planScenario, type Plan, type PlanOptions } from './plan.js';
import { prepareProblem } from './problem.js';
import { type ScenarioInput } from './scenario.js';
import { generateDepot } from './testing/generate-depot.js';
import { checkPlan } from './testing/plan-checker.js';
import { assignmentOfPlan as assignmentOf } from './testing/plan-assignment.js';
import { parsedScenario, testYard } from './testing/crew-yard.js';

// The plans against the exact assignment MILP (exact.ts, HiGHS) on small depots short of
// chargers: two or three chargers for six to twelve buses, with and without the yard crew.

const yard = testYard();

/** Cost plus the shortfall penalty: what the engine and the MILP both minimise. */
function penalised(input: ScenarioInput, plan: Plan): number {
  return plan.cost.total + prepareProblem(parsedScenario(input)).shortfallPenalty * plan.stats.shortfallKwh;
}

async function planOf(input: ScenarioInput, options: PlanOptions = {}) {
  // The searches end on their counted budgets, not on the safety net, even on a busy machine.
  const plan = await planScenario(parsedScenario(input), { timeBudgetMs: 120_000, ...options });
  expect(checkPlan(input, plan)).toEqual([]);
  return plan;
}

describe('exact assignment MILP (HiGHS) against the plans', () => {
  it.each([
    [8, 2, 3],
    [9, 3, 4],
    [6, 2, 7],
    [8, 2, 8],
  ])(
    'without a crew, %i buses on %i chargers (seed %i): the MILP proves the plan optimal',
    async (buses, chargers, seed) => {
      const input = generateDepot({ buses, chargers, seed });
      const plan = await planOf(input);
      const solver = await loadSolver();
      const problem = prepareProblem(parsedScenario(input));
      // Started from the plan's own sessions: HiGHS then only has to prove (or beat) it.
      const exact = solveExact(problem, solver, {
        maxNodes: 50,
        timeLimitMs: 20_000,
        start: assignmentOf(problem, plan),
      });
      expect(exact.status).toBe('optimal');
      const cost = penalised(input, plan);
      // The plan is one of the MILP's solutions, so never below its optimum; and within 0.1 % of it.
      expect(cost).toBeGreaterThanOrEqual(exact.objective * (1 - 1e-6));
      expect((cost - exact.objective) / exact.objective).toBeLessThanOrEqual(0.001);
    },
  );

  // Optima and best MILP solutions found offline with `solveExact` (no node limit, 100-150 s:
  // longer than a test should take), with the crew of `yard` above.
  const withCrew = [
    // [buses, chargers, seed, best known penalised cost, proven optimal?]
    [6, 2, 1, 334.2470355731224, true],
    [7, 2, 2, 590.1551383399209, false],
    // Missed by 1.65 % and 2.36 % before the crew's-night layouts (crew-night.ts `arrangeNight`)
    // and the hand-over polish. 8 on 2: proven by `solveExact` (761 nodes, 37 s at load 2.5).
    // 10 on 2: the MILP's best in 100 s (bound 1,031.11 there), equal to the crew-aware bound
    // at its proven optimum (crew-bound.ts, one session per stay: the MILP's own plan space).
    [8, 2, 8, 650.3608695652172, true],
    [10, 2, 9, 1032.3883399209485, true],
  ] as const;
  it.each(withCrew)(
    'with the crew, %i buses on %i chargers (seed %i): the plan at the exact optimum',
    async (buses, chargers, seed, best) => {
      const input = { ...generateDepot({ buses, chargers, seed }), yard };
      const plan = await planOf(input);
      expect((penalised(input, plan) - best) / best).toBeLessThanOrEqual(0.001);
    },
  );

  it('with the crew, every bus served where chargers are scarce, within a few per cent of a proven bound', async () => {
    // The whole-sequence search and the candidates that follow the crew-aware bound
    // (crew-night.ts) together; before them these plans paid 15-20 % more than the optimum
    // allows (or left buses short: 10 on 2, seed 9). The bound is the plan's own (crew-bound.ts).
    const cases = [
      [8, 2, 3],
      [10, 3, 5],
      [10, 2, 9],
    ] as const;
    for (const [buses, chargers, seed] of cases) {
      const input = { ...generateDepot({ buses, chargers, seed }), yard };
      const on = await planOf(input);
      const off = await planOf(input, { lns: false });
      expect(on.stats.shortfallKwh).toBe(0);
      // Never worse without the whole-sequence search, up to the LP's tie-break (1e-7 of the
      // energy cost: two paths to the same windows can end that far apart).
      expect(penalised(input, on)).toBeLessThanOrEqual(penalised(input, off) * (1 + 1e-6));
      expect(on.gap).toBeLessThan(0.02);
      expect(on.stats.crewBound).not.toBeNull();
    }
  }, 120_000);

  it('a bus left short says why in words, with its pull-in and pull-out, and whether that is proven', async () => {
    // One 60 kW charger, two buses needing more than the evening and the morning crews can give
    // them in turn; and one bus that could not be served even alone (too short a stay).
    const base = generateDepot({ buses: 3, chargers: 1, seed: 4, cabinets: false });
    const input: ScenarioInput = {
      ...base,
      chargers: [{ id: 'C1', maxKw: 60 }],
      buses: [
        {
          ...base.buses[0]!,
          id: 'B1',
          maxKw: 60,
          arrivalKwh: 40,
          stays: [{ arrive: '2026-01-14T18:40', depart: '2026-01-15T05:10', departMinKwh: 150 }],
        },
        {
          ...base.buses[1]!,
          id: 'B2',
          maxKw: 60,
          arrivalKwh: 40,
          stays: [{ arrive: '2026-01-14T18:40', depart: '2026-01-15T05:10', departMinKwh: 150 }],
        },
        {
          ...base.buses[2]!,
          id: 'B3',
          maxKw: 60,
          arrivalKwh: 30,
          stays: [{ arrive: '2026-01-15T04:40', depart: '2026-01-15T05:40', departMinKwh: 120 }],
        },
      ],
      yard,
    };
    const plan = await planOf(input);
    const short = plan.buses.filter((b) => b.shortfallKwh > 0);
    expect(short.length).toBeGreaterThan(0);
    for (const b of short) {
      expect(b.cause).toMatch(/pull-in \d\d:\d\d and pull-out \d\d:\d\d/);
      expect(b.causeProven).not.toBeNull();
    }
    const b3 = plan.buses.find((b) => b.id === 'B3')!;
    expect(b3.reason).toBe('dwell');
    expect(b3.causeProven).toBe(true);
    expect(b3.cause).toContain('between pull-in 04:40 and pull-out 05:40');
    expect(b3.cause).toContain('proven: no plan can serve it fully');
    const shared = short.filter((b) => b.reason === 'charger');
    for (const b of shared) expect(b.cause).toContain("with the crew's hours (nobody in the yard from 23:30 to 04:30)");
  });

  it('a bus short at its midday pull-out, not at dawn: the cause names the midday stay', async () => {
    // Before, the cause always named a bus's last stay (here 19:00-05:00, which is served).
    const base = generateDepot({ buses: 1, chargers: 1, seed: 4, cabinets: false });
    const input: ScenarioInput = {
      ...base,
      chargers: [{ id: 'C1', maxKw: 60 }],
      buses: [
        {
          ...base.buses[0]!,
          id: 'B1',
          maxKw: 60,
          arrivalKwh: 30,
          stays: [
            // 30 minutes at 60 kW give 27.6 kWh at most: 30 + 27.6 is 42.4 kWh short of 100.
            { arrive: '2026-01-14T13:00', depart: '2026-01-14T13:30', departMinKwh: 100, runKwh: 20 },
            { arrive: '2026-01-14T19:00', depart: '2026-01-15T05:00', departMinKwh: 60 },
          ],
        },
      ],
    };
    const plan = await planOf(input);
    const b1 = plan.buses[0]!;
    expect(b1.shortfallKwh).toBeCloseTo(42.4, 1);
    expect(b1.departures[1]!.kwh).toBeGreaterThanOrEqual(60 - 1e-6);
    expect(b1.reason).toBe('dwell');
    expect(b1.cause).toContain('between pull-in 13:00 and pull-out 13:30');
    expect(b1.cause).toContain('42.4 kWh');
  });
});
