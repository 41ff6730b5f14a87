import type { Plan } from './plan.js';
import type { Problem } from './problem.js';
import type { Scenario } from './scenario.js';

// Other starts on depots short of chargers. There the search's path (which construction it
// starts from, which bus the local search tries first, which pairs of chargers it re-splits)
// decides where it ends, and the same depot with its buses and chargers listed in another order
// ends elsewhere: 100 buses on 25 chargers, five orders, 11,151 to 12,448 (seed 1) and 10,494 to
// 10,906 (seed 3); 40 on 10, 4,344 to 4,462 (seed 3). So a fresh plan on such a depot is also
// planned from the same depot listed in other orders (fixed shuffles, so the same inputs still
// give the same plan) and the cheapest found wins. Not on the smallest depots (the crew-aware
// MILP bound and the exact MILP settle most of those), not above `maxStays` (each start takes as long as the first), and not in
// re-plans or regenerations (they keep the plan being carried out; a night under way needs its
// answer in a second or two).

export const RESTART_LIMITS = {
  /** Above the depots whose crew-aware bound is a MILP (CREW_BOUND_LIMITS.stays) ... */
  minStays: 17,
  /** ... up to this many stays ... */
  maxStays: 120,
  /** ... with at least this many stays per charger and crew windows. */
  perCharger: 3,
  /** Starts besides the first. */
  restarts: 2,
};

/** How many other starts a fresh plan of `problem` gets (0: none). */
export function restartsFor(problem: Problem): number {
  const n = problem.stays.length;
  if (!problem.yard?.capacity || n < RESTART_LIMITS.minStays || n > RESTART_LIMITS.maxStays) return 0;
  return n >= RESTART_LIMITS.perCharger * problem.chargers.length ? RESTART_LIMITS.restarts : 0;
}

/** A fixed shuffle (Fisher-Yates on a linear congruential sequence seeded by `seed`). */
function shuffled<T>(items: readonly T[], seed: number): T[] {
  const out = items.slice();
  let s = (seed * 2_654_435_761) % 4_294_967_296;
  const next = () => {
    s = (s * 1_664_525 + 1_013_904_223) % 4_294_967_296;
    return s / 4_294_967_296;
  };
  for (let i = out.length - 1; i > 0; i--) {
    const j = Math.floor(next() * (i + 1));
    [out[i], out[j]] = [out[j]!, out[i]!];
  }
  return out;
}

/** The same depot with its buses and chargers listed in the `k`-th other order. */
export function reorderedScenario(scenario: Scenario, k: number): Scenario {
  return { ...scenario, buses: shuffled(scenario.buses, k), chargers: shuffled(scenario.chargers, k + 7) };
}

/**
 * The cheapest plan a start found (penalised by its shortfall): a plan's cost less what it pays
 * for fewer crew moves (it is within the depot's tolerance of that cheapest).
 */
export function cheapestFound(plan: Plan, shortfallPenalty: number): number {
  return plan.cost.total - (plan.crewTrade?.extraCost ?? 0) + shortfallPenalty * plan.stats.shortfallKwh;
}

/** A plan of a reordered depot with its buses, sessions and outages in the scenario's order. */
export function inScenarioOrder(plan: Plan, scenario: Scenario): Plan {
  const busAt = new Map(scenario.buses.map((b, i) => [b.id, i]));
  const chargerAt = new Map(scenario.chargers.map((c, i) => [c.id, i]));
  const bus = (id: string) => busAt.get(id) ?? Infinity;
  return {
    ...plan,
    buses: plan.buses.slice().sort((a, b) => bus(a.id) - bus(b.id)),
    // As a plan lists them: by bus, then in time.
    sessions: plan.sessions
      .slice()
      .sort((a, b) => bus(a.bus) - bus(b.bus) || Date.parse(a.start) - Date.parse(b.start)),
    outOfService: plan.outOfService
      .slice()
      .sort(
        (a, b) =>
          (chargerAt.get(a.charger) ?? Infinity) - (chargerAt.get(b.charger) ?? Infinity) ||
          Date.parse(a.from) - Date.parse(b.from),
      ),
  };
}
