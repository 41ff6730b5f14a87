import type { PlanResult, YardStep } from '@nightyard/contracts';

export const stepKey = (action: 'connect' | 'disconnect', bus: string, charger: string, sessionStart: string) =>
  `${action}|${bus}|${charger}|${new Date(sessionStart).toISOString()}`;

/** A step is late when it is this far past its time and nobody has confirmed it. */
const OVERDUE_AFTER_MS = 10 * 60_000;

/**
 * The yard's steps from a plan: connect at each session's start, disconnect at its end. Keys use
 * the session's start, so a session kept by a revision keeps its confirmations.
 */
export function yardSteps(
  result: PlanResult, now: Date, confirmations: Map<string, { at: Date; by: string | null }>,
): YardStep[] {
  const steps: YardStep[] = [];
  for (const s of result.sessions) {
    const kwh = Math.round(s.kw.reduce((a, b) => a + b * 0.25, 0) * 10) / 10;
    for (const action of ['connect', 'disconnect'] as const) {
      const key = stepKey(action, s.bus, s.charger, s.start);
      const at = action === 'connect' ? s.start : s.end;
      const done = confirmations.get(key);
      steps.push({
        key, action, bus: s.bus, charger: s.charger, at, kwh,
        status: done ? 'done' : Date.parse(at) + OVERDUE_AFTER_MS < now.getTime() ? 'overdue' : 'upcoming',
        confirmedAt: done?.at.toISOString() ?? null,
        confirmedBy: done?.by ?? null,
      });
    }
  }
  return steps.sort((a, b) => Date.parse(a.at) - Date.parse(b.at) || (a.action === 'disconnect' ? -1 : 1));
}

/** Merges the previous plan's kept part with the re-plan, joining a session cut at the cut-off. */
export function mergeSessions(kept: PlanResult['sessions'], next: PlanResult['sessions']): PlanResult['sessions'] {
  const out = kept.map((s) => ({ ...s, kw: [...s.kw] }));
  for (const s of next) {
    const join = out.find((k) => k.bus === s.bus && k.charger === s.charger && Date.parse(k.end) === Date.parse(s.start));
    if (join) {
      join.end = s.end;
      join.kw.push(...s.kw);
      join.kwh = Math.round((join.kwh + s.kwh) * 1e6) / 1e6;
    } else out.push({ ...s, kw: [...s.kw] });
  }
  return out.sort((a, b) => Date.parse(a.start) - Date.parse(b.start));
}
