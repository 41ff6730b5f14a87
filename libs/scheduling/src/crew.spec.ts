import { describe, expect, it } from 'vitest';
import { planScenario, type PlanOptions } from './plan.js';
import { replan } from './replan.js';
import { parseScenario, type ScenarioInput } from './scenario.js';
import { generateDepot } from './testing/generate-depot.js';
import { checkPlan } from './testing/plan-checker.js';
import { testYard } from './testing/crew-yard.js';

const yard = testYard();

async function plan(input: ScenarioInput, options: PlanOptions = {}) {
  const parsed = parseScenario(input);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return planScenario(parsed.scenario, options);
}

describe('the yard crew', () => {
  it('reads the yard settings and names a bad crew window', () => {
    const bad = parseScenario({
      ...generateDepot({ buses: 2, seed: 1 }),
      yard: { ...yard, crew: [{ from: '2026-01-14T23:00', to: '2026-01-14T22:00', movesPerSlot: 0 }] },
    });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.problems.map((p) => p.path)).toEqual(expect.arrayContaining(['yard.crew[0].movesPerSlot']));
    const later = parseScenario({
      ...generateDepot({ buses: 2, seed: 1 }),
      yard: { ...yard, crew: [{ from: '2026-01-14T23:00', to: '2026-01-14T22:00', movesPerSlot: 1 }] },
    });
    expect(later.ok).toBe(false);
    if (!later.ok) expect(later.problems[0]!.path).toBe('yard.crew[0].to');
  });

  it('a bus alone on its charger is plugged in and out by its driver: no crew move', async () => {
    const p = await plan({ ...generateDepot({ buses: 4, chargers: 4, seed: 2 }), yard });
    expect(checkPlan({ ...generateDepot({ buses: 4, chargers: 4, seed: 2 }), yard }, p)).toEqual([]);
    expect(p.crewMoves).toBe(0);
    for (const s of p.sessions) expect([s.startMove, s.endMove]).toEqual(['driver', 'driver']);
  });

  it.each([1, 2, 3, 4, 5, 6])('keeps every crew rule on a depot with 3-4 buses per charger (seed %i)', async (seed) => {
    const input = { ...generateDepot({ buses: 14, chargers: 4, seed }), yard };
    const p = await plan(input);
    expect(checkPlan(input, p)).toEqual([]);
    for (const s of p.sessions) {
      const minutes = (Date.parse(s.end) - Date.parse(s.start)) / 60_000;
      expect(minutes).toBeGreaterThanOrEqual(45);
    }
    // No one in the yard from 23:30 to 04:30: no move there.
    for (const s of p.sessions) {
      for (const [move, at] of [
        [s.startMove, s.start],
        [s.endMove, s.end],
      ] as const) {
        if (move !== 'crew') continue;
        const ms = Date.parse(at);
        expect(ms < Date.parse('2026-01-14T23:30:00-06:00') || ms >= Date.parse('2026-01-15T04:30:00-06:00')).toBe(
          true,
        );
      }
    }
  });

  it('without crew windows moves are unlimited, but each is still named and counted', async () => {
    const input = {
      ...generateDepot({ buses: 10, chargers: 3, seed: 7 }),
      yard: { minPlugInMinutes: 60, driversPlugIn: false },
    };
    const p = await plan(input);
    expect(checkPlan(input, p)).toEqual([]);
    expect(p.crewMoves).toBeGreaterThan(0);
    expect(p.sessions.every((s) => s.startMove === 'crew')).toBe(true);
  });

  it('gives the same plan for the same inputs', async () => {
    // The first start's plan (restarts.ts; the other starts' figures are checked against their
    // measured values in crew-scarce.spec.ts, which no run could meet by chance).
    const input = { ...generateDepot({ buses: 20, chargers: 6, seed: 11 }), yard };
    const [a, b] = [await plan(input, { restarts: 0 }), await plan(input, { restarts: 0 })];
    expect(b.sessions).toEqual(a.sessions);
    expect(b.cost).toEqual(a.cost);
  });

  it('trades cost for fewer crew moves only within the tolerance, and says so', async () => {
    // 8 buses on 4 chargers: within the default tolerance (0.5 % or $5) the cheapest plan stands
    // with its 8 crew moves; with 10 % or $200 the plan saves moves for money and says how many for
    // how much (measured: seed 1, 1 fewer for $195.31; seed 3, 2 fewer for $175.45).
    for (const seed of [1, 3]) {
      const depot = generateDepot({ buses: 8, chargers: 4, seed });
      const narrow = { ...depot, yard };
      const wide = { ...depot, yard: { ...yard, costTolerancePercent: 10, costToleranceAmount: 200 } };
      const cheapest = await plan(narrow);
      const traded = await plan(wide);
      expect(checkPlan(narrow, cheapest)).toEqual([]);
      expect(checkPlan(wide, traded)).toEqual([]);
      expect(cheapest.crewTrade).toBeNull();
      const trade = traded.crewTrade!;
      expect(trade.fewerMoves).toBeGreaterThan(0);
      expect(traded.crewMoves).toBe(cheapest.crewMoves - trade.fewerMoves);
      // The trade is the difference between the two plans, and within the wide tolerance.
      expect(traded.cost.total - cheapest.cost.total).toBeCloseTo(trade.extraCost, 1);
      expect(trade.extraCost).toBeGreaterThan(5);
      expect(trade.extraCost).toBeLessThanOrEqual(Math.max(0.1 * cheapest.cost.total, 200) + 1e-6);
    }
  });

  it('a re-plan after a charger fails keeps the rest of the night and says which buses moved and why', async () => {
    const input = { ...generateDepot({ buses: 12, chargers: 6, seed: 5 }), yard };
    const parsed = parseScenario(input);
    if (!parsed.ok) throw new Error('bad scenario');
    const before = await planScenario(parsed.scenario);
    const cutMs = Date.parse('2026-01-14T22:00:00-06:00');
    const failed = before.sessions.find((s) => Date.parse(s.end) > cutMs)!.charger;
    const plugged = Object.fromEntries(
      before.sessions
        .filter((s) => s.charger !== failed && Date.parse(s.start) < cutMs && Date.parse(s.end) > cutMs)
        .map((s) => [s.bus, s.charger]),
    );
    const r = await replan(parsed.scenario, {
      now: '2026-01-14T22:00',
      outOfService: [failed],
      previous: before,
      plugged,
    });
    expect(checkPlan(r.replan.scenario, r, { plugged })).toEqual([]);
    expect(r.replan.moved.reasons[0]).toMatch(new RegExp(`^charger ${failed} out of service: \\d+ bus`));
    const onIt = new Set(
      before.sessions.filter((s) => s.charger === failed && Date.parse(s.end) > cutMs).map((s) => s.bus),
    );
    // Kept where it could be: the buses on the failed charger, and few others.
    expect(r.replan.moved.buses.length).toBeLessThanOrEqual(onIt.size + 4);
    const again = await replan(parsed.scenario, {
      now: '2026-01-14T22:00',
      outOfService: [failed],
      previous: before,
      plugged,
    });
    expect(again.sessions).toEqual(r.sessions);
  });

  it('a re-plan after the busiest charger fails moves its buses and at most one other, the same way twice', async () => {
    // 40 buses on 10 chargers, the charger with most buses after 22:00 out of service then, the
    // buses on the other chargers reported plugged in: its buses need new places. Before the
    // repair (kept sessions fixed, the open stays seated in idle time, kept ones released one at a
    // time only for a saving beyond the tolerance) this re-plan moved 12 buses.
    const input = { ...generateDepot({ buses: 40, chargers: 10, seed: 1 }), yard };
    const parsed = parseScenario(input);
    if (!parsed.ok) throw new Error('bad scenario');
    // From the plan the searches alone give, and re-planned by them alone: the repair is what this
    // tests. (The crew's night, crew-bound.ts, lays out another night $429 cheaper from the cut-off,
    // against which this plan is not kept; the bench measures re-plans of that night: one bus per
    // charger that makes room, in the median.)
    const options = { crewNight: false, restarts: 0 };
    const before = await planScenario(parsed.scenario, options);
    const cutMs = Date.parse('2026-01-14T22:00:00-06:00');
    const after = (s: { end: string }) => Date.parse(s.end) > cutMs;
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
    const state = { now: '2026-01-14T22:00', outOfService: [failed], previous: before, plugged };
    const r = await replan(parsed.scenario, state, options);
    expect(checkPlan(r.replan.scenario, r, { plugged })).toEqual([]);
    expect(r.keptPrevious).not.toBeNull();
    const onIt = onCharger(failed);
    expect(onIt.size).toBe(5);
    const others = r.replan.moved.buses.filter((b) => !onIt.has(b));
    expect(others.length).toBeLessThanOrEqual(1);
    // Every bus still on a charger at 22:00 keeps its session as planned, even one that needs no more energy.
    for (const [bus, charger] of Object.entries(plugged)) {
      const was = before.sessions.find((s) => s.bus === bus && after(s))!;
      const now = r.sessions.find((s) => s.bus === bus)!;
      if (!r.replan.moved.buses.includes(bus)) expect([now.charger, now.end]).toEqual([charger, was.end]);
    }
    const again = await replan(parsed.scenario, state, options);
    expect(again.sessions).toEqual(r.sessions);
    expect(again.replan.moved).toEqual(r.replan.moved);
  });

  it("a re-plan with buses plugged in compares against the crew's night too, and every plugged-in bus stays on its charger", async () => {
    // 40 buses on 10 chargers, seed 2: the crew's-night candidates and the repair of short buses
    // after them once moved plugged-in buses to other chargers (6 crew rules broken, found by the
    // checker); now they keep them, and the kept plan is judged against that path's plans.
    const input = { ...generateDepot({ buses: 40, chargers: 10, seed: 2 }), yard };
    const parsed = parseScenario(input);
    if (!parsed.ok) throw new Error('bad scenario');
    // The first start's plan (restarts.ts): the re-plan is what this tests.
    const before = await planScenario(parsed.scenario, { restarts: 0 });
    const cutMs = Date.parse('2026-01-14T22:00:00-06:00');
    const plugged = Object.fromEntries(
      before.sessions
        .filter((s) => s.charger !== 'C004' && Date.parse(s.start) < cutMs && Date.parse(s.end) > cutMs)
        .map((s) => [s.bus, s.charger]),
    );
    expect(Object.keys(plugged).length).toBeGreaterThan(5);
    const r = await replan(parsed.scenario, {
      now: '2026-01-14T22:00',
      outOfService: ['C004'],
      previous: before,
      plugged,
    });
    expect(r.stats.crewBound).not.toBeNull();
    expect(checkPlan(r.replan.scenario, r, { plugged })).toEqual([]);
    for (const [bus, charger] of Object.entries(plugged))
      expect(r.sessions.find((s) => s.bus === bus)?.charger ?? charger).toBe(charger);
  });

  it('says so when the plan being carried out cannot be kept within the tolerance and the night is planned afresh', async () => {
    // Every battery reported empty at 22:00: the windows planned for fuller batteries cannot hold
    // what the buses now need, so the cheapest plan replaces the one being carried out.
    // (Seed 1: on seed 5 the repaired plan now costs no more than the fresh one and is kept.)
    const input = { ...generateDepot({ buses: 12, chargers: 6, seed: 1 }), yard };
    const parsed = parseScenario(input);
    if (!parsed.ok) throw new Error('bad scenario');
    const before = await planScenario(parsed.scenario);
    const energyKwh = Object.fromEntries(parsed.scenario.buses.map((b) => [b.id, 0]));
    const r = await replan(parsed.scenario, { now: '2026-01-14T22:00', previous: before, energyKwh });
    expect(checkPlan(r.replan.scenario, r)).toEqual([]);
    expect(r.keptPrevious).toBeNull();
    expect(r.replan.moved.reasons).toContain('battery levels reported for 12 buses');
    // With what keeping it would have taken: money beyond the tolerance, or buses left short.
    expect(r.replan.moved.reasons.at(-1)).toMatch(
      /^the plan being carried out could not be kept(: keeping it would leave buses [\d.]+ kWh short that a new plan delivers(, and cost \$[\d,]+\.\d\d more, where \$[\d,]+\.\d\d is allowed)?| within the depot's cost tolerance \(keeping it: \$[\d,]+\.\d\d more, where \$[\d,]+\.\d\d is allowed\)): the rest of the night was planned afresh \(\d+ other bus(es)? moved\)$/,
    );
  });
});
