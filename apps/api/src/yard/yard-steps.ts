import { DateTime } from 'luxon';
import type { PlanResult, YardStep } from '@nightyard/contracts';

export const stepKey = (action: 'connect' | 'disconnect', bus: string, charger: string, sessionStart: string) =>
  `${action}|${bus}|${charger}|${new Date(sessionStart).toISOString()}`;

/** A step is late when it is this far past its time and nobody has confirmed it. */
export const OVERDUE_AFTER_MS = 10 * 60_000;
/** A bus unplugged by a report is "moved" when its next plug-in is this close; else it waits. */
const MOVE_WITHIN_MS = 30 * 60_000;

export interface StepConfirmation {
  at: Date;
  by: string | null;
  /** `missed`: the yard said the step did not happen. Absent: done. */
  outcome?: 'done' | 'missed';
}

/** What else the steps are derived from: the depot's zone and the chargers reported out tonight. */
export interface StepContext {
  zone: string;
  chargersOut: readonly { charger: string; at: Date; reason: string | null }[];
}

const hhmm = (iso: string, zone: string) => DateTime.fromISO(iso, { zone }).toFormat('HH:mm');

/**
 * The yard's steps, the one place they are derived: from the plan, the confirmations and the
 * reports. The Yard card, the timeline's step list, the run sheets and the revision e-mail all
 * read these, so they cannot disagree.
 *
 * Connect at each session's start, disconnect at its end. A session that ends at the instant its
 * charger was reported out of service (the re-plan stops it there, see `stopSessions`) ends with an
 * "unplug now" step naming where the bus goes next (the re-plan's next session for the bus) or
 * that it waits. Keys use the session's start, so a session kept by a revision keeps its
 * confirmations.
 */
export function yardSteps(
  result: PlanResult, now: Date, confirmations: Map<string, StepConfirmation>, context: StepContext = { zone: 'UTC', chargersOut: [] },
): YardStep[] {
  const steps: YardStep[] = [];
  const byBus = new Map<string, PlanResult['sessions']>();
  for (const s of result.sessions) byBus.set(s.bus, [...(byBus.get(s.bus) ?? []), s]);
  for (const list of byBus.values()) list.sort((a, b) => Date.parse(a.start) - Date.parse(b.start));
  // A disconnect that did not happen leaves the bus on its charger: its next plug-in there is a "keep".
  const stillOn = new Set<string>();
  for (const [key, c] of confirmations) {
    if (c.outcome !== 'missed' || !key.startsWith('disconnect|')) continue;
    const [, bus, charger] = key.split('|');
    stillOn.add(`${bus}|${charger}`);
  }

  for (const s of result.sessions) {
    const kwh = Math.round(s.kw.reduce((a, b) => a + b * 0.25, 0) * 10) / 10;
    const end = Date.parse(s.end);
    const out = context.chargersOut.find((o) => o.charger === s.charger && o.at.getTime() === end && Date.parse(s.start) < end);
    for (const action of ['connect', 'disconnect'] as const) {
      const key = stepKey(action, s.bus, s.charger, s.start);
      const at = action === 'connect' ? s.start : s.end;
      const done = confirmations.get(key);
      let text = action === 'connect' ? `Connect bus ${s.bus} to charger ${s.charger}` : `Disconnect bus ${s.bus} from charger ${s.charger}`;
      let reason: string | null = null;
      let moveTo: YardStep['moveTo'] = null;
      if (action === 'connect') {
        const before = byBus.get(s.bus)!.filter((x) => Date.parse(x.start) < Date.parse(s.start)).at(-1);
        if (stillOn.has(`${s.bus}|${s.charger}`) && before?.charger === s.charger) text = `Keep bus ${s.bus} on charger ${s.charger} (it was not unplugged)`;
      }
      if (action === 'disconnect' && out) {
        reason = `Charger ${s.charger} out of service${out.reason ? ` (${out.reason})` : ''}`;
        const following = byBus.get(s.bus)!.find((x) => Date.parse(x.start) >= end);
        moveTo = { charger: following?.charger ?? null, at: following?.start ?? null };
        const then = !following
          ? 'then leave it unplugged: no more charging is planned for it tonight'
          : Date.parse(following.start) - end <= MOVE_WITHIN_MS
            ? `then move it to charger ${following.charger} for ${hhmm(following.start, context.zone)}`
            : `then wait: no charger is free for it until ${hhmm(following.start, context.zone)} (charger ${following.charger})`;
        text = `Unplug bus ${s.bus} from charger ${s.charger} now (out of service), ${then}`;
      }
      steps.push({
        key, action, bus: s.bus, charger: s.charger, at, kwh,
        status: done ? (done.outcome === 'missed' ? 'missed' : 'done') : Date.parse(at) + OVERDUE_AFTER_MS < now.getTime() ? 'overdue' : 'upcoming',
        confirmedAt: done && done.outcome !== 'missed' ? done.at.toISOString() : null,
        confirmedBy: done?.by ?? null,
        text, reason, moveTo,
      });
    }
  }
  return steps.sort((a, b) => Date.parse(a.at) - Date.parse(b.at) || (a.action === 'disconnect' ? -1 : 1));
}

/** Steps due now or within the next `withinMs` (not overdue, not done), in time order. */
export function stepsDueSoon(steps: readonly YardStep[], now: Date, withinMs = 60 * 60_000): YardStep[] {
  return steps.filter((s) => s.status === 'upcoming' && Date.parse(s.at) <= now.getTime() + withinMs);
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
