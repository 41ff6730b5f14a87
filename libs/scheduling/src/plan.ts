import { cloneAssignment, initialAssignment, plugMapOf, type Assignment, type AssignmentHints } from './assignment.js';
import { limitedBaseline, type Baseline, type BaselineKind } from './baseline.js';
import { countCrewMoves, endIsFree, fitCrew, startIsFree, type Move } from './crew.js';
import { previousWindows, regeneratedMoved } from './previous.js';
import { keptAssignment, stableRepair } from './stable.js';
import { describeShortfall, explainShortfalls, soloShortfall, type ShortReason, type ShortWith } from './explain.js';
import { solveCrewBound } from './crew-bound.js';
import { crewNightCandidates, hintsFrom, polishHandovers } from './crew-night.js';
import { exactSize, solveExact } from './exact.js';
import { cheaper, loadSolver, type LpResult, type Solver } from './highs-solver.js';
import { wholeStaysOnIdle } from './whole-stays.js';
import { AssignedModel, LARGE_STAYS, localSearch, type SearchResult } from './local-search.js';
import { defaultLnsLimits, pairSearch } from './lns.js';
import { solveLowerBound } from './lower-bound.js';
import { buildChargeModel, powerFrom } from './lp-model.js';
import { prepareProblem, type Problem } from './problem.js';
import type { Scenario } from './scenario.js';
import { isoAt } from './slots.js';
import { costLoad } from './tariff.js';
import { sweepAssignment } from './sweep.js';
import { rebalanced, sharedChargerPower } from './rebalance.js';
import { repairShort, repairSolves } from './short-repair.js';
import { cheapestFound, inScenarioOrder, reorderedScenario, restartsFor } from './restarts.js';

export interface PlanCost {
  energy: number;
  demand: number;
  total: number;
}

export interface PlanSession {
  bus: string;
  charger: string;
  start: string;
  end: string;
  kwh: number;
  kw: number[];
  /** Who plugs the bus in and who unplugs it: its driver on pulling in or out, or the crew. */
  startMove: Move;
  endMove: Move;
}

export interface PlanBus {
  id: string;
  departures: { at: string; kwh: number }[];
  shortfallKwh: number;
  reason: ShortReason | null;
  /** The cause in words for the plan review (null when the bus is served), and whether it is proven. */
  cause: string | null;
  causeProven: boolean | null;
}

export interface BaselineCost extends PlanCost {
  kind: BaselineKind;
  peakKw: number;
  exceedsSiteLimit: boolean;
  /** kWh the baseline leaves undelivered against the plan's departure energy. */
  shortfallKwh: number;
  /**
   * What the undelivered kWh would cost at the plan's own average price per kWh, added to
   * `total` so a baseline that delivers less never looks cheaper for it (0 when it keeps up).
   */
  shortfallCost: number;
}

/** The plan output of the scenario format, plus `savings` and `stats`. */
export interface Plan {
  status: 'optimal' | 'feasible' | 'short';
  cost: PlanCost;
  /** The baseline savings are reported against: the cheaper of the two that deliver the plan's energy. */
  baseline: BaselineCost;
  /** Both baselines, for showing the other beside the one compared with, with their charging kW per slot. */
  baselines: Record<BaselineKind, BaselineCost & { chargingKw: number[] }>;
  lowerBound: number;
  gap: number;
  /**
   * False where the night has crew rules and the bound is the relaxation's alone, which lets any
   * bus onto any free charger at any time: a plan that keeps to the crew's hours may not reach it
   * (absent on plans that are not searched).
   */
  boundKeepsCrew?: boolean;
  solveMs: number;
  /** Per slot: the site's load, the energy price and its tariff period (as the rate plan names it), the service limit. */
  slots: { start: string; loadKw: number; price: number; period: string; limitKw: number }[];
  sessions: PlanSession[];
  /** Plug-ins and unplugs the yard crew does (the sessions' `crew` ends within the horizon). */
  crewMoves: number;
  /**
   * Spans in which a charger is out of service (the scenario's `outOfService`, or reported out
   * when a night is re-planned), to the slot: no bus is planned on it there.
   */
  outOfService: { charger: string; from: string; to: string }[];
  /**
   * Crew moves saved against the cheapest plan found, and what they cost (within the depot's
   * tolerance): "2 fewer moves for $1.80". Null: the cheapest plan is the one with fewest moves.
   */
  crewTrade: { fewerMoves: number; extraCost: number } | null;
  /**
   * Re-planning: the plan being carried out was kept wherever it could be, for this much more money
   * than the cheapest plan found, leaving `extraShortKwh` short that the cheapest would serve (only
   * shortfall that plan already had: serving it does not justify moving unaffected buses).
   */
  keptPrevious: { extraCost: number; extraShortKwh: number } | null;
  /**
   * Re-planning, when the plan being carried out could not be kept within the depot's tolerance:
   * the best plan found that keeps it, against the plan chosen (money it would cost more, kWh it
   * would leave short beyond the chosen plan's), and what the tolerance allows. Null otherwise.
   */
  previousRefused: { extraCost: number; extraShortKwh: number; allowed: number } | null;
  /** A regeneration (`PlanOptions.previous`): the buses whose charging differs from that plan's, and why. */
  moved?: { buses: string[]; reasons: string[] };
  buses: PlanBus[];
  savings: {
    energy: number;
    demand: number;
    total: number;
    /** Share of the baseline's total saved (0-1). */
    share: number;
    peakKw: number;
    baselinePeakKw: number;
    /** Share of the baseline's peak cut (0-1). */
    peakCut: number;
  };
  stats: {
    buses: number;
    chargers: number;
    slots: number;
    plugIns: number;
    lpColumns: number;
    lpRows: number;
    lowerBoundMs: number;
    localSearchMoves: number;
    localSearchAccepted: number;
    /** Stage-1 construction the plan comes from (e.g. sweep-strong-deadline). */
    construction: string;
    /** Large-neighbourhood search: pairs of chargers re-split, splits laid out, LP solves, improvements kept. */
    lns: { neighbourhoods: number; accepted: number; lpSolves: number; splits: number };
    /** The exact MILP, when it was run (a short plan on a small depot): its end, nodes, size, time. */
    exact: { status: string; nodes: number; binaries: number; ms: number } | null;
    /** The crew-aware bound (crew-bound.ts), when it was solved: nodes, binaries, time, proven optimum. */
    crewBound: { nodes: number; binaries: number; ms: number; optimal: boolean } | null;
    /**
     * Why the search ended: it reached the bound, used its move budget (both reproducible), or
     * hit the time safety net (the plan may then differ from run to run).
     */
    stoppedBy: 'bound' | 'moves' | 'time';
    /** With other starts (restarts.ts): the cheapest plan each found (penalised), the first start first. */
    starts?: number[];
    simplexIterations: number;
    /** kWh short summed over departures, in the plan and at best (lower-bound relaxation). */
    shortfallKwh: number;
    unavoidableShortfallKwh: number;
  };
}

export interface PlanOptions {
  /**
   * Safety net on wall-clock time for the whole call (ms). The search normally ends on its move
   * budget long before this, so the plan does not depend on how busy the machine is; only if the
   * net is reached does the search stop early (and the plan may then differ between runs). The
   * exact MILP on the smallest crew depots, once started, has a cap of its own
   * (`EXACT_LIMITS.unprovenMs`), so such a plan can pass the net by up to that.
   */
  timeBudgetMs?: number;
  /** Local-search moves (default `defaultMoves(problem)`, derived from the problem's size). */
  maxMoves?: number;
  /**
   * Large-neighbourhood search over whole charger sequences (see lns.ts) when the local search
   * ends above the bound; default on. Off only to measure what it adds (or, in a test, to keep
   * the plan the searches before it leave).
   */
  lns?: boolean;
  /**
   * When a plan leaves a bus short on a small depot, solve the exact assignment MILP (HiGHS, node
   * limit, a few seconds at most) to serve it or prove the shortfall necessary; on the smallest
   * depots also when the plan is above its bound (not in re-plans); default on.
   */
  exact?: boolean;
  /**
   * The crew's night with crew windows (crew-bound.ts, crew-night.ts): the crew-aware bound and
   * the candidates from its holders; default on. Off only to measure what it adds, or to build
   * a plan as the searches alone leave it (tests of re-plans from such a plan).
   */
  crewNight?: boolean;
  /**
   * The last repair of short buses also gives a short bus the part of another bus's window that
   * it does not need (short-repair.ts); default on. Off only in a test that needs a plan left
   * short where the bounds serve every bus (the bound of a short plan).
   */
  shareWindows?: boolean;
  /**
   * Other starts of a fresh plan (restarts.ts): default `restartsFor(problem)`, 2 on depots of
   * 17-120 stays with 3 or more per charger and crew windows, else 0.
   */
  restarts?: number;
  /**
   * A regeneration: the plan published for this night before. It is kept wherever it still fits
   * and the plan stays within the depot's cost tolerance of the cheapest found (stable.ts, as in a
   * re-plan), and `moved` says which buses changed and why.
   */
  previous?: Plan;
}

/** Depots up to this many stays get the large-neighbourhood search (beyond, it costs more time than it gains). */
export const LNS_MAX_STAYS = 120;

/** Above this many stays with crew windows, only the construction candidates that win there are tried. */
export const LARGE_CREW_STAYS = 150;

/**
 * The exact MILP from the plan (`solveExact`): the largest model tried when a plan is short
 * (binaries), its node limit and time cap; and, where the plan is served but above its bound, the
 * largest model tried (`unprovenBinaries`: 6-7 buses on 2 chargers with the crew, 1,800-2,300
 * binaries) and its time cap. Its root alone takes 4-9 s there (5-7 buses on 2 chargers) and
 * 10-40 s at 8-10 buses on 2-3 chargers (2,600-4,900 binaries), where 30 nodes found nothing on 8
 * of 9 depots: too long for what it finds.
 */
export const EXACT_LIMITS = { binaries: 6000, nodes: 30, ms: 3000, unprovenBinaries: 2400, unprovenMs: 20_000 };

/** Depots up to `stays` stays run the whole-sequence search a second time, every split to the LP. */
export const EVERY_SPLIT = { stays: 12, lpSolves: 400 };

/**
 * The crew-aware bound (crew-bound.ts): as a MILP on depots up to `stays` stays (its node budget
 * and time cap); as an LP up to `relaxedStays` where there are at least `relaxedPerCharger` stays
 * per charger or the searches left a bus short that the relaxation serves (elsewhere it seldom
 * raises the bound, and the time goals of large depots leave no room for it); not in re-plans.
 */
export const CREW_BOUND_LIMITS = {
  stays: 16,
  relaxedStays: 300,
  relaxedPerCharger: 3,
  nodes: 30,
  ms: 15_000,
  bothPaths: 40,
  relaxedLnsFactor: 3,
  relaxedLnsFactorOnePath: 10,
  polish: 60,
  /** The repair of short buses after the whole-sequence search: changes per short stay, LP solves (x the usual). */
  finalRepair: { relocations: 6, swaps: 4, solvesFactor: 3 },
};

const round = (v: number, digits = 6) => {
  const f = 10 ** digits;
  const r = Math.round(v * f) / f;
  return Object.is(r, -0) ? 0 : r;
};

/**
 * The safety net (ms): far above what a plan takes on an idle machine (about 0.1-0.5 s up to 200
 * buses, 1 s at 500), so that a busy machine still ends on the move budget and gives the same
 * plan; it only bounds a pathological case. Where the crew's night runs as an LP and the
 * whole-sequence search gets several times its LP solves (crew windows, 3 or more stays a
 * charger, up to LNS_MAX_STAYS), a start's LP work grows with the bus-slots: 24 buses with midday
 * layovers on 10 chargers (1,828 bus-slots) took 13.3 s a start on an idle machine and were cut
 * at 12 s, so the plan depended on the machine's load. There the net is 20 ms a bus-slot (37 s).
 */
export function defaultTimeBudgetMs(problem: Problem): number {
  const stays = problem.stays.length;
  const crewLp =
    !!problem.yard?.capacity &&
    stays > CREW_BOUND_LIMITS.stays &&
    stays <= LNS_MAX_STAYS &&
    stays >= CREW_BOUND_LIMITS.relaxedPerCharger * problem.chargers.length;
  const busSlots = problem.buses.reduce((a, b) => a + b.slots.length, 0);
  return Math.max(12_000, 12 * problem.buses.length, crewLp ? 20 * busSlots : 0);
}

/**
 * Local-search moves when the construction does not reach the bound: about as many as one
 * idle core re-solves in a few hundred milliseconds (a move re-solves an LP whose size grows with
 * the stays), and at least a dozen. Large depots (over LARGE_STAYS) get 6,000 / stays, 6 to 12
 * (12 at 500 stays, 6 at 1,000): there the short buses are served by the targeted repair
 * (short-repair.ts), not by random moves (which needed 40 at 500 buses with the crew to leave
 * 57 kWh short, where the repair serves every bus), and each move costs 50-80 ms there for a few
 * hundredths of a percent.
 */
export function defaultMoves(problem: Problem): number {
  const n = problem.stays.length;
  if (n > LARGE_STAYS) return Math.max(6, Math.min(12, Math.round(6000 / n)));
  return Math.max(12, Math.min(120, Math.round(6000 / (25 + n))));
}

/** The engine: plans a scenario (see the scenario format) and returns the plan. */
export async function planScenario(scenario: Scenario, options: PlanOptions = {}): Promise<Plan> {
  const solver = await loadSolver();
  const t0 = performance.now();
  const problem = prepareProblem(scenario);
  const restarts = options.restarts ?? restartsFor(problem);
  if (!options.previous) {
    const first = planProblem(problem, solver, options, t0);
    // A plan at its bound is optimal: no other start can do better.
    if (!restarts || first.stats.stoppedBy === 'bound') return first;
    return cheapestOfStarts(scenario, problem, first, restarts, solver, options, t0);
  }
  problem.previous = previousWindows(problem, options.previous);
  let plan = planProblem(problem, solver, options, t0);
  // A regeneration that could not keep the published plan within the tolerance is a fresh plan,
  // and gets a fresh plan's other starts: one start's cheapest swings by a few per cent with the
  // search's path on such depots, and the night should not pay for the path the first start took.
  // What keeping the published plan would have taken is then said against the plan chosen.
  const refused = plan.previousRefused;
  if (refused && restarts > 0) {
    const best = cheapestOfStarts(scenario, problem, plan, restarts, solver, options, t0);
    const money = (p: Plan) => p.cost.total - (p.crewTrade?.extraCost ?? 0);
    const extraCost = round(refused.extraCost + Math.max(0, money(plan) - money(best)), 2);
    plan = { ...best, previousRefused: { ...refused, extraCost } };
  }
  return { ...plan, moved: regeneratedMoved(problem, options.previous, plan, scenario.tariff.currency) };
}

/**
 * The cheapest of `first` and the plans of the same depot listed in `restarts` other orders
 * (restarts.ts), fresh plans all (a plan being kept is `first`'s business), in the scenario's order.
 */
function cheapestOfStarts(
  scenario: Scenario,
  problem: Problem,
  first: Plan,
  restarts: number,
  solver: Solver,
  options: PlanOptions,
  t0: number,
): Plan {
  let best = first;
  const found = [cheapestFound(first, problem.shortfallPenalty)];
  // A start cut by the safety net makes the choice depend on the machine: said as the first's would be.
  let timed = first.stats.stoppedBy === 'time';
  for (let k = 1; k <= restarts; k++) {
    const other = planProblem(prepareProblem(reorderedScenario(scenario, k)), solver, {
      ...options,
      previous: undefined,
    });
    found.push(cheapestFound(other, problem.shortfallPenalty));
    timed ||= other.stats.stoppedBy === 'time';
    if (found[k]! < Math.min(...found.slice(0, k)) - 1e-6) best = other;
    if (best.stats.stoppedBy === 'bound') break;
  }
  const stoppedBy = timed ? 'time' : best.stats.stoppedBy;
  return {
    ...inScenarioOrder(best, scenario),
    solveMs: round(performance.now() - t0, 1),
    stats: { ...best.stats, starts: found.map((f) => round(f, 2)), stoppedBy },
  };
}

/**
 * Plans a prepared problem. Re-planning (later) prepares a Problem with chargers marked
 * unavailable or arrival energies fixed, and calls this.
 */
export function planProblem(problem: Problem, solver: Solver, options: PlanOptions = {}, t0 = performance.now()): Plan {
  const budget = options.timeBudgetMs ?? defaultTimeBudgetMs(problem);
  const deadline = t0 + budget;
  const { slotCount: T, slotHours: dt } = problem;

  const lb = solveLowerBound(problem, solver);
  const hints: AssignmentHints = {
    energy: new Float64Array(problem.stays.length),
    weight: new Float64Array(T),
    power: lb.power,
    centre: new Float64Array(problem.stays.length),
    order: 'departure',
    handover: 'share',
  };
  for (const stay of problem.stays) {
    let e = 0;
    let m = 0;
    for (let t = stay.arriveSlot; t < stay.departSlot; t++) {
      e += lb.power[stay.bus]![t]! * dt;
      m += lb.power[stay.bus]![t]! * dt * (t + 0.5);
    }
    hints.energy[stay.id] = e;
    hints.centre[stay.id] = e > 1e-9 ? m / e : (stay.arriveSlot + stay.departSlot) / 2;
  }
  for (const p of lb.power) for (let t = 0; t < T; t++) hints.weight[t] = hints.weight[t]! + p[t]!;

  // Stage 1 candidates, best first: the sweep that follows the relaxation's load (see sweep.ts
  // for its variants), then the sequencing heuristic's variants. Each is solved by the LP; the search stops as soon as a candidate reaches the
  // bound. Every candidate is tried whatever the clock says (only the safety-net deadline stops
  // early), so the same scenario gives the same plan on a busy or an idle machine.
  const load = new Float64Array(T);
  for (const p of lb.power) for (let t = 0; t < T; t++) load[t] = load[t]! + p[t]!;
  // The tie-break adds at most 1e-7 of the energy cost: closer than this is optimal.
  let target = lb.penalisedObjective * (1 + 5e-7) + 1e-9;
  const candidates: [string, () => Assignment][] = [
    [
      'sweep-strong-deadline',
      () => sweepAssignment(problem, { load, energy: hints.energy, pick: 'strong', order: 'deadline' }),
    ],
    [
      'sweep-strong-deadline-reserve',
      () =>
        sweepAssignment(problem, {
          load,
          energy: hints.energy,
          pick: 'strong',
          order: 'deadline',
          reserve: { power: lb.power, above: 0.5 },
        }),
    ],
    [
      'sweep-strong-slack',
      () => sweepAssignment(problem, { load, energy: hints.energy, pick: 'strong', order: 'slack' }),
    ],
    [
      'sweep-fit-deadline',
      () => sweepAssignment(problem, { load, energy: hints.energy, pick: 'fit', order: 'deadline' }),
    ],
    ['sweep-fit-slack', () => sweepAssignment(problem, { load, energy: hints.energy, pick: 'fit', order: 'slack' })],
  ];
  // The sequencing heuristic (better where chargers are scarce) knows nothing of stays already
  // plugged in, so it is left out when re-planning with such stays.
  if (!problem.pinned?.some((c) => c >= 0)) {
    candidates.push(
      ['sequence-departure-share', () => initialAssignment(problem, hints)],
      ['sequence-best-share', () => initialAssignment(problem, { ...hints, order: 'best', handover: 'share' })],
      [
        'sequence-departure-least-cut',
        () => initialAssignment(problem, { ...hints, order: 'departure', handover: 'least-cut' }),
      ],
      ['sequence-best-least-cut', () => initialAssignment(problem, { ...hints, order: 'best', handover: 'least-cut' })],
    );
  }
  // Large depots with crew windows: each candidate costs a large LP re-solve (about a second
  // at 500 buses), and there the sequencing heuristic's plans win (measured at 200-1,000 buses);
  // only those and the first sweep are tried, the sweep only if the sequences leave a bus short
  // (below).
  let largeCrew = !!problem.yard?.capacity && problem.stays.length > LARGE_CREW_STAYS;
  if (largeCrew) {
    // Above LARGE_STAYS the sweep was never the one kept (500 and 1,000 buses): left out there.
    const keep = new Set(['sequence-departure-share', 'sequence-best-share']);
    if (problem.stays.length <= LARGE_STAYS) keep.add('sweep-strong-deadline');
    const kept = candidates.filter(([name]) => keep.has(name));
    kept.sort((x, y) => (x[0].startsWith('sequence') ? 0 : 1) - (y[0].startsWith('sequence') ? 0 : 1));
    if (kept.length) candidates.splice(0, candidates.length, ...kept);
    // Re-planning with stays already plugged in (no sequences): the candidates, rebalance and
    // search as before.
    if (!kept.some(([name]) => name.startsWith('sequence'))) largeCrew = false;
  }
  // Every candidate is made one the yard crew can carry out before the LP judges it.
  for (const cand of candidates) {
    const make = cand[1];
    cand[1] = () => fitCrew(problem, make(), hints.energy);
  }
  let start = candidates[0]![1]();
  let construction = candidates[0]![0];
  // Large depots (see LARGE_STAYS): no shared-charger LP (seconds there, where the local search
  // with the same time does more), the start's basis reused instead of re-solved.
  const large = problem.stays.length > LARGE_STAYS;
  let timedOut = false;
  const maxMoves = options.maxMoves ?? defaultMoves(problem);
  const live = new AssignedModel(problem, solver, start);
  let search;
  let chosen!: Chosen;
  let lnsStats = { neighbourhoods: 0, accepted: 0, lpSolves: 0, splits: 0 };
  let exactStats: Plan['stats']['exact'] = null;
  let exactBound = -Infinity;
  let exactProven = false;
  let crewBound = -Infinity;
  let crewServed: { objective: number; kwhValue: number } | null = null;
  let crewRelaxed = false;
  let crewShortfall = 0;
  let crewBoundStats: Plan['stats']['crewBound'] = null;
  let crewHints: AssignmentHints | null = null;
  let alternative: { search: SearchResult; construction: string } | null = null;
  const otherStarts: { search: SearchResult; construction: string }[] = [];
  const better = (x: SearchResult, y: SearchResult) => cheaper(x.result.objective, y.result.objective);
  try {
    let first = live.solve();
    if (first.status !== 'optimal')
      throw new Error(`plan LP ended ${first.status}; the model should always be solvable`);
    // The start's optimal basis: coming back to it after other candidates costs no iterations.
    let startBasis = live.basis();
    const all = problem.buses.map((b) => b.index);
    let current = start;
    // Large crew depots: the sweep and the shared-charger LP below pay only where the best start
    // so far leaves a bus short that the relaxation serves (there the sequences' plans, served,
    // were never beaten by either: 200 buses, 10 seeds); otherwise they are skipped. A start
    // that is short is first repaired bus by bus (short-repair.ts: it served every bus of 20
    // seeds at 200 buses in 1-19 LP solves, and at 500-1,000), which makes both unnecessary there.
    let rebalanceTried = false;
    const servedStart = () => largeCrew && shortfallIn(problem, live, first) <= lb.shortfallKwh + 1e-3;
    let startRepaired = false;
    const repairStart = () => {
      startRepaired = true;
      if (!largeCrew || first.objective <= target || servedStart()) return;
      live.update(start, all);
      if (startBasis) live.restoreBasis(startBasis);
      const from = live.solve();
      const repaired = repairShort(problem, hints, live, start, from, {
        deadline,
        maxSolves: repairSolves(problem.stays.length).start,
        batch: large,
        target,
      });
      current = repaired.assignment;
      if (repaired.timedOut) timedOut = true;
      if (repaired.accepted > 0) {
        start = repaired.assignment;
        first = repaired.result;
        startBasis = live.basis();
        construction += '+repair';
      }
    };
    for (let i = 1; i < candidates.length && first.objective > target; i++) {
      if (performance.now() > deadline) {
        timedOut = true;
        break;
      }
      if (!candidates[i]![0].startsWith('sequence') && !startRepaired) repairStart();
      if (!candidates[i]![0].startsWith('sequence') && servedStart()) break;
      const other = candidates[i]![1]();
      live.update(other, all);
      current = other;
      const res = live.solve();
      if (res.status === 'optimal' && cheaper(res.objective, first.objective)) {
        start = other;
        first = res;
        startBasis = live.basis();
        construction = candidates[i]![0];
      }
    }
    if (!startRepaired && !timedOut) repairStart();
    // Not at the bound: place each charger's hand-overs together (see rebalance.ts).
    if (first.objective > target && performance.now() > deadline) timedOut = true;
    else if (first.objective > target && !large && !servedStart()) {
      rebalanceTried = true;
      const power = sharedChargerPower(problem, solver, start);
      if (power) {
        const other = fitCrew(problem, rebalanced(problem, hints, start, power), hints.energy);
        live.update(other, all);
        current = other;
        const res = live.solve();
        if (res.status === 'optimal' && cheaper(res.objective, first.objective)) {
          start = other;
          first = res;
          startBasis = live.basis();
          construction += '+rebalance';
        }
      }
    }
    if (current !== start) {
      live.update(start, all);
      // Without the rebalance's solve in between, a large crew depot comes back to its start's
      // basis too (the same vertex as the start's own solve, no iterations).
      if (startBasis && (large || (largeCrew && !rebalanceTried))) live.restoreBasis(startBasis);
      first = live.solve();
    }
    // Single stays and hand-overs (local search), then whole sequences (large-neighbourhood
    // search over pairs of chargers), then single moves again from what that found. Each step
    // keeps only improvements, so the plan is never worse than the local search alone.
    search = localSearch(problem, hints, live, start, first, { deadline, maxMoves, target });
    // Buses the relaxation serves but a search left short are served by targeted changes
    // (short-repair.ts); null where there is nothing to repair.
    const repairIfShort = (
      from: SearchResult,
      withHints: AssignmentHints,
      wider?: typeof CREW_BOUND_LIMITS.finalRepair,
    ): SearchResult | null => {
      if (
        from.result.objective <= target ||
        from.timedOut ||
        shortfallIn(problem, live, from.result) <= lb.shortfallKwh + 1e-3
      )
        return null;
      const repaired = repairShort(problem, withHints, live, from.assignment, from.result, {
        deadline,
        maxSolves: repairSolves(problem.stays.length).end * (wider?.solvesFactor ?? 1),
        batch: large,
        target,
        ...(wider
          ? { relocations: wider.relocations, swaps: wider.swaps, heldSpare: options.shareWindows !== false }
          : {}),
      });
      return {
        ...from,
        assignment: repaired.assignment,
        result: repaired.result,
        iterations: from.iterations + repaired.iterations,
        timedOut: repaired.timedOut,
      };
    };
    // Beyond the whole-sequence search's reach (below), repaired here.
    if (problem.stays.length > LNS_MAX_STAYS) search = repairIfShort(search, hints) ?? search;
    // Above the relaxation's bound with crew windows: the bound that knows who holds each
    // charger while nobody is in the yard (crew-bound.ts) shows how far the plan can be from
    // the optimum. Counted nodes; a bound cut by the time cap is left unused.
    // A re-plan takes it too, so that the cheapest plan it keeps the old one against is as good as
    // a fresh plan's (the kept plan is chosen after, in preferStableAndFewerMoves); its candidates
    // keep the buses already plugged in where they are (pinStays).
    if (
      search.result.objective > target &&
      options.crewNight !== false &&
      problem.yard?.capacity &&
      (problem.stays.length <= CREW_BOUND_LIMITS.stays ||
        (problem.stays.length <= CREW_BOUND_LIMITS.relaxedStays &&
          (problem.stays.length >= CREW_BOUND_LIMITS.relaxedPerCharger * problem.chargers.length ||
            shortfallIn(problem, live, search.result) > lb.shortfallKwh + 1e-3))) &&
      performance.now() < deadline
    ) {
      const relaxed = problem.stays.length > CREW_BOUND_LIMITS.stays;
      crewRelaxed = relaxed;
      // As a MILP, one session per stay, as every plan of the engine (and the exact model) has it:
      // a bound on those plans, and its powers put each stay in the evening, on a charger through
      // the night, or in the morning. As an LP, over every plan (the one-session rows made its LP
      // weaker and its rounded holders worse: 40 buses on 10 chargers, plans 3-6 % dearer).
      const cb = solveCrewBound(problem, solver, {
        oneSession: !relaxed,
        relaxed,
        maxNodes: CREW_BOUND_LIMITS.nodes,
        timeLimitMs: Math.max(1, Math.min(CREW_BOUND_LIMITS.ms, deadline - performance.now())),
      });
      crewBoundStats = { nodes: cb.nodes, binaries: cb.binaries, ms: round(cb.ms, 1), optimal: cb.optimal };
      if (!cb.timeLimited && Number.isFinite(cb.penalisedBound)) {
        crewBound = cb.penalisedBound;
        // A plan at this bound is optimal: the searches below stop there.
        target = Math.max(target, crewBound * (1 + 2e-6) + 1e-9);
        if (cb.optimal || relaxed) crewShortfall = cb.shortfallKwh;
        // The crew-aware LP serving every bus prices a kWh short by its duals, as the relaxation's
        // do: a short plan's bound then need not fall to the relaxation's.
        if (relaxed && cb.shortfallKwh <= 1e-9 && cb.stayDual)
          crewServed = { objective: cb.penalisedBound, kwhValue: Math.max(0, ...cb.stayDual) };
      }
      // Candidates that follow its powers (crew-night.ts): each charger's evening, overnight
      // holder and morning as the bound has them; the best, searched locally, is a second start
      // for the whole-sequence search.
      if (!cb.timeLimited && cb.power) {
        // Each rounding of the LP (crew-bound.ts) gives its own candidates; the best of each,
        // searched locally, is a start, and the better start (with its hints) goes on.
        const roundings = cb.roundings?.length ? cb.roundings : [{ power: cb.power, holders: cb.holders }];
        let bestHints: AssignmentHints | null = null;
        for (const rounding of roundings) {
          const roundingHints = hintsFrom(problem, hints, rounding.power);
          let bestCand: { name: string; assignment: Assignment; res: LpResult } | null = null;
          for (const [name, cand] of crewNightCandidates(
            problem,
            roundingHints,
            rounding.holders,
            cb.stretches[0] ?? null,
          )) {
            live.update(cand, all);
            const res = live.solve();
            if (res.status === 'optimal' && (!bestCand || res.objective < bestCand.res.objective - 1e-9))
              bestCand = { name, assignment: cand, res };
          }
          if (!bestCand) continue;
          let again = localSearch(problem, roundingHints, live, bestCand.assignment, bestCand.res, {
            deadline,
            maxMoves,
            target,
          });
          // Beyond the whole-sequence search's reach, buses this start leaves short are repaired
          // as the first start's were (200 buses on 40 chargers: 79-266 kWh short to 30-38).
          if (problem.stays.length > LNS_MAX_STAYS) again = repairIfShort(again, roundingHints) ?? again;
          const start = {
            search: { ...again, iterations: search.iterations + again.iterations, moves: search.moves + again.moves },
            construction: bestCand.name,
          };
          if (!alternative || better(start.search, alternative.search)) {
            if (alternative) otherStarts.push(alternative);
            alternative = start;
            bestHints = roundingHints;
          } else otherStarts.push(start);
        }
        crewHints = bestHints ?? hintsFrom(problem, hints, cb.power);
        live.update(search.assignment, all);
        search.result = live.solve();
      }
    }
    // Whole sequences (large-neighbourhood search) from the local search's plan and, up to 40
    // stays with the crew, also from each start of the crew's night (which path ends best differs
    // from depot to depot: 40 buses on 10 chargers, the crew's best start alone 1.5-2.0 % dearer
    // on two of three seeds, the other rounding's start left out 5.3 % on the third, for 0.6-0.9 s
    // each; 100 on 20 nothing for 0.7 s); elsewhere only from the better of the two.
    const paths: { search: SearchResult; construction: string }[] = [{ search, construction }];
    if (alternative) {
      if (problem.stays.length <= CREW_BOUND_LIMITS.bothPaths) {
        paths.push(alternative, ...otherStarts);
      } else if (better(alternative.search, search)) paths[0] = alternative;
    }
    // Where the crew's night ran as an LP (up to 120 stays here), three times the whole-sequence
    // search's LP solves: 40 buses on 10 chargers 0.9 % and 5.5 % cheaper on two of three seeds
    // (gap 11.3 % to 6.2 % on one), 100 on 20 1.9 % and 3.1 % cheaper on two, the third 18.6 kWh
    // short to 0.8; 0.6-2 s more per plan. With one path (above `bothPaths` stays), ten times:
    // 100 on 20 a further 1.2-5.2 % cheaper, the bus left 0.8 kWh short served, 2-2.5 s more.
    const lnsLimits = defaultLnsLimits(problem, deadline, target);
    if (crewRelaxed)
      lnsLimits.maxLpSolves *=
        paths.length > 1 ? CREW_BOUND_LIMITS.relaxedLnsFactor : CREW_BOUND_LIMITS.relaxedLnsFactorOnePath;
    let bestPath: { search: SearchResult; construction: string; lns: typeof lnsStats } | null = null;
    for (const path of paths) {
      let pathSearch = path.search;
      let pathConstruction = path.construction;
      let pathLns = { neighbourhoods: 0, accepted: 0, lpSolves: 0, splits: 0 };
      live.update(pathSearch.assignment, all);
      pathSearch = { ...pathSearch, result: live.solve() };
      if (
        options.lns !== false &&
        pathSearch.result.objective > target &&
        !pathSearch.timedOut &&
        problem.stays.length <= LNS_MAX_STAYS
      ) {
        let lns = pairSearch(problem, crewHints ?? hints, live, pathSearch.assignment, pathSearch.result, lnsLimits);
        // Small depots: the search again from the same start with every laid-out split solved by
        // the LP (the score that picks the few it solves reads the bound's powers, not the crew's
        // hand-overs); the better of the two is kept, so the second cannot make the plan worse.
        // 7 buses on 2 chargers, seed 4: 692.10 to 664.05, the best the exact MILP finds (4.2 %);
        // 18 held-out depots of 6-9 buses on 2-3 chargers 12.5 % more time in all.
        if (problem.stays.length <= EVERY_SPLIT.stays && !lns.timedOut && lns.result.objective > target) {
          const wide = pairSearch(problem, crewHints ?? hints, live, pathSearch.assignment, pathSearch.result, {
            ...lnsLimits,
            everySplit: true,
            maxLpSolves: EVERY_SPLIT.lpSolves,
          });
          const kept =
            wide.result.status === 'optimal' && cheaper(wide.result.objective, lns.result.objective) ? wide : lns;
          if (kept === lns) {
            live.update(lns.assignment, all);
            live.solve();
          }
          lns = {
            ...kept,
            moves: lns.moves + wide.moves,
            splits: lns.splits + wide.splits,
            iterations: lns.iterations + wide.iterations,
          };
        }
        pathLns = {
          neighbourhoods: lns.neighbourhoods,
          accepted: lns.accepted,
          lpSolves: lns.moves,
          splits: lns.splits,
        };
        if (lns.accepted > 0) {
          pathConstruction += '+lns';
          const again =
            lns.timedOut || lns.result.objective <= target
              ? null
              : localSearch(problem, hints, live, lns.assignment, lns.result, {
                  deadline,
                  maxMoves: Math.ceil(maxMoves / 2),
                  target,
                });
          const best = again && again.result.objective < lns.result.objective ? again : lns;
          pathSearch = {
            ...pathSearch,
            assignment: best.assignment,
            result: best.result,
            moves: pathSearch.moves + (again?.moves ?? 0),
            accepted: pathSearch.accepted + (again?.accepted ?? 0),
            iterations: pathSearch.iterations + lns.iterations + (again?.iterations ?? 0),
            timedOut: lns.timedOut || again?.timedOut,
          };
          live.update(pathSearch.assignment, all);
          pathSearch.result = live.solve();
        }
      }
      // A bus still short that the bounds serve, after the whole-sequence search: targeted repairs
      // (short-repair.ts) from the crew's powers (100 buses on 20 chargers, seed 3: 7.5 kWh short
      // to 2), with more changes per short stay than the repairs before it: 200 buses on 40
      // chargers, seed 1, 2.8 kWh short to served (0.7 % dearer), no slower; the same plans where
      // the path ends served (40 on 10, 100 on 20). It also gives a short bus the unneeded part of
      // another bus's window (`heldSpare`): every charger is held all night on these depots, so
      // there is no idle charger to move to; 200 on 40 seeds 2 and 3, 1.0 and 13.3 kWh short, served.
      const repaired = crewHints ? repairIfShort(pathSearch, crewHints, CREW_BOUND_LIMITS.finalRepair) : null;
      if (repaired) {
        if (better(repaired, pathSearch)) {
          pathSearch = repaired;
          pathConstruction += '+repair';
        }
        live.update(pathSearch.assignment, all);
        pathSearch.result = live.solve();
      }
      // With the crew's night known: hand-overs moved a slot or two, alone or several together.
      if (crewHints && pathSearch.result.objective > target && performance.now() < deadline) {
        const polished = polishHandovers(
          problem,
          live,
          pathSearch.assignment,
          pathSearch.result,
          crewHints.energy,
          CREW_BOUND_LIMITS.polish,
        );
        if (better({ ...pathSearch, ...polished }, pathSearch)) {
          pathSearch = { ...pathSearch, assignment: polished.assignment, result: polished.result };
          pathConstruction += '+polish';
        }
      }
      if (!bestPath || better(pathSearch, bestPath.search))
        bestPath = { search: pathSearch, construction: pathConstruction, lns: pathLns };
      if (pathSearch.result.objective <= target) break;
    }
    search = bestPath!.search;
    construction = bestPath!.construction;
    lnsStats = bestPath!.lns;
    live.update(search.assignment, all);
    search.result = live.solve();
    chosen = preferStableAndFewerMoves(problem, hints, live, search.assignment, search.result, {
      deadline,
      maxMoves,
      target,
    });
    // Full service first: a bus may stay short only if no assignment serves it. On a small depot
    // the exact MILP either finds one that does or proves the shortfall necessary. On the smallest
    // depots with crew windows it also runs where the plan is served but above its bound (not in
    // a re-plan, which keeps the night as it was): 6 and 7 buses on 2 chargers, held out, seed 3,
    // were 2.42 % and 1.57 % above the optimum, which 30 nodes from the plan find (4-9 s). Without
    // the crew every small depot measured is at its optimum already, and 5 buses on one charger,
    // at it but unproven (a loose bound), would spend 10 s on 30 nodes for nothing.
    const shortNow = shortfallIn(problem, live, chosen.result);
    // Above the bound on the smallest depots the MILP has its own cap rather than what is left of
    // the plan's budget: a plan done in a second leaves it 11 s, which 7 buses on 2 chargers (7 s
    // quiet) could pass under load, and its answer would then depend on the load.
    const exactFor =
      shortNow > 1e-3
        ? {
            binaries: EXACT_LIMITS.binaries,
            timeLimitMs: Math.max(1, Math.min(EXACT_LIMITS.ms, deadline - performance.now())),
          }
        : chosen.result.objective > target && problem.yard?.capacity && !problem.previous
          ? { binaries: EXACT_LIMITS.unprovenBinaries, timeLimitMs: EXACT_LIMITS.unprovenMs }
          : null;
    if (exactFor && options.exact !== false && !problem.pinned?.some((c) => c >= 0)) {
      const binaries = exactSize(problem);
      if (binaries <= exactFor.binaries && performance.now() < deadline) {
        const ex = solveExact(problem, solver, {
          start: chosen.assignment,
          maxNodes: EXACT_LIMITS.nodes,
          timeLimitMs: exactFor.timeLimitMs,
        });
        exactStats = {
          status: ex.timeLimited ? 'time' : ex.status,
          nodes: ex.nodes,
          binaries: ex.binaries,
          ms: round(ex.ms, 1),
        };
        // Stopped by the clock, its answer would depend on the machine's load: left unused.
        if (!ex.timeLimited && Number.isFinite(ex.bound)) exactBound = ex.bound;
        if (
          !ex.timeLimited &&
          ex.assignment &&
          ex.objective < chosen.result.objective - 1e-6 * Math.max(1, Math.abs(chosen.result.objective))
        ) {
          live.update(ex.assignment, all);
          const res = live.solve();
          if (res.status === 'optimal' && cheaper(res.objective, chosen.result.objective)) {
            chosen = { assignment: ex.assignment, result: res, crewTrade: null, keptPrevious: chosen.keptPrevious };
            construction += '+exact';
          } else live.update(chosen.assignment, all);
        }
        if (!ex.timeLimited && ex.status === 'optimal') exactProven = true;
      }
    }
  } catch (e) {
    live.dispose();
    throw e;
  }
  const stoppedBy: Plan['stats']['stoppedBy'] =
    search.result.objective <= target ? 'bound' : timedOut || search.timedOut ? 'time' : 'moves';
  const assignment = chosen.assignment;
  const plug = plugMapOf(problem, assignment);
  let plan: Plan;
  try {
    let power = powerFrom(problem, live.model, chosen.result.x);
    if (overfills(problem, power)) {
      // The model left out taper/ceiling rows a battery was not expected to reach; it reached
      // one (zero prices, solver tolerance): solve this assignment again with every row.
      const full = buildChargeModel(problem, { mode: 'assigned', plug, tieBreak: true, allRows: true });
      const res = solver.solve(full.lp);
      if (res.status !== 'optimal') throw new Error(`plan LP ended ${res.status}`);
      power = powerFrom(problem, full, res.x);
    }
    power = power.map((row) => row.map((v) => round(v)));
    plan = assemblePlan(
      problem,
      solver,
      plug,
      power,
      Math.max(lb.penalisedObjective, exactBound, crewBound),
      Math.max(lb.shortfallKwh, crewShortfall),
      exactProven,
      (variant) => shortWithLive(problem, live, chosen.assignment, variant, chosen.result),
      [
        ...(lb.shortfallKwh <= 1e-9
          ? [{ objective: lb.penalisedObjective, kwhValue: Math.max(0, ...lb.stayDual) }]
          : []),
        ...(crewServed ? [crewServed] : []),
      ],
    );
  } finally {
    live.dispose();
  }
  plan.stats.exact = exactStats;
  plan.stats.crewBound = crewBoundStats;
  // The crew-aware bound or the exact model (which keeps the crew's rules) set the bound when
  // either reaches the relaxation's; else it is the relaxation's alone.
  plan.boundKeepsCrew =
    !problem.yard?.capacity ||
    Math.max(exactBound, crewBound) >= lb.penalisedObjective - 1e-9 * Math.max(1, Math.abs(lb.penalisedObjective));
  plan.crewTrade = chosen.crewTrade;
  plan.keptPrevious = chosen.keptPrevious;
  plan.previousRefused = chosen.previousRefused ?? null;
  plan.stats.lpColumns = live.model.lp.numCols;
  plan.stats.lpRows = live.model.lp.numRows;
  plan.stats.lowerBoundMs = round(lb.ms, 1);
  plan.stats.localSearchMoves = search.moves;
  plan.stats.localSearchAccepted = search.accepted;
  plan.stats.construction = construction;
  plan.stats.lns = lnsStats;
  plan.stats.stoppedBy = stoppedBy;
  plan.stats.simplexIterations = search.iterations + lb.iterations;
  plan.solveMs = round(performance.now() - t0, 1);
  return plan;
}

interface Chosen {
  assignment: Assignment;
  result: LpResult;
  crewTrade: Plan['crewTrade'];
  keptPrevious: Plan['keptPrevious'];
  previousRefused?: Plan['previousRefused'];
}

/**
 * Among plans within the cost tolerance of the cheapest found (max(share x cost, amount)):
 * when re-planning, the plan being carried out, kept wherever it still can be (see stable.ts);
 * with crew rules, the same hand-overs moved to pull-ins and pull-outs where that saves moves.
 */
function preferStableAndFewerMoves(
  problem: Problem,
  hints: AssignmentHints,
  live: AssignedModel,
  cheapest: Assignment,
  result: LpResult,
  limits: { deadline: number; maxMoves: number; target: number },
): Chosen {
  const all = problem.buses.map((b) => b.index);
  const base = result.objective;
  // The tolerance is on money; shortfall the plan being carried out already had, which the
  // cheapest plan serves, earns that plan no credit against it (as in stableRepair).
  const shortBase = shortfallIn(problem, live, result);
  const moneyOf = (objective: number, short: number) => objective - problem.shortfallPenalty * short;
  const allowed = Math.max(problem.tolerance.share * Math.abs(moneyOf(base, shortBase)), problem.tolerance.amount);
  const oldShort = problem.previous?.shortfallKwh ?? 0;
  const credit = problem.shortfallPenalty * Math.max(0, oldShort - shortBase);
  const limit = base + credit + allowed;
  const keptAgainst = (r: LpResult) => {
    const short = shortfallIn(problem, live, r);
    return {
      extraCost: round(Math.max(0, moneyOf(r.objective, short) - moneyOf(base, shortBase)), 2),
      extraShortKwh: round(Math.max(0, short - shortBase), 1),
    };
  };
  let chosen: Chosen = { assignment: cheapest, result, crewTrade: null, keptPrevious: null };
  const repair = problem.previous
    ? stableRepair(problem, hints, live, {
        limit,
        minGain: problem.tolerance.amount / 10,
        releases: STABLE_LIMITS.releases,
        candidates: STABLE_LIMITS.candidates,
        deadline: limits.deadline,
      })
    : null;
  if (repair && repair.result.status === 'optimal' && repair.result.objective <= limit) {
    chosen = {
      assignment: repair.assignment,
      result: repair.result,
      crewTrade: null,
      keptPrevious: keptAgainst(repair.result),
    };
  } else if (problem.previous) {
    // Still dearer than the tolerance (or the kept sessions do not fit the crew's room): the
    // general searches from the repaired plan, each change saving a tenth of the tolerance's
    // amount; the cheapest plan when even that stays outside the tolerance.
    const start = repair?.result.status === 'optimal' ? repair.assignment : keptAssignment(problem, hints.energy);
    const kept = start ? searchFromKept(problem, hints, live, start, limit, limits) : null;
    if (kept && kept.result.objective <= limit)
      chosen = {
        assignment: kept.assignment,
        result: kept.result,
        crewTrade: null,
        keptPrevious: keptAgainst(kept.result),
      };
    // What keeping it would have taken, beside the plan chosen, so the review can say so.
    else if (kept) chosen.previousRefused = { ...keptAgainst(kept.result), allowed: round(allowed, 2) };
  }
  if (problem.yard && !chosen.keptPrevious) {
    const movesBefore = countCrewMoves(problem, cheapest);
    const fewer = fitCrew(problem, cloneAssignment(chosen.assignment), hints.energy, true);
    const movesAfter = countCrewMoves(problem, fewer);
    const reference = chosen.keptPrevious ? countCrewMoves(problem, chosen.assignment) : movesBefore;
    if (movesAfter < reference) {
      live.update(fewer, all);
      const res = live.solve();
      if (res.status === 'optimal' && res.objective <= limit) {
        chosen = { ...chosen, assignment: fewer, result: res };
      }
    }
    // Buses moved whole onto chargers that stand idle through their stay (whole-stays.ts).
    const idle = wholeStaysOnIdle(problem, hints.energy, live, chosen.assignment, limit, limits.deadline);
    if (idle) chosen = { ...chosen, assignment: idle.assignment, result: idle.result };
    const movesChosen = countCrewMoves(problem, chosen.assignment);
    if (movesChosen < movesBefore) {
      chosen.crewTrade = {
        fewerMoves: movesBefore - movesChosen,
        extraCost: round(Math.max(0, chosen.result.objective - base), 2),
      };
    }
  }
  return chosen;
}

/** Budgets of the stable repair (see stable.ts): kept sessions released at most, LP solves per release. */
export const STABLE_LIMITS = { releases: 6, candidates: 6 };

/** The local search, then the pair search, from a kept plan, changes only for a tenth of the tolerance's amount. */
function searchFromKept(
  problem: Problem,
  hints: AssignmentHints,
  live: AssignedModel,
  kept: Assignment,
  limit: number,
  limits: { deadline: number; maxMoves: number; target: number },
): { assignment: Assignment; result: LpResult } | null {
  const all = problem.buses.map((b) => b.index);
  live.update(kept, all);
  const first = live.solve();
  if (first.status !== 'optimal') return null;
  const minGain = problem.tolerance.amount / 10;
  let search =
    first.objective <= limit
      ? { assignment: kept, result: first }
      : localSearch(problem, hints, live, kept, first, { ...limits, minGain });
  if (search.result.objective > limit && problem.stays.length <= LNS_MAX_STAYS && performance.now() < limits.deadline) {
    // Re-split pairs of chargers (dearest stays first), which moves only the buses of the
    // chargers it changes, before giving up on the plan being carried out.
    const lns = pairSearch(problem, hints, live, search.assignment, search.result, {
      ...defaultLnsLimits(problem, limits.deadline, limit),
      passes: 2,
    });
    if (lns.result.objective < search.result.objective) search = { assignment: lns.assignment, result: lns.result };
  }
  // Outside the tolerance too: returned, for the review to say what keeping it would take.
  return search;
}

/**
 * kWh short per bus with the site limit or the cabinets' limits lifted, on the live model of the
 * chosen assignment: its bounds relaxed and re-solved from its basis (the chosen solution stays
 * feasible, so the simplex only improves on it), then restored.
 */
function shortWithLive(
  problem: Problem,
  live: AssignedModel,
  assignment: Assignment,
  variant: { siteUnlimited?: boolean; cabinetsUnlimited?: boolean },
  current: LpResult,
): Float64Array {
  // A limit that does not bind in the plan's own solution cannot serve anyone when lifted (that
  // solution stays optimal): the plan's shortfalls, without a re-solve.
  if (current.status === 'optimal' && !binds(problem, live, assignment, variant, current.x)) {
    const out = new Float64Array(problem.buses.length);
    for (const stay of problem.stays) {
      const c = live.model.shortCol[stay.id]!;
      if (c >= 0) out[stay.bus] = Math.max(out[stay.bus]!, current.x[c]!);
    }
    return out;
  }
  live.update(
    assignment,
    problem.buses.map((b) => b.index),
  );
  const model = live.model;
  const lp = model.lp;
  const loadCols = Array.from(model.loadCol);
  const cabinetRows = model.cabinetRow.flatMap((rows) => Array.from(rows).filter((r) => r >= 0));
  if (variant.siteUnlimited)
    live.setColBounds(
      loadCols,
      loadCols.map(() => 0),
      loadCols.map(() => Infinity),
    );
  if (variant.cabinetsUnlimited) for (const r of cabinetRows) live.setRowBounds(r, -Infinity, Infinity);
  const res = live.solve();
  if (variant.siteUnlimited)
    live.setColBounds(
      loadCols,
      loadCols.map((c) => lp.colLower[c]!),
      loadCols.map((c) => lp.colUpper[c]!),
    );
  if (variant.cabinetsUnlimited) for (const r of cabinetRows) live.setRowBounds(r, lp.rowLower[r]!, lp.rowUpper[r]!);
  const out = new Float64Array(problem.buses.length);
  if (res.status !== 'optimal') return out.fill(Infinity);
  for (const stay of problem.stays) {
    const c = model.shortCol[stay.id]!;
    if (c >= 0) out[stay.bus] = Math.max(out[stay.bus]!, res.x[c]!);
  }
  return out;
}

/** Does the site limit (or a cabinet's) hold some slot's load at its limit in this solution? */
function binds(
  problem: Problem,
  live: AssignedModel,
  assignment: Assignment,
  variant: { siteUnlimited?: boolean; cabinetsUnlimited?: boolean },
  x: Float64Array,
): boolean {
  const model = live.model;
  const near = (v: number, limit: number) => v >= limit - 1e-6 * Math.max(1, Math.abs(limit));
  if (variant.siteUnlimited) {
    for (const c of model.loadCol) if (near(x[c]!, model.lp.colUpper[c]!)) return true;
  }
  if (variant.cabinetsUnlimited) {
    const T = problem.slotCount;
    const load = new Float64Array(problem.cabinets.length * T);
    const plug = plugMapOf(problem, assignment);
    for (const bus of problem.buses)
      for (const t of bus.slots) {
        const ch = plug[bus.index]![t]!;
        const g = ch >= 0 ? problem.chargers[ch]!.cabinet : -1;
        if (g >= 0) load[g * T + t] = load[g * T + t]! + x[model.pCol[bus.index]![t]!]!;
      }
    for (let g = 0; g < problem.cabinets.length; g++)
      for (let t = 0; t < T; t++)
        if (model.cabinetRow[g]![t]! >= 0 && near(load[g * T + t]!, problem.cabinets[g]!.limitKw)) return true;
  }
  return false;
}

/** kWh short in an LP solution of the live model (summed over departures). */
function shortfallIn(problem: Problem, live: AssignedModel, result: LpResult): number {
  let short = 0;
  for (const stay of problem.stays) {
    const c = live.model.shortCol[stay.id]!;
    if (c >= 0 && result.x.length) short += result.x[c]!;
  }
  return short;
}

/** Does any battery go above its ceiling or draw more than its taper allows? */
export function overfills(problem: Problem, power: Float64Array[]): boolean {
  const { eta, slotHours: dt } = problem;
  for (const bus of problem.buses) {
    let e = bus.arrivalKwh;
    for (const stay of bus.stays) {
      for (let t = stay.arriveSlot; t < stay.departSlot; t++) {
        const p = power[bus.index]![t]!;
        if (p > 0 && bus.taperFromKwh !== null && e > bus.taperFromKwh) {
          const cap = (bus.maxKw * (bus.usableKwh - e)) / (bus.usableKwh - bus.taperFromKwh);
          if (p > cap + 1e-6) return true;
        }
        e += eta * dt * p;
        if (p > 0 && e > bus.ceilingKwh + 1e-6) return true;
      }
      e -= stay.runKwh;
    }
  }
  return false;
}

function assemblePlan(
  problem: Problem,
  solver: Solver,
  plug: Int32Array[],
  power: Float64Array[],
  lbPenalised: number,
  lbShortfall: number,
  exactProven = false,
  shortWith?: ShortWith,
  served: { objective: number; kwhValue: number }[] = [],
): Plan {
  const { slotCount: T, slotHours: dt, eta, zone } = problem;
  const charging = new Float64Array(T);
  for (const row of power) for (let t = 0; t < T; t++) charging[t] = charging[t]! + row[t]!;
  const cost = costLoad(problem.slots, charging, problem.tariff, dt);

  // Sessions: one per continuous plug-in. Without crew rules each is trimmed to the slots with
  // power (nobody needs to plug a bus in before its power starts or leave it after it ends);
  // with them the plug-in and unplug stay where the crew was planned to make them, and a
  // session without power is left out (one walk fewer).
  const sessions: PlanSession[] = [];
  let plugIns = 0;
  let crewMoves = 0;
  for (const bus of problem.buses) {
    const row = plug[bus.index]!;
    const p = power[bus.index]!;
    let t = 0;
    while (t < T) {
      const c = row[t]!;
      if (c < 0) {
        t++;
        continue;
      }
      let u = t;
      while (u < T && row[u] === c && !(u > t && problem.slots[u]!.startMs !== problem.slots[u - 1]!.endMs)) u++;
      let first = t;
      let last = u - 1;
      if (problem.yard) {
        let any = false;
        for (let x = first; x <= last; x++) if (p[x]! > 0) any = true;
        // A bus already on its charger at a re-plan's start stays a session even without power:
        // it is plugged in and someone unplugs it at the planned time.
        const onAlready = first === 0 && problem.pinned !== undefined && problem.pinned[bus.stays[0]!.id] === c;
        if (!any && !onAlready) last = first - 1;
      } else {
        while (first <= last && p[first]! <= 0) first++;
        while (last >= first && p[last]! <= 0) last--;
      }
      if (first <= last) {
        const kw = Array.from(p.subarray(first, last + 1));
        const stay = bus.stays.find((st) => st.arriveSlot <= first && first < st.departSlot)!;
        const startMove: Move = startIsFree(problem, stay, first) ? 'driver' : 'crew';
        const endMove: Move = endIsFree(problem, stay, last + 1) ? 'driver' : 'crew';
        if (startMove === 'crew') crewMoves++;
        if (endMove === 'crew' && last + 1 < T) crewMoves++;
        sessions.push({
          bus: bus.id,
          charger: problem.chargers[c]!.id,
          start: problem.slots[first]!.start,
          end: isoAt(problem.slots[last]!.endMs, zone),
          kwh: round(kw.reduce((a, v) => a + v * dt, 0)),
          kw,
          startMove,
          endMove,
        });
        plugIns++;
      }
      t = u;
    }
  }
  sessions.sort((x, y) =>
    x.charger < y.charger ? -1 : x.charger > y.charger ? 1 : x.start < y.start ? -1 : x.start > y.start ? 1 : 0,
  );

  // Energy at each departure follows from the power delivered.
  const shortByBus = new Float64Array(problem.buses.length);
  // The stay of each bus whose departure misses most: the one a short bus's cause names.
  const shortStay = new Int32Array(problem.buses.length).fill(-1);
  let totalShort = 0;
  const departureKwh: number[][] = problem.buses.map(() => []);
  const busOut: PlanBus[] = problem.buses.map((bus) => {
    let e = bus.arrivalKwh;
    const departures: PlanBus['departures'] = [];
    bus.stays.forEach((stay, k) => {
      for (let t = stay.arriveSlot; t < stay.departSlot; t++) e += eta * dt * power[bus.index]![t]!;
      departureKwh[bus.index]!.push(e);
      departures.push({ at: isoAt(stay.departMs, zone), kwh: round(e) });
      const short = Math.max(0, stay.requiredKwh - e);
      if (short > 1e-4) {
        if (short > shortByBus[bus.index]!) shortStay[bus.index] = k;
        shortByBus[bus.index] = Math.max(shortByBus[bus.index]!, short);
        totalShort += short;
      }
      e -= stay.runKwh;
    });
    return {
      id: bus.id,
      departures,
      shortfallKwh: round(shortByBus[bus.index]!),
      reason: null,
      cause: null,
      causeProven: null,
    };
  });
  if (totalShort > 0) {
    const reasons = explainShortfalls(problem, solver, plug, shortByBus, undefined, shortWith);
    const strongest = Math.max(
      0,
      ...problem.chargers.filter((c) => c.available.some((a) => a === 1)).map((c) => c.maxKw),
    );
    busOut.forEach((b, i) => {
      b.reason = shortByBus[i]! > 1e-4 ? (reasons[i] ?? 'charger') : null;
      if (!b.reason) return;
      // Proven: the bus's own limits (alone on the strongest charger it is still short), the
      // exact model's optimum, or the relaxation being as short in total as this plan.
      const own = soloShortfall(problem, i, strongest, true) > 1e-3;
      const proven = own || exactProven || lbShortfall >= totalShort - 1e-3;
      b.cause = describeShortfall(problem, i, b.reason, shortByBus[i]!, proven, shortStay[i]!);
      b.causeProven = proven;
    });
  }

  let deliveredKwh = 0;
  for (let t = 0; t < T; t++) deliveredKwh += charging[t]! * dt;
  const arrival = limitedBaseline(problem, departureKwh, 'arrival');
  const timer = limitedBaseline(problem, departureKwh, 'timer');
  const baselines = {
    arrival: baselineCost(arrival, cost.energy, deliveredKwh),
    timer: baselineCost(timer, cost.energy, deliveredKwh),
  };
  const baseline = referenceBaseline(baselines);
  // Valid for every plan at most as short as this one: cost + M x short >= relaxation optimum.
  let lowerBound = Math.max(0, lbPenalised - problem.shortfallPenalty * Math.max(totalShort, lbShortfall));
  // When the relaxation serves every bus, a kWh short is worth at most its dearest departure dual
  // there (with that penalty instead of M the same solution and duals stay optimal), so a plan
  // short by S kWh costs at least the relaxation's optimum less S x that value.
  for (const b of served)
    if (b.kwhValue < problem.shortfallPenalty) lowerBound = Math.max(lowerBound, b.objective - b.kwhValue * totalShort);
  const total = cost.total;
  const gap = total > 1e-9 ? Math.max(0, (total - lowerBound) / total) : 0;
  const status: Plan['status'] = totalShort > 1e-4 ? 'short' : gap <= 1e-6 ? 'optimal' : 'feasible';
  return {
    status,
    cost: { energy: round(cost.energy), demand: round(cost.demand), total: round(cost.total) },
    baseline: roundedBaseline(baseline),
    baselines: {
      arrival: {
        ...roundedBaseline(baselines.arrival),
        chargingKw: Array.from(arrival.chargingKw, (kw) => round(kw, 3)),
      },
      timer: { ...roundedBaseline(baselines.timer), chargingKw: Array.from(timer.chargingKw, (kw) => round(kw, 3)) },
    },
    // Solver tolerance can put the bound a hair above the plan; anything larger stays visible.
    lowerBound: round(lowerBound > total && lowerBound - total <= 1e-7 * Math.max(1, total) ? total : lowerBound),
    gap: round(gap, 9),
    solveMs: 0,
    slots: problem.slots.map((s, t) => ({
      start: s.start,
      loadKw: round(charging[t]! + s.otherKw),
      price: s.price,
      period: s.periodName,
      limitKw: s.limitKw,
    })),
    sessions,
    crewMoves,
    outOfService: outOfServiceSpans(problem),
    crewTrade: null,
    keptPrevious: null,
    previousRefused: null,
    buses: busOut,
    savings: {
      energy: round(baseline.energy - cost.energy),
      demand: round(baseline.demand - cost.demand),
      total: round(baseline.total - cost.total),
      share: baseline.total > 0 ? round((baseline.total - cost.total) / baseline.total, 6) : 0,
      peakKw: round(cost.peakKw),
      baselinePeakKw: round(baseline.peakKw),
      peakCut: baseline.peakKw > 0 ? round((baseline.peakKw - cost.peakKw) / baseline.peakKw, 6) : 0,
    },
    stats: {
      buses: problem.buses.length,
      chargers: problem.chargers.length,
      slots: T,
      plugIns,
      lpColumns: 0,
      lpRows: 0,
      lowerBoundMs: 0,
      localSearchMoves: 0,
      localSearchAccepted: 0,
      construction: '',
      lns: { neighbourhoods: 0, accepted: 0, lpSolves: 0, splits: 0 },
      exact: null,
      crewBound: null,
      stoppedBy: 'bound',
      simplexIterations: 0,
      shortfallKwh: round(totalShort),
      unavoidableShortfallKwh: round(lbShortfall),
    },
  };
}

/** A baseline's cost, its undelivered energy valued at the plan's average price per grid kWh. */
export function baselineCost(b: Baseline, planEnergyCost: number, planGridKwh: number): BaselineCost {
  const shortfallCost = planGridKwh > 0 ? (b.shortfallKwh / b.eta) * (planEnergyCost / planGridKwh) : 0;
  return {
    kind: b.kind,
    energy: b.cost.energy,
    demand: b.cost.demand,
    total: b.cost.total + shortfallCost,
    peakKw: b.peakKw,
    exceedsSiteLimit: b.exceedsSiteLimit,
    shortfallKwh: b.shortfallKwh,
    shortfallCost,
  };
}

/** Below this a baseline counts as delivering the plan's energy (float round-off, not kWh). */
const KEEPS_UP_KWH = 0.05;

/**
 * The baseline savings are reported against: the cheaper of those that deliver the plan's
 * departure energy; when neither does, the one that falls least short.
 */
export function referenceBaseline(b: Record<BaselineKind, BaselineCost>): BaselineCost {
  const both = [b.arrival, b.timer];
  const keepUp = both.filter((x) => x.shortfallKwh <= KEEPS_UP_KWH);
  if (keepUp.length) return keepUp.reduce((x, y) => (y.total < x.total ? y : x));
  return both.reduce((x, y) => (y.shortfallKwh < x.shortfallKwh ? y : x));
}

export function roundedBaseline(b: BaselineCost): BaselineCost {
  return {
    ...b,
    energy: round(b.energy),
    demand: round(b.demand),
    total: round(b.total),
    peakKw: round(b.peakKw),
    shortfallKwh: round(b.shortfallKwh),
    shortfallCost: round(b.shortfallCost),
  };
}

/** Each charger's runs of slots out of service, as spans (a gap between slots ends a span). */
function outOfServiceSpans(problem: Problem): Plan['outOfService'] {
  const spans: Plan['outOfService'] = [];
  for (const c of problem.chargers) {
    let open: { charger: string; from: string; toMs: number } | null = null;
    problem.slots.forEach((slot, t) => {
      const out = !c.available[t];
      if (open && (!out || slot.startMs !== open.toMs)) {
        spans.push({ charger: open.charger, from: open.from, to: isoAt(open.toMs, problem.zone) });
        open = null;
      }
      if (out) open = open ?? { charger: c.id, from: slot.start, toMs: slot.endMs };
      if (open) open.toMs = slot.endMs;
    });
    if (open) {
      const last: { charger: string; from: string; toMs: number } = open;
      spans.push({ charger: last.charger, from: last.from, to: isoAt(last.toMs, problem.zone) });
    }
  }
  return spans;
}
