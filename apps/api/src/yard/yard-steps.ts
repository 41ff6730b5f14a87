import { DateTime } from 'luxon';
import type { PlanResult, YardStep } from '@nightyard/contracts';

export const stepKey = (action: 'connect' | 'disconnect', bus: string, charger: string, sessionStart: string) =>
  `${action}|${bus}|${charger}|${new Date(sessionStart).toISOString()}`;

/** A step is late when it is this far past its time and nobody has confirmed it. */
export const OVERDUE_AFTER_MS = 10 * 60_000;
/** A bus unplugged by a report is "moved" when its next plug-in is this close; else it waits. */
const MOVE_WITHIN_MS = 30 * 60_000;
const SLOT_MS = 15 * 60_000;

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
  result: PlanResult,
  now: Date,
  confirmations: Map<string, StepConfirmation>,
  context: StepContext = { zone: 'UTC', chargersOut: [] },
): YardStep[] {
  const steps: YardStep[] = [];
  const byBus = new Map<string, PlanResult['sessions']>();
  for (const s of result.sessions) byBus.set(s.bus, [...(byBus.get(s.bus) ?? []), s]);
  for (const list of byBus.values()) list.sort((a, b) => Date.parse(a.start) - Date.parse(b.start));
  // A disconnect that did not happen leaves the bus on its charger: its next plug-in there is a "keep".
  // (A plug-in there within a slot of when that was said, that is; a later one is a new plug-in.)
  const stillOn = new Map<string, number>();
  for (const [key, c] of confirmations) {
    if (c.outcome !== 'missed' || !key.startsWith('disconnect|') || key.endsWith(LATE)) continue;
    const [, bus, charger] = key.split('|');
    stillOn.set(`${bus}|${charger}`, c.at.getTime());
  }
  const continues = (bus: string, charger: string, start: string) => {
    const since = stillOn.get(`${bus}|${charger}`);
    return since !== undefined && Math.abs(Date.parse(start) - since) <= SLOT_MS;
  };

  for (const s of result.sessions) {
    const kwh = Math.round(s.kw.reduce((a, b) => a + b * 0.25, 0) * 10) / 10;
    const end = Date.parse(s.end);
    const out = context.chargersOut.find(
      (o) => o.charger === s.charger && o.at.getTime() === end && Date.parse(s.start) < end,
    );
    for (const action of ['connect', 'disconnect'] as const) {
      const key = stepKey(action, s.bus, s.charger, s.start);
      const at = action === 'connect' ? s.start : s.end;
      const done = confirmations.get(key);
      let text =
        action === 'connect'
          ? `Plug in bus ${s.bus} at charger ${s.charger}`
          : `Unplug bus ${s.bus} from charger ${s.charger}`;
      let reason: string | null = null;
      let moveTo: YardStep['moveTo'] = null;
      if (action === 'connect') {
        if (continues(s.bus, s.charger, s.start))
          text = `Keep bus ${s.bus} on charger ${s.charger} (it was not unplugged)`;
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
      // A forced unplug (charger out) is always the crew's; otherwise the plan says who.
      const by = out && action === 'disconnect' ? 'crew' : ((action === 'connect' ? s.startMove : s.endMove) ?? 'crew');
      steps.push({
        key,
        action,
        by,
        bus: s.bus,
        charger: s.charger,
        at,
        kwh,
        status: done
          ? done.outcome === 'missed'
            ? 'missed'
            : 'done'
          : Date.parse(at) + OVERDUE_AFTER_MS < now.getTime()
            ? 'overdue'
            : 'upcoming',
        confirmedAt: done && done.outcome !== 'missed' ? done.at.toISOString() : null,
        confirmedBy: done?.by ?? null,
        text,
        reason,
        moveTo,
      });
    }
  }
  // A disconnect that did not happen, with no charging planned for the bus there afterwards: the
  // bus is still on the charger and must come off it, from the time that was reported.
  for (const [key, c] of confirmations) {
    if (c.outcome !== 'missed' || !key.startsWith('disconnect|') || key.endsWith(LATE)) continue;
    const [, bus, charger] = key.split('|') as [string, string, string];
    if ((byBus.get(bus) ?? []).some((x) => x.charger === charger && continues(bus, charger, x.start))) continue;
    const late = key + LATE;
    const done = confirmations.get(late);
    steps.push({
      key: late,
      action: 'disconnect',
      by: 'crew',
      bus,
      charger,
      at: c.at.toISOString(),
      kwh: 0,
      status: done ? 'done' : c.at.getTime() + OVERDUE_AFTER_MS < now.getTime() ? 'overdue' : 'upcoming',
      confirmedAt: done?.at.toISOString() ?? null,
      confirmedBy: done?.by ?? null,
      text: `Unplug bus ${bus} from charger ${charger} (it was not unplugged at its time)`,
      reason: 'Not unplugged at its time',
      moveTo: null,
    });
  }
  return steps.sort((a, b) => Date.parse(a.at) - Date.parse(b.at) || (a.action === 'disconnect' ? -1 : 1));
}

/** The key suffix of the disconnect that follows one that did not happen. */
export const LATE = '|late';

/** Steps due now or within the next `withinMs` (not overdue, not done), in time order. */
export function stepsDueSoon(steps: readonly YardStep[], now: Date, withinMs = 60 * 60_000): YardStep[] {
  return steps.filter((s) => s.status === 'upcoming' && Date.parse(s.at) <= now.getTime() + withinMs);
}

/** Merges the previous plan's kept part with the re-plan, joining a session cut at the cut-off. */
export function mergeSessions(kept: PlanResult['sessions'], next: PlanResult['sessions']): PlanResult['sessions'] {
  const out = kept.map((s) => ({ ...s, kw: [...s.kw] }));
  for (const s of next) {
    const join = out.find(
      (k) => k.bus === s.bus && k.charger === s.charger && Date.parse(k.end) === Date.parse(s.start),
    );
    if (join) {
      join.end = s.end;
      if (s.endMove) join.endMove = s.endMove;
      join.kw.push(...s.kw);
      join.kwh = Math.round((join.kwh + s.kwh) * 1e6) / 1e6;
    } else out.push({ ...s, kw: [...s.kw] });
  }
  return out.sort((a, b) => Date.parse(a.start) - Date.parse(b.start));
}
