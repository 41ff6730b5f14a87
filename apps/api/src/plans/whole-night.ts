import type { PlanResult } from '@nightyard/contracts';
import { referenceBaseline, type NightBaseline, type Scenario } from '@nightyard/scheduling';

const SLOT_MS = 15 * 60_000;
const SLOT_HOURS = 0.25;
const round = (v: number) => Math.round(v * 1e6) / 1e6;

type Baseline = PlanResult['baseline'];
type BaselineWithLoad = NonNullable<PlanResult['baselines']>['arrival'];

/**
 * A re-plan's figures for the night as a whole. The engine prices only what it plans, from the
 * cut-off on, with the peaks the slots before it drew counted as peaks so far. The night's cost is
 * that plus what the slots before the cut-off cost: their charging energy as it happened, and the
 * demand charge of their peaks above the peaks the night started from (`scenario`: the one the
 * engine was given, its peaks so far raised to any demand target). The same constant is added to
 * the plan and the lower bound, so the gap and trades the engine worked out stand, and a
 * revision's cost compares with its night's first version, as a utility bills it. The baselines
 * are the engine's for the whole night with the same events (`night`, see night-baselines.ts).
 *
 * `result` has the whole night's slots and sessions; `derived` is the re-plan's own scenario.
 */
export function wholeNightFigures(
  result: PlanResult,
  scenario: Scenario,
  derived: Scenario,
  fromMs: number,
  night?: Record<'arrival' | 'timer', NightBaseline>,
  /**
   * The reference baseline of the plan the night was following: a revision keeps it, so a fault
   * after the fact does not swap the comparison (a timer that cannot keep up without a charger
   * counts its undelivered energy at the night's average price instead).
   */
  followedKind?: 'arrival' | 'timer',
): PlanResult {
  const before = result.slots.filter((s) => Date.parse(s.start) < fromMs);
  if (before.length === 0) return result;
  const charging = keptCharging(result, before);
  const keptEnergy = before.reduce((a, s, i) => a + charging[i]! * SLOT_HOURS * s.price, 0);
  const keptDemand = raisedPeaksCharge(scenario, derived);
  const kept = keptEnergy + keptDemand;
  const keptPeak = Math.max(0, ...before.map((s) => s.loadKw));

  const whole = (b: Baseline): Baseline => ({
    ...b,
    energy: round(b.energy + keptEnergy),
    demand: round(b.demand + keptDemand),
    total: round(b.total + kept),
    peakKw: Math.max(b.peakKw, keptPeak),
  });
  const withLoad = (b: BaselineWithLoad): BaselineWithLoad => ({
    ...whole(b),
    chargingKw: [...charging.map((kw) => round(kw)), ...b.chargingKw],
  });
  // The engine's baselines of the whole night with the same events, where it gave them (a re-plan
  // of a plan being carried out) and they cover this night's slots; else the re-plan's, after the
  // hours before the cut-off as they happened (then the night saves only what the re-plan saves).
  const fits = night && night.arrival.chargingKw.length === result.slots.length;
  const baselines = fits
    ? { arrival: night.arrival, timer: night.timer }
    : result.baselines
      ? { arrival: withLoad(result.baselines.arrival), timer: withLoad(result.baselines.timer) }
      : undefined;
  const total = round(result.cost.total + kept);
  const lowerBound = round(result.lowerBound + kept);
  return {
    ...result,
    cost: {
      energy: round(result.cost.energy + keptEnergy),
      demand: round(result.cost.demand + keptDemand),
      total,
    },
    baseline: fits
      ? withoutLoad(baselines![followedKind ?? referenceBaseline(night).kind!])
      : baselines && result.baseline.kind
        ? baselines[result.baseline.kind]
        : whole(result.baseline),
    ...(baselines ? { baselines } : {}),
    lowerBound,
    gap: total > 1e-9 ? round(Math.max(0, (total - lowerBound) / total)) : 0,
    // The engine's own figures, from the cut-off on, for whoever audits the addition.
    replan: {
      ...result.replan,
      own: {
        cost: result.cost,
        lowerBound: result.lowerBound,
        ...(result.baselines
          ? { baselineEnergy: { arrival: result.baselines.arrival.energy, timer: result.baselines.timer.energy } }
          : {}),
      },
    },
  };
}

function withoutLoad(b: Baseline & { chargingKw?: number[] }): Baseline {
  const { chargingKw: _, ...rest } = b;
  return rest;
}

/** kW a set of sessions draws, by slot start (ms). Plans are in quarter-hour slots. */
export function chargingBySlot(sessions: PlanResult['sessions']): Map<number, number> {
  const kw = new Map<number, number>();
  for (const s of sessions) {
    const t0 = Date.parse(s.start);
    s.kw.forEach((v, k) => kw.set(t0 + k * SLOT_MS, (kw.get(t0 + k * SLOT_MS) ?? 0) + v));
  }
  return kw;
}

/** kW the plan's sessions draw in each of the slots `before` (those before the cut-off). */
function keptCharging(result: PlanResult, before: PlanResult['slots']): number[] {
  const kw = chargingBySlot(result.sessions);
  return before.map((s) => kw.get(Date.parse(s.start)) ?? 0);
}

/** The demand charge of the peaks the re-plan counts as drawn already, above those the night began with. */
function raisedPeaksCharge(scenario: Scenario, derived: Scenario): number {
  // Charged as the engine charges: the facility's peak, then each period's on its own.
  const rates: [string, number][] = [
    ['facility', scenario.tariff.facilityDemandCharge],
    ...scenario.tariff.periods.map((p): [string, number] => [p.name, p.demandCharge]),
  ];
  let charge = 0;
  for (const [name, rate] of rates) {
    const was = scenario.tariff.peaksSoFarKw[name] ?? 0;
    const now = derived.tariff.peaksSoFarKw[name] ?? 0;
    charge += rate * Math.max(0, now - was);
  }
  return charge;
}
