import { timeAt } from '@nightyard/contracts/depot-time';

const CLOCK = /^(\d{1,2}):(\d{2})(?::\d{2})?$/;

/** A pull-out time as the API gives it: a wall-clock "HH:MM" in the depot, or an ISO instant. */
export function formatClock(value: string | null, timeZone: string): string | null {
  if (!value) return null;
  const clock = CLOCK.exec(value);
  if (clock) return `${clock[1]!.padStart(2, '0')}:${clock[2]}`;
  return timeAt(value, timeZone);
}

/** A calendar date "YYYY-MM-DD" as "Tuesday, 1 December 2026" (no time-zone shift). */
export function formatServiceDay(isoDate: string): string {
  const [y, m, d] = isoDate.split('-').map(Number);
  if (!y || !m || !d) return isoDate;
  return new Intl.DateTimeFormat(undefined, {
    weekday: 'long',
    day: 'numeric',
    month: 'long',
    year: 'numeric',
    timeZone: 'UTC',
  }).format(new Date(Date.UTC(y, m - 1, d)));
}

export function formatKw(kw: number): string {
  return `${new Intl.NumberFormat(undefined, { maximumFractionDigits: 1 }).format(kw)} kW`;
}
