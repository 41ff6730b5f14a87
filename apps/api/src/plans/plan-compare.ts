import { DateTime } from 'luxon';
import type { PlanResult } from '@nightyard/contracts';

/**
 * The buses whose plug-ins differ between two plans of a night, each with its plug-ins before and
 * after in words ("C2 16:30-23:15"). Compared by the instants, not by the words: a plug-in a whole
 * day later is a change. A horizon longer than a day (a weekend) names the day ("Sat 06:30").
 */
export function movedBetween(
  before: Pick<PlanResult, 'sessions' | 'buses'>,
  after: Pick<PlanResult, 'sessions' | 'buses'>,
  zone: string,
  longHorizon: boolean,
): { bus: string; before: string; after: string }[] {
  const format = longHorizon ? 'ccc HH:mm' : 'HH:mm';
  const sessionsOf = (r: Pick<PlanResult, 'sessions'>, bus: string) => r.sessions.filter((s) => s.bus === bus);
  const describe = (r: Pick<PlanResult, 'sessions'>, bus: string) =>
    sessionsOf(r, bus)
      .map(
        (s) =>
          `${s.charger} ${DateTime.fromISO(s.start, { zone }).toFormat(format)}-${DateTime.fromISO(s.end, { zone }).toFormat(format)}`,
      )
      .join(', ') || 'not plugged in';
  const key = (r: Pick<PlanResult, 'sessions'>, bus: string) =>
    sessionsOf(r, bus)
      .map((s) => `${s.charger}@${Date.parse(s.start)}-${Date.parse(s.end)}`)
      .join(',');
  const buses = [...new Set([...before.buses.map((x) => x.id), ...after.buses.map((x) => x.id)])].sort();
  return buses
    .filter((bus) => key(before, bus) !== key(after, bus))
    .map((bus) => ({ bus, before: describe(before, bus), after: describe(after, bus) }));
}
