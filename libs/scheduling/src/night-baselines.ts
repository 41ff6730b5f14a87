import { DateTime } from 'luxon';
import { limitedBaseline, type BaselineKind } from './baseline.js';
import { baselineCost, roundedBaseline, type BaselineCost, type Plan, type PlanSession } from './plan.js';
import { prepareProblem } from './problem.js';
import { localToMillis, type Scenario } from './scenario.js';

/** A baseline of the whole night, with its site charging per slot of the night. */
export type NightBaseline = BaselineCost & { chargingKw: number[] };

/**
 * The baselines of a re-planned night as a whole: what the depot would have done without a plan
 * all night, with the same events (the chargers out from the cut-off, the late buses arriving at
 * their new times), aiming at the energy the night's plan gives each bus at each pull-out (the
 * plan followed before the cut-off, the re-plan after). The re-plan's own baselines start from the
 * buses as the plan left them at the cut-off and cover only the rest of the night; joined to the
 * hours before as they happened, the night's saving was only the re-plan's (none, at the flat
 * prices of the small hours, after a managed evening). Its cost comes from the night's prices and
 * the peaks so far `scenario` starts from; a shortfall is valued at the night's average price.
 */
export function nightBaselines(
  scenario: Scenario,
  cutMs: number,
  events: {
    outOfService: readonly string[];
    lateArrivals?: Record<string, string>;
    /** Per bus, what a reading at the cut-off found above (or below) the energy the plan expected. */
    readingShiftKwh?: Record<string, number>;
  },
  before: { kept: readonly PlanSession[]; buses: Plan['buses'] },
  plan: Pick<Plan, 'sessions' | 'buses'>,
): Record<BaselineKind, NightBaseline> {
  const zone = scenario.timezone;
  const cutText = DateTime.fromMillis(cutMs, { zone }).toFormat("yyyy-MM-dd'T'HH:mm");
  const night: Scenario = {
    ...scenario,
    chargers: scenario.chargers.map((c) =>
      events.outOfService.includes(c.id)
        ? { ...c, outOfService: [...(c.outOfService ?? []), { from: cutText, to: scenario.end }] }
        : c,
    ),
    buses: scenario.buses.map((given) => {
      // A bus read below what the plan expected needs that much more in the baseline too (else
      // the plan delivers the difference and the baseline does not, and looks cheaper for it):
      // the night starts that much lower (or higher), the difference being the same events'.
      const shift = events.readingShiftKwh?.[given.id] ?? 0;
      const b =
        shift === 0
          ? given
          : { ...given, arrivalKwh: Math.min(given.usableKwh, Math.max(0, given.arrivalKwh + shift)) };
      const late = events.lateArrivals?.[b.id];
      if (late === undefined) return b;
      // The stay the bus is coming to: the first it leaves after the cut-off.
      const k = b.stays.findIndex((st) => localToMillis(st.depart, zone)! > cutMs);
      if (k < 0) return b;
      return { ...b, stays: b.stays.map((st, i) => (i === k && late > st.arrive ? { ...st, arrive: late } : st)) };
    }),
  };
  const problem = prepareProblem(night);
  // The plan's energy at each pull-out: the plan followed's before the cut-off, the re-plan's after.
  const planned = new Map<string, number>();
  for (const b of before.buses)
    for (const d of b.departures) if (Date.parse(d.at) < cutMs) planned.set(`${b.id}@${Date.parse(d.at)}`, d.kwh);
  for (const b of plan.buses) for (const d of b.departures) planned.set(`${b.id}@${Date.parse(d.at)}`, d.kwh);
  const targets = problem.buses.map((bus) =>
    bus.stays.map((st) => planned.get(`${bus.id}@${st.departMs}`) ?? st.requiredKwh),
  );
  // The night's charging energy and grid kWh: the hours kept as they happened, then the re-plan.
  const price = new Map(problem.slots.map((s) => [s.startMs, s.price]));
  let energyCost = 0;
  let gridKwh = 0;
  for (const s of [...before.kept, ...plan.sessions]) {
    const t0 = Date.parse(s.start);
    s.kw.forEach((kw, k) => {
      energyCost += kw * problem.slotHours * (price.get(t0 + k * problem.slotHours * 3_600_000) ?? 0);
      gridKwh += kw * problem.slotHours;
    });
  }
  const of = (kind: BaselineKind): NightBaseline => {
    const b = limitedBaseline(problem, targets, kind);
    // Rounded as a plan's own baselines are.
    return {
      ...roundedBaseline(baselineCost(b, energyCost, gridKwh)),
      chargingKw: Array.from(b.chargingKw, (kw) => Math.round(kw * 1000) / 1000),
    };
  };
  return { arrival: of('arrival'), timer: of('timer') };
}
