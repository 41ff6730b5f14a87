import type { PlanResult } from '@nightyard/contracts';
import { targetOutcome, tradeSentence, type DemandTarget, type Scenario } from '@nightyard/scheduling';

/**
 * A night re-planned from a cut-off under the demand target (its scenario already floored at the
 * target): its peaks against the target and, above it, what the excess costs this month. Which
 * buses it serves is not known without a second re-plan held at the target, so the trade gives
 * the cost alone.
 */
export function cutOffTarget(
  floor: Scenario,
  slots: PlanResult['slots'],
  targets: readonly DemandTarget[],
  why: { binding: string | null; impossible: string[] },
): NonNullable<PlanResult['target']> {
  const { peaks, above } = targetOutcome(floor, slots, targets);
  return {
    peaks,
    aboveKw: above.length ? Math.max(...above.map((a) => a.kw)) : 0,
    trade: above.length
      ? {
          above,
          cost: Math.round(above.reduce((a, x) => a + x.kw * x.rate, 0) * 100) / 100,
          keepsServed: [],
          energySaved: 0,
          sentence: tradeSentence(above, [], null, floor.tariff.currency),
        }
      : null,
    ...why,
  };
}

/** The targets a published plan was made under, to re-plan its night under the same ones. */
export function targetsOf(result: PlanResult): DemandTarget[] | null {
  const peaks = result.target?.peaks;
  if (!peaks?.length) return null;
  return peaks.map((p) => ({ name: p.name, kw: p.targetKw, peakSoFarKw: 0, rate: p.rate ?? 0 }));
}
