import { describe, expect, it } from 'vitest';
import type { PlanResult } from '@nightyard/contracts';
import { parseScenario, planScenario, replan, type Plan, type Scenario } from '@nightyard/scheduling';
import { generateDepot } from '../../../../libs/scheduling/src/testing/generate-depot';
import { testYard } from '../../../../libs/scheduling/src/testing/crew-yard';
import { mergeReplan } from './night-in-progress';

// A revision's cost is the whole night's, as the utility bills it: the charging before the cut-off
// at its prices, the demand charge of the night's peaks above the peaks it began with, and the
// engine's plan from the cut-off on. Each figure is recomputed here from the slots and sessions
// (price x kWh, rate x kW above the peak so far), not from the code under test.

const options = { timeBudgetMs: 5000, maxMoves: 30 };
const SLOT_MS = 900_000;

function depot(): Scenario {
  const parsed = parseScenario(generateDepot({ buses: 12, seed: 3 }));
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return parsed.scenario;
}

const priceAt = (r: PlanResult) => new Map(r.slots.map((s) => [Date.parse(s.start), s.price]));
const chargingAt = (sessions: PlanResult['sessions']) => {
  const kw = new Map<number, number>();
  for (const x of sessions)
    x.kw.forEach((v, k) =>
      kw.set(Date.parse(x.start) + k * SLOT_MS, (kw.get(Date.parse(x.start) + k * SLOT_MS) ?? 0) + v),
    );
  return kw;
};
const energyOf = (r: PlanResult) => {
  const price = priceAt(r);
  let sum = 0;
  for (const [t, kw] of chargingAt(r.sessions)) sum += kw * 0.25 * price.get(t)!;
  return sum;
};
/** The tariff's demand charges on the night's peaks above those it began with. */
function demandOf(r: PlanResult, s: Scenario) {
  const peak = (slots: PlanResult['slots']) => Math.max(0, ...slots.map((x) => x.loadKw));
  let d = s.tariff.facilityDemandCharge * Math.max(0, peak(r.slots) - (s.tariff.peaksSoFarKw['facility'] ?? 0));
  for (const p of s.tariff.periods)
    d +=
      p.demandCharge *
      Math.max(0, peak(r.slots.filter((x) => x.period === p.name)) - (s.tariff.peaksSoFarKw[p.name] ?? 0));
  return d;
}

describe("a revision's figures are the whole night's", () => {
  it('a charger out and a bus late at 23:00: cost, demand, baselines and bound add what the hours before the cut-off cost', async () => {
    const s = depot();
    const v1 = (await planScenario(s, options)) as Plan;
    const cut = Date.parse('2026-01-14T23:00:00-06:00');
    const running = v1.sessions.find((x) => Date.parse(x.start) < cut && Date.parse(x.end) > cut)!;
    // A bus that charged before 23:00 in version 1 reported late: that charging never happened.
    const late = v1.sessions.find((x) => x.bus !== running.bus && Date.parse(x.start) < cut - SLOT_MS)!;
    expect(running && late, 'a session over 23:00 and another bus charging before it').toBeTruthy();
    const next = await replan(
      s,
      {
        now: '2026-01-14T23:00',
        previous: v1,
        outOfService: [running.charger],
        lateArrivals: { [late.bus]: '2026-01-14T23:30' },
      },
      options,
    );
    const whole = mergeReplan(v1 as PlanResult, next, s);
    const own = whole.replan!.own!;
    expect(own.cost).toEqual(next.cost);

    // Before the cut-off the load is the other load and what the kept sessions drew (not the late bus's).
    const kept = chargingAt(whole.sessions);
    const other = s.site.otherLoadKw;
    for (const slot of whole.slots.filter((x) => Date.parse(x.start) < cut))
      expect(slot.loadKw).toBeCloseTo(other + (kept.get(Date.parse(slot.start)) ?? 0), 5);
    expect(whole.sessions.some((x) => x.bus === late.bus && Date.parse(x.start) < cut)).toBe(false);

    // Energy: every session of the night at its slot's price.
    expect(whole.cost.energy).toBeCloseTo(energyOf(whole), 4);
    expect(whole.cost.energy).toBeGreaterThan(next.cost.energy + 1);
    // Demand: the tariff's charges on the night's peaks above the peaks so far it began with
    // (the evening's on-peak hours are all before the cut-off: the re-plan alone has none of them).
    expect(whole.cost.demand).toBeCloseTo(demandOf(whole, s), 3);
    expect(whole.cost.demand).toBeGreaterThan(next.cost.demand);
    const added = whole.cost.total - next.cost.total;
    expect(whole.cost.total - whole.cost.energy - whole.cost.demand).toBeCloseTo(
      next.cost.total - next.cost.energy - next.cost.demand,
      6,
    );
    // The bound moves by the same amount, so the gap in dollars is the engine's.
    expect(whole.lowerBound - next.lowerBound).toBeCloseTo(added, 5);
    expect(whole.cost.total - whole.lowerBound).toBeCloseTo(next.cost.total - next.lowerBound, 5);
    expect(whole.gap).toBeCloseTo((whole.cost.total - whole.lowerBound) / whole.cost.total, 6);

    // Each baseline is the whole night without a plan, with the same events: its charging priced
    // slot by slot, and its demand the tariff's on the other load plus that charging.
    const price = priceAt(whole);
    const planKw = chargingAt(whole.sessions);
    const keptEnergy = whole.cost.energy - next.cost.energy;
    for (const kind of ['arrival', 'timer'] as const) {
      const b = whole.baselines![kind];
      expect(b.chargingKw).toHaveLength(whole.slots.length);
      const energy = b.chargingKw.reduce(
        (a, kw, i) => a + kw * 0.25 * price.get(Date.parse(whole.slots[i]!.start))!,
        0,
      );
      expect(Math.abs(b.energy - energy)).toBeLessThan(0.01);
      const loads = whole.slots.map((x, i) => ({
        ...x,
        loadKw: x.loadKw - (planKw.get(Date.parse(x.start)) ?? 0) + b.chargingKw[i]!,
      }));
      expect(Math.abs(b.demand - demandOf({ ...whole, slots: loads }, s))).toBeLessThan(0.05);
    }
    // Before the cut-off charge on arrival charges on arrival, in the evening's on-peak hours: not
    // the plan as it was drawn there (joined so, the night saved only what the re-plan saved).
    const arrival = whole.baselines!.arrival;
    const arrivalBefore = whole.slots.reduce(
      (a, x, i) => a + (Date.parse(x.start) < cut ? arrival.chargingKw[i]! * 0.25 * x.price : 0),
      0,
    );
    expect(arrivalBefore).toBeGreaterThan(keptEnergy + 1);
    // The reference stays the one the night was following (a fault after the fact does not swap
    // the comparison): here the timer, which without the charger leaves energy undelivered, counted
    // at the night's average price in its total.
    const timer = whole.baselines!.timer;
    expect(v1.baseline.kind).toBe('timer');
    expect(timer.shortfallKwh).toBeGreaterThan(1);
    expect(arrival.shortfallKwh).toBeLessThan(0.05);
    expect(timer.shortfallCost).toBeGreaterThan(0);
    expect(timer.total).toBeCloseTo(timer.energy + timer.demand + timer.shortfallCost!, 5);
    expect(whole.baseline).toEqual({ ...timer, chargingKw: undefined, kind: 'timer' });
    expect(whole.baseline.total).toBeGreaterThan(whole.cost.total);
  });

  it("a re-plan from the night's first slot is the engine's plan as it stands", async () => {
    const s = depot();
    const v1 = (await planScenario(s, options)) as Plan;
    const next = await replan(s, { now: s.start, previous: v1 }, options);
    const whole = mergeReplan(v1 as PlanResult, next, s);
    expect(whole.cost).toEqual(next.cost);
    expect(whole.lowerBound).toBe(next.lowerBound);
    expect(whole.baselines!.arrival.chargingKw).toEqual(next.baselines.arrival.chargingKw);
    expect(whole.cost.energy).toBeCloseTo(energyOf(whole), 4);
    expect(whole.cost.demand).toBeCloseTo(demandOf(whole, s), 3);
  });

  it('a re-plan under a service limit lowered since shows that limit from the cut-off on, the old one before', async () => {
    const s = depot();
    const v1 = (await planScenario(s, options)) as Plan;
    const lowered = structuredClone(s);
    lowered.site.limitKw = Math.round(s.site.limitKw * 0.6);
    const cut = Date.parse('2026-01-14T23:00:00-06:00');
    const next = await replan(lowered, { now: '2026-01-14T23:00', previous: v1 }, options);
    const whole = mergeReplan(v1 as PlanResult, next, lowered);
    const limits = (after: boolean) =>
      new Set(whole.slots.filter((x) => Date.parse(x.start) >= cut === after).map((x) => x.limitKw));
    expect(limits(false)).toEqual(new Set([s.site.limitKw]));
    expect(limits(true)).toEqual(new Set([lowered.site.limitKw]));
    // And every figure after the cut-off is the re-plan's own slot.
    for (const slot of next.slots) expect(whole.slots.find((x) => x.start === slot.start)).toEqual(slot);
  });

  it("a bus the yard plugged in early keeps the plug-in as the plan followed had it: the crew's, not a driver's", async () => {
    const parsed = parseScenario({ ...generateDepot({ buses: 12, seed: 3 }), yard: testYard() });
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
    const s = parsed.scenario;
    const v1 = (await planScenario(s, options)) as Plan;
    // A crew plug-in at a slot boundary, confirmed 5 minutes before its time.
    const plugIn = v1.sessions.find(
      (x) => x.startMove === 'crew' && Date.parse(x.start) > Date.parse('2026-01-14T19:00:00-06:00'),
    )!;
    expect(plugIn, 'a crew plug-in in the evening').toBeDefined();
    const now = new Date(Date.parse(plugIn.start) - 300_000 - 6 * 3_600_000).toISOString().slice(0, 16);
    const next = await replan(s, { now, previous: v1, plugged: { [plugIn.bus]: plugIn.charger } }, options);
    const on = (sessions: PlanResult['sessions']) =>
      sessions.find((x) => x.bus === plugIn.bus && Date.parse(x.start) === Date.parse(plugIn.start))!;
    // The engine has no move for it (it is on its charger already) and marks it nobody's.
    expect(on(next.sessions).startMove).toBe('driver');
    const whole = mergeReplan(v1 as PlanResult, next, s);
    expect(on(whole.sessions)).toMatchObject({ charger: plugIn.charger, startMove: 'crew' });
  });
});
