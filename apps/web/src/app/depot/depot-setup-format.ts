import { dateTimeAt } from '@nightyard/contracts/depot-time';
import { formatKw } from '../depot-state/depot-format';

export { formatKw };

/** "00:00" ... "23:00": the local hours of an other-load profile. */
export const HOUR_LABELS: readonly string[] = Array.from({ length: 24 }, (_, h) => `${String(h).padStart(2, '0')}:00`);

/** An instant (ISO with offset) as a date and time at the depot. */
export function formatInstant(iso: string | null, timeZone: string): string | null {
  return iso ? dateTimeAt(iso, timeZone) : null;
}

/** A local wall-clock time `YYYY-MM-DDTHH:mm` as "Wed 3 Dec 2026, 16:00" (no time-zone shift). */
export function formatLocal(local: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(local);
  if (!m) return local;
  const at = new Date(Date.UTC(+m[1]!, +m[2]! - 1, +m[3]!, +m[4]!, +m[5]!));
  return new Intl.DateTimeFormat(undefined, {
    weekday: 'short',
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
    timeZone: 'UTC',
  }).format(at);
}

/** A calendar date `YYYY-MM-DD` as "1 Dec 2026" (no time-zone shift). */
export function formatDate(isoDate: string): string {
  const [y, m, d] = isoDate.split('-').map(Number);
  if (!y || !m || !d) return isoDate;
  return new Intl.DateTimeFormat(undefined, {
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    timeZone: 'UTC',
  }).format(new Date(Date.UTC(y, m - 1, d)));
}

/** Every IANA zone the browser knows, UTC included. */
export function timeZones(): string[] {
  const known = typeof Intl.supportedValuesOf === 'function' ? Intl.supportedValuesOf('timeZone') : [];
  return known.includes('UTC') ? known : [...known, 'UTC'];
}
