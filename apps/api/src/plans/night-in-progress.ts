import { DateTime } from 'luxon';
import type { PlanResult } from '@nightyard/contracts';
import { localToMillis, type Plan, type Replan, type Scenario } from '@nightyard/scheduling';
import { runInPool } from '../workers/pool';
import { DomainError } from '../http/errors';
import { mergeSessions } from '../yard/yard-steps';

const LOCAL = "yyyy-MM-dd'T'HH:mm";

/** How a plan for a night already under way is made: from `from` on, the past kept as it was. */
export interface PlanFrom {
  /** Local wall-clock cut-off (the engine starts at the next slot boundary). */
  from: string;
  /** The published plan the night was following, whose sessions before the cut-off stand. */
  previousPlanId: string | null;
  /** Buses the yard confirmed on a charger at the cut-off: they stay there. */
  plugged: Record<string, string>;
}

/**
 * Where a plan for this scenario must start at `now`: null while the night has not begun; the
 * cut-off while it is under way; refused once it is over. Nothing is ever planned in the past.
 */
export function cutOffAt(scenario: Scenario, now: Date): string | null {
  const zone = scenario.timezone;
  const start = localToMillis(scenario.start, zone)!;
  const end = localToMillis(scenario.end, zone)!;
  const t = now.getTime();
  const last = end - scenario.slotMinutes * 60_000;
  if (t >= last) {
    throw new DomainError('validation_failed',
      `That night ended at ${DateTime.fromMillis(end, { zone }).toFormat('ccc d LLL HH:mm')}: plans are for nights still to come`,
      { serviceDate: 'The night is over' });
  }
  return t > start ? DateTime.fromMillis(t, { zone }).toFormat(LOCAL) : null;
}

/** Plans the rest of a night from its cut-off: the engine's re-plan, with the past merged back in. */
export async function planFromCutOff(scenario: Scenario, at: PlanFrom, previous: PlanResult | null): Promise<PlanResult> {
  // The engine runs in a worker thread, like every plan.
  const next = await runInPool({ kind: 'replan', scenario, state: { now: at.from, plugged: at.plugged, ...(previous ? { previous: previous as unknown as Plan } : {}) } });
  return mergeReplan(previous, next);
}

/** The night as a whole: what stood before the re-plan's first slot, then the re-plan. */
export function mergeReplan(previous: PlanResult | null, next: Replan): PlanResult {
  const result = next as unknown as PlanResult;
  if (!previous) return { ...result, replan: { from: next.replan.from, outOfService: next.replan.outOfService, plugged: next.replan.plugged } } as PlanResult;
  const firstNew = Date.parse(next.replan.from);
  const newLoad = new Map(next.slots.map((s) => [Date.parse(s.start), s.loadKw]));
  return {
    ...result,
    slots: previous.slots.map((s) => (Date.parse(s.start) >= firstNew ? { ...s, loadKw: newLoad.get(Date.parse(s.start)) ?? s.loadKw } : s)),
    sessions: mergeSessions(next.replan.kept as PlanResult['sessions'], next.sessions as unknown as PlanResult['sessions']),
    replan: { from: next.replan.from, outOfService: next.replan.outOfService, plugged: next.replan.plugged },
  } as PlanResult;
}
