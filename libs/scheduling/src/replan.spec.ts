import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { planScenario, type Plan } from './plan.js';
import { replan, ReplanStateError, type Replan, type ReplanState } from './replan.js';
import { parseScenario, type Scenario } from './scenario.js';
import { parsedScenario, testYard } from './testing/crew-yard.js';
import { generateDepot } from './testing/generate-depot.js';
import { checkPlan } from './testing/plan-checker.js';

// Re-planning at a cut-off: frozen slots before it, the depot's state folded into a scenario
// that starts there, and the plan of that scenario checked by the independent checker.

const options = { timeBudgetMs: 5000, maxMoves: 30 };
const at = (local: string) => Date.parse(`${local}:00-06:00`); // January in America/Chicago

function depot(buses = 12, seed = 3): Scenario {
  const parsed = parseScenario(generateDepot({ buses, seed }));
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return parsed.scenario;
}

async function planOf(s: Scenario): Promise<Plan> {
  const p = await planScenario(s, options);
  expect(checkPlan(s, p)).toEqual([]);
  return p;
}

async function replanOf(s: Scenario, state: ReplanState): Promise<Replan> {
  const r = await replan(s, state, options);
  expect(checkPlan(r.replan.scenario, r)).toEqual([]);
  return r;
}

describe('replan', () => {
  it('after a charger is reported out of service at 23:00, no session uses it and what it delivered stays counted', async () => {
    const s = depot();
    const before = await planOf(s);
    const cut = at('2026-01-14T23:00');
    const running = before.sessions.find((x) => Date.parse(x.start) < cut && Date.parse(x.end) > cut);
    expect(running, 'a session runs over 23:00').toBeDefined();
    const { bus, charger } = running!;

    const r = await replanOf(s, { now: '2026-01-14T23:00', previous: before, outOfService: [charger] });
    expect(r.slots[0]!.start).toBe('2026-01-14T23:00:00.000-06:00');
    expect(r.sessions.every((x) => x.charger !== charger)).toBe(true);
    expect(r.sessions.every((x) => Date.parse(x.start) >= cut)).toBe(true);

    // Energy delivered before 23:00 (on the failed charger and elsewhere) is the bus's energy now.
    const b = s.buses.find((x) => x.id === bus)!;
    const deliveredKwh = before.sessions
      .filter((x) => x.bus === bus)
      .reduce(
        (a, x) => a + x.kw.reduce((k, v, i) => k + (Date.parse(x.start) + i * 900_000 < cut ? v * 0.25 : 0), 0),
        0,
      );
    expect(deliveredKwh).toBeGreaterThan(0);
    const now = r.replan.scenario.buses.find((x) => x.id === bus)!;
    expect(now.arrivalKwh).toBeCloseTo(b.arrivalKwh + s.efficiency * deliveredKwh, 4);
    expect(now.stays[0]!.arrive).toBe('2026-01-14T23:00');
    // The frozen part is kept, cut at 23:00, and the bus is still served on another charger.
    const kept = r.replan.kept.find((x) => x.bus === bus && x.charger === charger)!;
    expect(Date.parse(kept.end)).toBe(cut);
    expect(r.buses.find((x) => x.id === bus)!.shortfallKwh).toBe(0);
    expect(r.status).not.toBe('short');
    // What the frozen slots drew is a peak so far: the re-plan pays only for new peaks.
    const frozenPeak = Math.max(...before.slots.filter((x) => Date.parse(x.start) < cut).map((x) => x.loadKw));
    expect(r.replan.scenario.tariff.peaksSoFarKw['facility']).toBeGreaterThanOrEqual(frozenPeak - 1e-6);
    expect(r.cost.total).toBeGreaterThanOrEqual(r.lowerBound - 1e-6);
  });

  it("a session cut at the cut-off ends with the crew's unplug there, not the driver's at pull-out", async () => {
    const s = parsedScenario({ ...generateDepot({ buses: 12, seed: 3 }), yard: testYard() });
    const before = await planOf(s);
    const cut = at('2026-01-14T22:00');
    // A bus its driver was to unplug on pulling out, on a charger reported out at 22:00.
    const running = before.sessions.find(
      (x) => Date.parse(x.start) < cut && Date.parse(x.end) > cut && x.endMove === 'driver',
    );
    expect(running, 'a session running over 22:00 to its pull-out').toBeDefined();
    const r = await replanOf(s, { now: '2026-01-14T22:00', previous: before, outOfService: [running!.charger] });
    const kept = r.replan.kept.find((x) => x.bus === running!.bus && x.charger === running!.charger)!;
    expect(Date.parse(kept.end)).toBe(cut);
    expect(kept.endMove).toBe('crew');
  });

  it('a charger reported out inside a slot: the bus planned on it to the end of that slot is unplugged now, and counted as moved', async () => {
    const s = depot();
    const before = await planOf(s);
    // A session of at least 30 min reported out 10 min before it ends: from the cut-off (its end)
    // its plan is unchanged, but the yard unplugs it now.
    const ending = before.sessions.find((x) => Date.parse(x.end) - Date.parse(x.start) >= 1_800_000)!;
    const reportMs = Date.parse(ending.end) - 600_000;
    const now = new Date(reportMs - 6 * 3_600_000).toISOString().slice(0, 16); // America/Chicago, January
    const r = await replanOf(s, { now, previous: before, outOfService: [ending.charger] });
    expect(r.slots[0]!.start).toBe(ending.end);
    expect(r.replan.moved.buses).toContain(ending.bus);
    const on = new Set(
      before.sessions.filter((x) => x.charger === ending.charger && Date.parse(x.end) > reportMs).map((x) => x.bus),
    );
    expect(r.replan.moved.reasons[0]).toBe(
      `charger ${ending.charger} out of service: ${on.size} ${on.size === 1 ? 'bus was' : 'buses were'} planned on it`,
    );
    for (const b of on) expect(r.replan.moved.buses).toContain(b);
  });

  it("moves a late bus's sessions after its new arrival time", async () => {
    const s = depot();
    const before = await planOf(s);
    const late = s.buses[0]!;
    expect(before.sessions.some((x) => x.bus === late.id)).toBe(true);
    const r = await replanOf(s, {
      now: '2026-01-14T19:00',
      previous: before,
      lateArrivals: { [late.id]: '2026-01-14T22:30' },
    });
    const mine = r.sessions.filter((x) => x.bus === late.id);
    expect(mine.length).toBeGreaterThan(0);
    for (const x of mine) expect(Date.parse(x.start)).toBeGreaterThanOrEqual(at('2026-01-14T22:30'));
    expect(r.replan.scenario.buses[0]!.stays[0]!.arrive).toBe('2026-01-14T22:30');
    // It charged nothing before 19:00 in the frozen part (it was not there).
    expect(r.replan.kept.some((x) => x.bus === late.id)).toBe(false);
    expect(r.replan.scenario.buses[0]!.arrivalKwh).toBe(late.arrivalKwh);
  });

  it('keeps a bus on the charger it is plugged into, and takes reported energies as they are', async () => {
    const s = depot();
    const bus = s.buses.find((b) => Date.parse(`${b.stays[0]!.arrive}:00-06:00`) <= at('2026-01-14T21:00'))!;
    const charger = s.chargers[s.chargers.length - 1]!.id;
    const r = await replanOf(s, {
      now: '2026-01-14T21:00',
      plugged: { [bus.id]: charger },
      energyKwh: { [bus.id]: bus.arrivalKwh + 5 },
    });
    expect(r.replan.scenario.buses.find((b) => b.id === bus.id)!.arrivalKwh).toBe(bus.arrivalKwh + 5);
    const first = r.sessions
      .filter((x) => x.bus === bus.id)
      .sort((x, y) => Date.parse(x.start) - Date.parse(y.start))[0]!;
    expect(first.charger).toBe(charger);
    // Nobody else is on that charger before the plugged bus leaves it.
    const others = r.sessions.filter((x) => x.charger === charger && x.bus !== bus.id);
    for (const x of others) expect(Date.parse(x.start)).toBeGreaterThanOrEqual(Date.parse(first.end));
  });

  it("a bus read below the energy the plan expected needs as much more in the night's baselines as in the plan", async () => {
    const s = depot();
    const before = await planOf(s);
    const base = await replanOf(s, { now: '2026-01-14T23:00', previous: before });
    // A bus at the depot at 23:00 that the plan charges after it, with room to need 10 kWh more.
    const bus = base.replan.scenario.buses.find((b) => b.arrivalKwh > 15 && base.sessions.some((x) => x.bus === b.id))!;
    expect(bus, 'a bus at the depot charged after 23:00').toBeDefined();
    const read = await replanOf(s, {
      now: '2026-01-14T23:00',
      previous: before,
      energyKwh: { [bus.id]: bus.arrivalKwh - 10 },
    });
    const departures = (r: Replan) => r.buses.find((b) => b.id === bus.id)!.departures.map((d) => d.kwh);
    expect(departures(read)).toEqual(departures(base));
    // The plan delivers the 10 kWh (as grid kWh, through the charger's efficiency) ...
    const grid = (kw: number[]) => kw.reduce((a, v) => a + v * 0.25, 0);
    const planned = (r: Replan) => r.sessions.reduce((a, x) => a + grid(x.kw), 0);
    const more = planned(read) - planned(base);
    expect(more).toBeCloseTo(10 / s.efficiency, 3);
    // ... and so does charging on arrival over the whole night, which keeps up (before, it did not
    // know the reading: it delivered the same as without one and looked 10 kWh cheaper).
    const arrival = (r: Replan) => r.replan.night!.arrival;
    expect(arrival(read).shortfallKwh).toBeLessThan(0.05);
    expect(grid(arrival(read).chargingKw) - grid(arrival(base).chargingKw)).toBeCloseTo(more, 3);
  });

  it('takes a bus the yard finds plugged in before its planned pull-in as back early: its stay starts now', async () => {
    const s = depot();
    const now = '2026-01-14T15:30';
    // A bus still out on its runs at 15:30 by the scenario, reported on a charger then.
    const bus = s.buses.find((b) => b.stays.some((st) => at(st.arrive) > at(now) && at(st.depart) > at(st.arrive)))!;
    const charger = s.chargers[0]!.id;
    const r = await replanOf(s, { now, plugged: { [bus.id]: charger }, outOfService: [s.chargers[1]!.id] });
    expect(r.replan.scenario.buses.find((b) => b.id === bus.id)!.stays[0]!.arrive).toBe(now);
    expect(r.replan.plugged).toEqual({ [bus.id]: charger });
    const first = r.sessions
      .filter((x) => x.bus === bus.id)
      .sort((x, y) => Date.parse(x.start) - Date.parse(y.start))[0]!;
    expect(first.charger).toBe(charger);
    expect(Date.parse(first.start)).toBe(at(now));
  });

  it('is reproducible and plans the same depot the same way from the start', async () => {
    const s = depot(8, 5);
    const a = await replan(s, { now: s.start }, options);
    const b = await planScenario(s, options);
    expect(a.sessions).toEqual(b.sessions);
    expect(a.cost).toEqual(b.cost);
  });

  it('a fault before the first pull-in: the plan being carried out is kept only within the tolerance of as good a plan as a fresh one, and the reason says what keeping it costs', async () => {
    // The demo depot's night as the API writes it (testing/demo-night.json: invented demo data,
    // the evening and early-morning crews, a $5 tolerance), two chargers out two minutes in,
    // nothing plugged in yet. Before, such a re-plan left out the crew's-night path, so its
    // cheapest plan was dearer than a fresh one and a kept plan $77 dearer read as "$0 extra".
    const s = parsedScenario(JSON.parse(readFileSync(new URL('./testing/demo-night.json', import.meta.url), 'utf8')));
    const before = await planScenario(s);
    const state = { now: '2026-12-03T15:47', outOfService: ['C1', 'C8'] };
    const r = await replan(s, { ...state, previous: before });
    expect(checkPlan(r.replan.scenario, r)).toEqual([]);
    const fresh = await replan(s, state);
    const allowed = Math.max(0.005 * fresh.cost.total, 5);
    expect(r.cost.total).toBeLessThanOrEqual(fresh.cost.total + allowed + 1e-6);
    if (r.keptPrevious) {
      expect(r.keptPrevious.extraCost).toBeLessThanOrEqual(allowed + 0.005);
    } else {
      // Refused for leaving buses short that a new plan serves (full service first), else for its
      // cost beyond the tolerance; the reason says which. Which one depends on the plan kept the
      // search finds: on a loaded machine its time net can stop it at another.
      const { extraCost, extraShortKwh } = r.previousRefused!;
      expect(r.previousRefused!.allowed).toBeCloseTo(allowed, 2);
      const reason = r.replan.moved.reasons.at(-1);
      if (extraShortKwh >= 0.05)
        expect(reason).toMatch(
          /^the plan being carried out could not be kept: keeping it would leave buses [\d.]+ kWh short that a new plan delivers(, and cost \$[\d,]+\.\d\d more, where \$5\.00 is allowed)?: the rest of the night was planned afresh \(\d+ other bus(es)? moved\)$/,
        );
      else {
        expect(extraCost).toBeGreaterThan(allowed);
        expect(reason).toMatch(
          /^the plan being carried out could not be kept within the depot's cost tolerance \(keeping it: \$[\d,]+\.\d\d more, where \$5\.00 is allowed\): the rest of the night was planned afresh \(\d+ other bus(es)? moved\)$/,
        );
      }
    }
  });

  it('rejects a state that does not fit the scenario, with field paths', async () => {
    const s = depot();
    const problemsOf = async (state: ReplanState) => {
      try {
        await replan(s, state, options);
      } catch (e) {
        expect(e).toBeInstanceOf(ReplanStateError);
        return (e as ReplanStateError).problems.map((p) => p.path);
      }
      return [];
    };
    expect(await problemsOf({ now: '2026-01-16T01:00' })).toEqual(['state.now']);
    expect(await problemsOf({ now: '2026-01-14T23:00', outOfService: ['C999'], energyKwh: { B999: 10 } })).toEqual([
      'state.energyKwh.B999',
      'state.outOfService[0]',
    ]);
    expect(await problemsOf({ now: '2026-01-14T23:00', lateArrivals: { B001: '2026-01-15T11:00' } })).toEqual([
      'state.lateArrivals.B001',
    ]);
    const [c1, c2] = s.chargers;
    expect(
      await problemsOf({
        now: '2026-01-14T23:00',
        outOfService: [c1!.id],
        plugged: { B001: c1!.id, B002: c2!.id, B003: c2!.id },
      }),
    ).toEqual(['state.plugged.B001', 'state.plugged.B003']);
  });
});

describe('replan: full service first', () => {
  it('a re-plan that leaves a bus short the relaxation serves searches again until it serves it', async () => {
    // The demo depot (invented) at 22:40 with charger C2 reported out; crew gap 23:30-04:30. One
    // start with the default moves left bus 214 3.4 kWh short (45 min on a 60 kW charger before its
    // 06:41 pull-out) where a plan serving every bus exists: 214 on C1 from 04:30.
    const { scenario, state } = JSON.parse(
      readFileSync(new URL('./testing/replan-charger-out.json', import.meta.url), 'utf8'),
    ) as { scenario: Scenario; state: ReplanState };
    const r = await replan(scenario, state);
    expect(checkPlan(r.replan.scenario, r)).toEqual([]);
    expect(r.stats.unavoidableShortfallKwh).toBe(0);
    expect(r.buses.filter((b) => b.shortfallKwh > 1e-3)).toEqual([]);
    // The first start's shortfall is what the other starts were for: recorded, penalised.
    expect(r.stats.starts!.length).toBeGreaterThan(1);
    expect(r.stats.starts![0]).toBeGreaterThan(r.stats.starts!.at(-1)! + 1000);
    // Said as the plan being carried out not kept, for the kWh it would have left short.
    expect(r.replan.moved.reasons.join(' ')).toMatch(
      /could not be kept: keeping it would leave buses [\d.]+ kWh short that a new plan delivers/,
    );
  });
});
