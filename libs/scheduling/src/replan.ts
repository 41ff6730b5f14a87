import { DateTime } from 'luxon';
import { loadSolver, type Solver } from './highs-solver.js';
import { defaultMoves, planProblem, type Plan, type PlanOptions, type PlanSession } from './plan.js';
import { cheapestFound, inScenarioOrder, reorderedScenario } from './restarts.js';
import { changedBuses, notKeptWhy, previousWindows } from './previous.js';
import { nightBaselines, type NightBaseline } from './night-baselines.js';
import { prepareProblem, type Problem } from './problem.js';
import {
  formatPath,
  localToMillis,
  parseScenario,
  type Problem as ScenarioProblem,
  type Scenario,
} from './scenario.js';
import { buildSlots } from './slots.js';

// Re-planning during the night. At a cut-off instant `now` the depot reports what has happened:
// each bus's battery energy, which buses are on which charger, chargers out of service, buses
// running late. Slots before `now` are frozen (nothing is decided there); the engine plans the
// rest as a scenario of its own that starts at `now` (a valid version 1 file, returned with the
// plan so it can be exported or checked), with:
// - each bus's energy at `now` as its arrival energy (stays that ended before `now` dropped,
//   the stay in progress starting at `now`, a late bus's stay starting at its new time);
// - the billing period's peaks so far raised to what the frozen slots already drew (other load
//   plus the previous plan's charging there), so only new peaks cost;
// - chargers out of service unavailable for the whole re-plan, and buses already plugged in
//   kept on their charger from `now` on (until the plan unplugs them).

/** What the depot reports at the cut-off. Bus and charger ids are the scenario's. */
export interface ReplanState {
  /**
   * Cut-off: local wall-clock time `YYYY-MM-DDTHH:mm` in the scenario's zone. A time inside a
   * slot freezes that slot too (the re-plan starts at the next slot boundary).
   */
  now: string;
  /**
   * Battery energy (kWh) per bus at the cut-off (for a bus away from the depot: at its next
   * arrival). A bus not listed: the energy the previous plan gives it at the cut-off, or without
   * one, the scenario's arrival energy less the runs already driven (nothing charged).
   */
  energyKwh?: Record<string, number>;
  /**
   * Buses on a charger at the cut-off (bus id to charger id): they keep it from the cut-off. One
   * that the scenario still has out on a run is taken as back early (its stay starts at the cut-off).
   */
  plugged?: Record<string, string>;
  /** Chargers out of service from the cut-off on. */
  outOfService?: string[];
  /** Buses running late: bus id to the new local arrival time of the stay they are coming to. */
  lateArrivals?: Record<string, string>;
  /**
   * The plan being carried out. Its sessions before the cut-off count as delivered (energy and
   * demand) unless a bus's own figure says otherwise; a late bus's sessions there are dropped.
   */
  previous?: Plan;
}

/** A re-plan: the plan from the cut-off on, what it was made from, what was kept before it. */
export interface Replan extends Plan {
  replan: {
    /** First slot of the re-plan (ISO with offset). */
    from: string;
    /** The scenario from the cut-off on, with the reported state folded in. */
    scenario: Scenario;
    /** Chargers unavailable in the re-plan. */
    outOfService: string[];
    /** Buses kept on the charger they were on (bus id to charger id). */
    plugged: Record<string, string>;
    /** The previous plan's sessions before the cut-off, cut there (late buses left out). */
    kept: PlanSession[];
    /**
     * Buses whose charging from the cut-off on differs from the plan being carried out (another
     * charger or other times), and why, in words ("charger C3 out of service: 4 buses on it").
     */
    moved: { buses: string[]; reasons: string[] };
    /** With a plan being carried out: the whole night's baselines, with the same events (night-baselines.ts). */
    night?: Record<'arrival' | 'timer', NightBaseline>;
  };
}

export class ReplanStateError extends Error {
  constructor(readonly problems: ScenarioProblem[]) {
    super(`re-plan state rejected: ${problems.map((p) => `${p.path}: ${p.message}`).join('; ')}`);
  }
}

const round = (v: number, digits = 6) => Math.round(v * 10 ** digits) / 10 ** digits;

/**
 * Re-plans a scenario from a cut-off instant with what the depot reports (see ReplanState).
 * Throws ReplanStateError (with field paths under `state.`) on a state that does not fit the
 * scenario.
 */
export async function replan(scenario: Scenario, state: ReplanState, options: PlanOptions = {}): Promise<Replan> {
  const solver = await loadSolver();
  const t0 = performance.now();
  const { derived, outOfService, plugged, kept, readingShiftKwh } = deriveScenario(scenario, state);
  const problemOf = (s: Scenario, keepPrevious: boolean) =>
    replanProblem(scenario, s, state, outOfService, plugged, keepPrevious);
  const problem = problemOf(derived, true);
  let plan = planProblem(problem, solver, options, t0);
  if (shortButServable(plan)) plan = servedByOtherStarts(derived, problem, plan, solver, options, t0, problemOf);
  const moved = state.previous
    ? movedBuses(problem, state.previous, plan, state, outOfService, scenario.tariff.currency)
    : { buses: [], reasons: [] };
  const night = state.previous
    ? nightBaselines(
        scenario,
        problem.slots[0]!.startMs,
        { outOfService, readingShiftKwh, ...(state.lateArrivals ? { lateArrivals: state.lateArrivals } : {}) },
        { kept, buses: state.previous.buses },
        plan,
      )
    : undefined;
  return {
    ...plan,
    replan: {
      from: problem.slots[0]!.start,
      scenario: derived,
      outOfService,
      plugged,
      kept,
      moved,
      ...(night ? { night } : {}),
    },
  };
}

/**
 * The problem of a re-plan's scenario `s` (the derived one, or it listed in another order): the
 * chargers out of service, the buses plugged in kept where they are, the buses already at the
 * depot plugged in by the crew, and with `keepPrevious` the plan being carried out to keep.
 */
function replanProblem(
  scenario: Scenario,
  s: Scenario,
  state: ReplanState,
  outOfService: readonly string[],
  plugged: Record<string, string>,
  keepPrevious: boolean,
): Problem {
  const problem = prepareProblem(s);
  const index = new Map(problem.chargers.map((c) => [c.id, c.index]));
  for (const id of outOfService) problem.chargers[index.get(id)!]!.available.fill(0);
  const pinned = new Int32Array(problem.stays.length).fill(-1);
  for (const [busId, chargerId] of Object.entries(plugged)) {
    const bus = problem.buses.find((b) => b.id === busId)!;
    pinned[bus.stays[0]!.id] = index.get(chargerId)!;
  }
  problem.pinned = pinned;
  // A bus that was at the depot before the cut-off and is not on a charger: plugging it in at
  // the cut-off is a crew move, not its driver's on pulling in.
  const arrivedEarlier = new Uint8Array(problem.stays.length);
  const cutMs = problem.slots[0]!.startMs;
  for (const bus of problem.buses) {
    const original = scenario.buses.find((b) => b.id === bus.id)!;
    const stay = bus.stays[0]!;
    const before = original.stays.some(
      (st) =>
        localToMillis(st.arrive, scenario.timezone)! < cutMs && localToMillis(st.depart, scenario.timezone)! > cutMs,
    );
    const late =
      state.lateArrivals?.[bus.id] !== undefined &&
      localToMillis(state.lateArrivals[bus.id]!, scenario.timezone)! >= cutMs;
    if (before && !late && stay.arriveMs <= cutMs) arrivedEarlier[stay.id] = 1;
  }
  problem.arrivedEarlier = arrivedEarlier;
  if (keepPrevious && state.previous) problem.previous = previousWindows(problem, state.previous);
  return problem;
}

/** Other starts a re-plan gets when it leaves buses short that the relaxation serves ... */
export const RESCUE_STARTS = 2;
/** ... after the first start again with this many times its local-search moves. */
export const RESCUE_MOVES_FACTOR = 3;

/** A plan leaving more short than the relaxation must (a tenth of a kWh and more): another start may serve it. */
function shortButServable(plan: Plan): boolean {
  return plan.stats.shortfallKwh > plan.stats.unavoidableShortfallKwh + 0.1;
}

/**
 * Full service first, in a re-plan too. A re-plan gets one start (the yard waits for it), but
 * one that leaves buses short where the relaxation serves them is planned again from the same
 * night listed in other orders, fresh, and the plan serving the most wins (then the cheaper):
 * a start's path decides such a night. Seen on the demo depot, a charger reported out at 22:40
 * left bus 214 3.4 kWh short, and the same report 0.2 s later served every bus for $10 more.
 * Said as the plan being carried out not kept, with the kWh it would leave short.
 */
function servedByOtherStarts(
  derived: Scenario,
  problem: Problem,
  first: Plan,
  solver: Solver,
  options: PlanOptions,
  t0: number,
  problemOf: (s: Scenario, keepPrevious: boolean) => Problem,
): Plan {
  const penalised = (p: Plan) => cheapestFound(p, problem.shortfallPenalty);
  let best = first;
  const found = [penalised(first)];
  let timed = first.stats.stoppedBy === 'time';
  // First the same start with a longer search (the local search's moves are what serve such a
  // bus: 120 left it short, 300 served it), then fresh starts from the night in other orders.
  const starts: (() => Plan)[] = [
    () =>
      planProblem(problemOf(derived, true), solver, {
        ...options,
        maxMoves: (options.maxMoves ?? defaultMoves(problem)) * RESCUE_MOVES_FACTOR,
      }),
    ...Array.from(
      { length: RESCUE_STARTS },
      (_, k) => () => planProblem(problemOf(reorderedScenario(derived, k + 1), false), solver, options),
    ),
  ];
  for (const start of starts) {
    if (!shortButServable(best)) break;
    const other = start();
    found.push(penalised(other));
    timed ||= other.stats.stoppedBy === 'time';
    if (found.at(-1)! < penalised(best) - 1e-6) best = other;
  }
  if (best === first) return { ...first, stats: { ...first.stats, starts: found.map((f) => round(f, 2)) } };
  const served = first.stats.shortfallKwh - best.stats.shortfallKwh;
  const money = (p: Plan) => p.cost.total - (p.crewTrade?.extraCost ?? 0);
  const refused = first.previousRefused;
  const keptToo = first.keptPrevious !== null || refused !== null;
  return {
    ...inScenarioOrder(best, derived),
    solveMs: round(performance.now() - t0, 1),
    keptPrevious: null,
    previousRefused: keptToo
      ? {
          extraCost: round(Math.max(0, (refused?.extraCost ?? 0) + money(first) - money(best)), 2),
          extraShortKwh: round((refused?.extraShortKwh ?? 0) + served, 2),
          allowed: refused?.allowed ?? 0,
        }
      : null,
    stats: { ...best.stats, starts: found.map((f) => round(f, 2)), stoppedBy: timed ? 'time' : best.stats.stoppedBy },
  };
}

/** The scenario from the cut-off on (exported for tests and for exporting a re-plan's input). */
export function deriveScenario(scenario: Scenario, state: ReplanState) {
  const problems: ScenarioProblem[] = [];
  const add = (path: (string | number)[], message: string) =>
    problems.push({ path: formatPath(['state', ...path]), message });
  const zone = scenario.timezone;
  const slotMs = scenario.slotMinutes * 60_000;
  const slots = buildSlots(scenario);
  const startMs = slots[0]!.startMs;
  const endMs = slots[slots.length - 1]!.endMs;
  const local = (ms: number) => DateTime.fromMillis(ms, { zone }).toFormat("yyyy-MM-dd'T'HH:mm");
  const fail = () => new ReplanStateError(problems);

  const nowMs = localToMillis(state.now, zone);
  if (nowMs === null) {
    add(['now'], `${state.now} is not a local time YYYY-MM-DDTHH:mm that exists in ${zone}`);
    throw fail();
  }
  if (nowMs < startMs || nowMs >= endMs) {
    add(['now'], `must be inside the horizon (${scenario.start} to ${scenario.end}, end excluded)`);
    throw fail();
  }
  const cut = Math.ceil((nowMs - startMs) / slotMs);
  if (cut >= slots.length) {
    add(['now'], 'leaves no whole slot to plan before the end');
    throw fail();
  }
  const cutMs = startMs + cut * slotMs;
  const cutText = local(cutMs);
  if (localToMillis(cutText, zone) !== cutMs) {
    add(['now'], 'falls in the second run of a repeated hour (clock change): the format cannot name that start');
    throw fail();
  }

  const busIds = new Set(scenario.buses.map((b) => b.id));
  const chargerIds = new Set(scenario.chargers.map((c) => c.id));
  for (const id of Object.keys(state.energyKwh ?? {}))
    if (!busIds.has(id)) add(['energyKwh', id], 'is not a bus of the scenario');
  for (const id of Object.keys(state.lateArrivals ?? {}))
    if (!busIds.has(id)) add(['lateArrivals', id], 'is not a bus of the scenario');
  const outOfService = [...new Set(state.outOfService ?? [])];
  (state.outOfService ?? []).forEach((id, i) => {
    if (!chargerIds.has(id)) add(['outOfService', i], `${id} is not a charger of the scenario`);
  });
  for (const [id, kwh] of Object.entries(state.energyKwh ?? {}))
    if (!(Number.isFinite(kwh) && kwh >= 0)) add(['energyKwh', id], 'must be a number of kWh, 0 or more');

  // What the previous plan delivered before the cut (grid kW per bus per slot). A late bus was
  // not at the depot for the stay it is late for: its sessions from that stay's planned arrival
  // did not happen.
  const late = new Set(Object.keys(state.lateArrivals ?? {}));
  const lateFrom = new Map<string, number>();
  for (const b of scenario.buses) {
    if (!late.has(b.id)) continue;
    const st = b.stays.find((x) => localToMillis(x.depart, zone)! > cutMs);
    if (st) lateFrom.set(b.id, localToMillis(st.arrive, zone)!);
  }
  const before = new Map<string, Float64Array>();
  const kept: PlanSession[] = [];
  if (state.previous) {
    for (const s of state.previous.sessions) {
      if (!busIds.has(s.bus)) continue;
      if (lateFrom.has(s.bus) && Date.parse(s.end) > lateFrom.get(s.bus)!) continue;
      const first = Math.round((Date.parse(s.start) - startMs) / slotMs);
      if (first >= cut) continue;
      const row = before.get(s.bus) ?? new Float64Array(slots.length);
      before.set(s.bus, row);
      const kw = s.kw.slice(0, cut - first);
      kw.forEach((v, i) => (row[first + i] = row[first + i]! + v));
      const endMs = startMs + (first + kw.length) * slotMs;
      kept.push({
        ...s,
        // Cut at the cut-off: unless the re-plan keeps the bus on (the sessions then join), it is
        // unplugged there, by the crew, not at its pull-out by the driver.
        ...(endMs < Date.parse(s.end) && s.endMove ? { endMove: 'crew' as const } : {}),
        end: DateTime.fromMillis(endMs, { zone }).toISO()!,
        kw,
        kwh: round(kw.reduce((a, v) => a + (v * slotMs) / 3_600_000, 0)),
      });
    }
  }

  const derived: Scenario = structuredClone(scenario);
  derived.start = cutText;
  const dtH = scenario.slotMinutes / 60;
  const buses: Scenario['buses'] = [];
  // A reading's difference from the energy the plan followed gives the bus at the cut-off.
  const readingShiftKwh: Record<string, number> = {};
  scenario.buses.forEach((b) => {
    const stays: Scenario['buses'][number]['stays'] = [];
    // Energy at the cut from the scenario and the previous plan's frozen charging.
    let e = b.arrivalKwh;
    let current: number | null = null;
    b.stays.forEach((st, k) => {
      const arrive = localToMillis(st.arrive, zone)!;
      const depart = localToMillis(st.depart, zone)!;
      if (depart <= cutMs) {
        const row = before.get(b.id);
        if (row)
          for (let t = 0; t < cut; t++)
            if (slots[t]!.startMs >= arrive && slots[t]!.endMs <= depart) e += scenario.efficiency * dtH * row[t]!;
        e -= st.runKwh;
        return;
      }
      if (current === null) {
        current = k;
        const row = before.get(b.id);
        if (row)
          for (let t = 0; t < cut; t++)
            if (slots[t]!.startMs >= arrive && slots[t]!.endMs <= depart) e += scenario.efficiency * dtH * row[t]!;
      }
      stays.push({ ...st, arrive: arrive < cutMs ? cutText : st.arrive });
    });
    if (stays.length === 0) {
      if (state.lateArrivals?.[b.id] !== undefined) add(['lateArrivals', b.id], 'the bus has no stay left after now');
      if (state.plugged?.[b.id] !== undefined) add(['plugged', b.id], 'the bus has left the depot for good before now');
      return;
    }
    const lateText = state.lateArrivals?.[b.id];
    if (lateText !== undefined) {
      const ms = localToMillis(lateText, zone);
      const depart = localToMillis(stays[0]!.depart, zone)!;
      if (ms === null)
        add(['lateArrivals', b.id], `${lateText} is not a local time YYYY-MM-DDTHH:mm that exists in ${zone}`);
      else if (ms >= depart) add(['lateArrivals', b.id], `must be before the stay's departure ${stays[0]!.depart}`);
      else stays[0] = { ...stays[0]!, arrive: ms <= cutMs ? cutText : lateText };
    }
    const given = state.energyKwh?.[b.id];
    const energy = Math.min(b.usableKwh, Math.max(0, given ?? e));
    if (given !== undefined && Math.abs(energy - e) > 1e-9) readingShiftKwh[b.id] = energy - e;
    buses.push({ ...b, arrivalKwh: round(energy), stays });
  });

  const plugged: Record<string, string> = {};
  const takenBy = new Map<string, string>();
  for (const [busId, chargerId] of Object.entries(state.plugged ?? {})) {
    const bus = buses.find((b) => b.id === busId);
    if (!busIds.has(busId)) add(['plugged', busId], 'is not a bus of the scenario');
    else if (!chargerIds.has(chargerId)) add(['plugged', busId], `${chargerId} is not a charger of the scenario`);
    else if (!bus) continue;
    else if (late.has(busId)) add(['plugged', busId], 'a late bus cannot be plugged in already');
    else if (takenBy.has(chargerId)) add(['plugged', busId], `${chargerId} already holds ${takenBy.get(chargerId)}`);
    else if (outOfService.includes(chargerId))
      add(['plugged', busId], `${chargerId} is out of service: the bus is taken to another charger`);
    else {
      // On a charger before its planned pull-in: the yard saw it plugged in, so it came back early
      // and its stay starts now (refusing would leave a charger fault unreported for a bus's sake).
      if (localToMillis(bus.stays[0]!.arrive, zone)! > cutMs) bus.stays[0] = { ...bus.stays[0]!, arrive: cutText };
      takenBy.set(chargerId, busId);
      plugged[busId] = chargerId;
    }
  }
  if (buses.length === 0) add(['now'], 'every bus has left the depot for good: nothing to plan');
  if (problems.length) throw fail();

  // Peaks already drawn in the frozen slots count as peaks so far.
  const peaks = { ...scenario.tariff.peaksSoFarKw };
  for (let t = 0; t < cut; t++) {
    let load = slots[t]!.otherKw;
    for (const row of before.values()) load += row[t]!;
    peaks['facility'] = Math.max(peaks['facility'] ?? 0, round(load));
    if (slots[t]!.period >= 0) {
      const name = scenario.tariff.periods[slots[t]!.period]!.name;
      peaks[name] = Math.max(peaks[name] ?? 0, round(load));
    }
  }
  derived.tariff = { ...scenario.tariff, peaksSoFarKw: peaks };
  derived.buses = buses;
  if (scenario.site.limitWindows) {
    derived.site = {
      ...scenario.site,
      limitWindows: scenario.site.limitWindows.filter((w) => localToMillis(w.to, zone)! > cutMs),
    };
  }
  const parsed = parseScenario(derived);
  if (!parsed.ok) {
    throw new ReplanStateError(
      parsed.problems.map((p) => ({ path: `(re-plan scenario) ${p.path}`, message: p.message })),
    );
  }
  return { derived: parsed.scenario, outOfService, plugged, kept, readingShiftKwh };
}

/** Buses whose sessions from the cut-off on differ from the previous plan's, and why. */
function movedBuses(
  problem: ReturnType<typeof prepareProblem>,
  previous: Plan,
  plan: Plan,
  state: ReplanState,
  outOfService: string[],
  currency: string,
) {
  const cutMs = problem.slots[0]!.startMs;
  // A charger is out from the report, not from the cut-off: a bus planned on it until the end of
  // the slot the report falls in is unplugged now, though its plan from the cut-off is unchanged
  // (the Yard, Compare and the e-mail counted it; the review did not).
  const reportMs = Math.min(cutMs, localToMillis(state.now, problem.zone) ?? cutMs);
  const onOut = outOfService.map(
    (c) =>
      [
        c,
        new Set(previous.sessions.filter((s) => s.charger === c && Date.parse(s.end) > reportMs).map((s) => s.bus)),
      ] as const,
  );
  const forced = new Set(onOut.flatMap(([, on]) => [...on]));
  const buses = [...new Set([...changedBuses(problem, previous, plan), ...forced])]
    .filter((b) => problem.buses.some((x) => x.id === b))
    .sort();
  const reasons: string[] = [];
  for (const [c, on] of onOut) {
    reasons.push(`charger ${c} out of service: ${on.size} ${on.size === 1 ? 'bus was' : 'buses were'} planned on it`);
  }
  const late = Object.keys(state.lateArrivals ?? {});
  if (late.length) reasons.push(`${late.length === 1 ? 'bus' : 'buses'} ${late.join(', ')} running late`);
  const reported = Object.keys(state.energyKwh ?? {});
  if (reported.length)
    reasons.push(`battery levels reported for ${reported.length} ${reported.length === 1 ? 'bus' : 'buses'}`);
  for (const b of late) forced.add(b);
  const others = buses.filter((b) => !forced.has(b)).length;
  if (others > 0 && plan.keptPrevious)
    reasons.push(`${others} other ${others === 1 ? 'bus' : 'buses'} moved to make room or to keep the cost down`);
  else if (others > 0)
    reasons.push(
      `${notKeptWhy('the plan being carried out', plan.previousRefused, currency)}: the rest of the night was planned afresh (${others} other ${others === 1 ? 'bus' : 'buses'} moved)`,
    );
  return { buses, reasons };
}
