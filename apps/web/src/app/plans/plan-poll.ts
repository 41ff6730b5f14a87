import type { PlanDetail } from '@nightyard/contracts';
import { type ObservableInput, defer, repeat, retry, switchMap, takeWhile, timer } from 'rxjs';

/** How often a plan being generated is asked for its progress. */
export const POLL_MS = 700;

export const isGenerating = (p: Pick<PlanDetail, 'status'>): boolean => p.status === 'queued' || p.status === 'running';

/**
 * A plan's progress, asked every `everyMs` until the engine is done with it (the last answer,
 * done or failed, is the stream's last value). A failed request is asked again after three waits.
 */
export function pollPlan(fetch: () => ObservableInput<PlanDetail>, everyMs = POLL_MS) {
  return timer(everyMs).pipe(
    switchMap(() => defer(fetch)),
    retry({ delay: () => timer(everyMs * 2) }),
    repeat(),
    takeWhile((d: PlanDetail) => isGenerating(d), true),
  );
}
