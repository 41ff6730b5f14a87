import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { planScenario, type Plan, type PlanOptions } from './plan.js';
import { replan } from './replan.js';
import { parseScenario, type Scenario } from './scenario.js';
import { generateDepot } from './testing/generate-depot.js';
import { checkPlan } from './testing/plan-checker.js';
import { parsedScenario, testYard } from './testing/crew-yard.js';

// Stable re-plans (stable.ts): after the busiest charger fails at 22:00 the repair keeps every
// session it can, serves the buses that lost their charger, and moves other buses only where
// that serves shortfall the fault caused or saves more than the depot's tolerance.

const yard = testYard;
const cutMs = Date.parse('2026-01-14T22:00:00-06:00');
// The searches end on their counted budgets, not on the safety net, even on a busy machine: the
// same plan, and so the same re-plan, every run. The plans re-planned are the first start's
// (restarts.ts): the re-plans are what this tests.
const options = { timeBudgetMs: 120_000, restarts: 0 };
const after = (s: { end: string }) => Date.parse(s.end) > cutMs;

async function faultAt22(buses: number, chargers: number, seed: number, beforeOptions: PlanOptions = options) {
  const parsed = parseScenario({ ...generateDepot({ buses, chargers, seed }), yard: yard(buses / 40) });
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  const scenario: Scenario = parsed.scenario;
  const before: Plan = await planScenario(scenario, beforeOptions);
  const onCharger = (c: string) =>
    new Set(before.sessions.filter((s) => s.charger === c && after(s)).map((s) => s.bus));
  const failed = [...new Set(before.sessions.map((s) => s.charger))].sort(
    (x, y) => onCharger(y).size - onCharger(x).size || (x < y ? -1 : 1),
  )[0]!;
  const plugged = Object.fromEntries(
    before.sessions
      .filter((s) => s.charger !== failed && Date.parse(s.start) < cutMs && after(s))
      .map((s) => [s.bus, s.charger]),
  );
  const r = await replan(
    scenario,
    { now: '2026-01-14T22:00', outOfService: [failed], previous: before, plugged },
    options,
  );
  expect(checkPlan(r.replan.scenario, r, { plugged })).toEqual([]);
  return { before, r, onIt: onCharger(failed) };
}

describe('stable re-plans', () => {
  it('serves every bus the plan being carried out served, cutting a kept session short where idle time is missing', async () => {
    // 40 buses on 10 chargers (seed 2): every other charger is busy through the night, so the four
    // buses of the failed charger fit only where a kept session ends earlier. Releasing whole kept
    // sessions one at a time (the repair before cuts) left 41.2 kWh short here.
    const { before, r, onIt } = await faultAt22(40, 10, 2);
    expect(before.stats.shortfallKwh).toBe(0);
    expect(r.keptPrevious).not.toBeNull();
    expect(r.stats.shortfallKwh).toBeLessThan(0.01);
    // Few other buses changed, and each one that did is named.
    const others = r.replan.moved.buses.filter((b) => !onIt.has(b));
    expect(others.length).toBeLessThanOrEqual(3);
    expect(r.replan.moved.reasons.at(-1)).toBe(
      `${others.length} other ${others.length === 1 ? 'bus' : 'buses'} moved to make room or to keep the cost down`,
    );
  });

  it('does not move unaffected buses to mend shortfall the plan being carried out already had', async () => {
    // 100 buses on 25 chargers (seed 1), planned without the crew's night (which now serves all
    // but 59 kWh of it), are 350 kWh short before the fault. The repair before this rule gave two
    // of those short buses sessions by moving others (10 buses moved, one of them left 30 kWh
    // short); now only the failed charger's buses and what serves them move.
    const { before, r, onIt } = await faultAt22(100, 25, 1, { ...options, crewNight: false });
    expect(before.stats.stoppedBy).not.toBe('time');
    expect(before.stats.shortfallKwh).toBeGreaterThan(300);
    const hadNoSession = new Set(
      before.buses.map((b) => b.id).filter((id) => !before.sessions.some((s) => s.bus === id && after(s))),
    );
    expect(r.replan.moved.buses.filter((b) => hadNoSession.has(b))).toEqual([]);
    // The fault is absorbed: the depot is no shorter than before it (here 333 kWh after against
    // 350 before), and no bus the plan being carried out served is left short by more than a trace
    // beside that (the repair may trim a kept session by a kWh or two to seat a displaced bus).
    expect(r.stats.shortfallKwh).toBeLessThanOrEqual(before.stats.shortfallKwh + 1e-6);
    for (const b of r.buses) {
      const was = before.buses.find((x) => x.id === b.id)!;
      if (was.shortfallKwh === 0) expect(b.shortfallKwh).toBeLessThan(2);
    }
    // Beyond the failed charger's buses, at most one bus per charger that gives up time to them
    // (the allowance: the buses on the failed charger plus one per freed charger).
    const others = r.replan.moved.buses.filter((b) => !onIt.has(b));
    const freed = new Set(before.sessions.filter((s) => after(s) && others.includes(s.bus)).map((s) => s.charger));
    expect(others.length).toBeLessThanOrEqual(freed.size);
  });

  it('a regeneration keeps the published plan: the same inputs change nothing, a late bus moves itself alone where a fresh plan moves every bus', async () => {
    // The demo depot's night (testing/demo-night.json), published, then generated again.
    const raw = JSON.parse(readFileSync(new URL('./testing/demo-night.json', import.meta.url), 'utf8'));
    const published = await planScenario(parsedScenario(raw));
    const same = await planScenario(parsedScenario(raw), { previous: published });
    expect(same.moved).toEqual({ buses: [], reasons: [] });
    expect(same.sessions).toEqual(published.sessions);
    // Bus 224 now pulls in at 19:30 instead of 16:44.
    const late = structuredClone(raw);
    const bus = late.buses.find((b: { id: string }) => b.id === '224');
    bus.stays[0].arrive = '2026-12-03T19:30';
    const scenario = parsedScenario(late);
    const regenerated = await planScenario(scenario, { previous: published });
    const fresh = await planScenario(scenario);
    expect(checkPlan(scenario, regenerated)).toEqual([]);
    const movedFrom = (p: Plan) =>
      published.buses.filter((b) => {
        const key = (q: Plan) =>
          JSON.stringify(q.sessions.filter((x) => x.bus === b.id).map((x) => [x.charger, x.start, x.end]));
        return key(p) !== key(published);
      }).length;
    // Measured: the fresh plan moves 24 of 24 buses (at $288.28), the regeneration 1 (at $223.44).
    expect(movedFrom(fresh)).toBeGreaterThan(10);
    expect(regenerated.moved!.buses.length).toBe(movedFrom(regenerated));
    expect(regenerated.moved!.buses.length).toBeLessThanOrEqual(2);
    expect(regenerated.cost.total).toBeLessThanOrEqual(fresh.cost.total + Math.max(5, 0.005 * fresh.cost.total));
    expect(regenerated.moved!.reasons).toEqual([
      "the night's data changed or a change keeps the cost down; every other bus keeps the published plan",
    ]);
  });
});
