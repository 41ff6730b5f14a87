/**
 * Time at the depot, one module for the API, the web app and the night model: every instant shown
 * is written on the depot's wall clock (its IANA zone), 24-hour, whatever zone the reader is in;
 * every "today" is the depot's date (`depotDate(now, zone)`); calendar dates move with `addDays`.
 * Pure functions on Intl (no zod, no luxon: the web app's first download may import it): "now"
 * comes from the API's `deps.clock` or the web app's `Clock` and is passed in.
 */

export type Instant = string | number | Date;

const toMs = (at: Instant): number =>
  typeof at === 'number' ? at : typeof at === 'string' ? Date.parse(at) : at.getTime();

const formatters = new Map<string, Intl.DateTimeFormat>();

/** One cached formatter per zone and pattern; an unknown zone falls back to UTC rather than throw. */
function formatter(
  kind: string,
  locale: string | undefined,
  options: Intl.DateTimeFormatOptions,
  timeZone: string,
): Intl.DateTimeFormat {
  const key = `${kind}|${timeZone}`;
  let f = formatters.get(key);
  if (!f) {
    try {
      f = new Intl.DateTimeFormat(locale, { ...options, timeZone });
    } catch {
      f = new Intl.DateTimeFormat(locale, { ...options, timeZone: 'UTC' });
    }
    formatters.set(key, f);
  }
  return f;
}

const CLOCK_OPTIONS: Intl.DateTimeFormatOptions = { hour: '2-digit', minute: '2-digit', hourCycle: 'h23' };

function format(
  at: Instant,
  timeZone: string,
  kind: string,
  options: Intl.DateTimeFormatOptions,
  locale?: string,
): string {
  const ms = toMs(at);
  if (Number.isNaN(ms)) return String(at);
  return formatter(kind, locale, options, timeZone).format(ms);
}

/** "21:30" at the depot. */
export function timeAt(at: Instant, timeZone: string): string {
  return format(at, timeZone, 'time', CLOCK_OPTIONS, 'en-GB');
}

/** "Wed" at the depot. */
export function weekdayAt(at: Instant, timeZone: string): string {
  return format(at, timeZone, 'weekday', { weekday: 'short' });
}

/** "Wed 21:30" at the depot (a night spans two days). */
export function weekdayTimeAt(at: Instant, timeZone: string): string {
  return `${weekdayAt(at, timeZone)} ${timeAt(at, timeZone)}`;
}

/** "Tue, Dec 1" (in the viewer's language) at the depot. */
export function dayAt(at: Instant, timeZone: string): string {
  return format(at, timeZone, 'day', { weekday: 'short', day: 'numeric', month: 'short' });
}

/** "Tue, Dec 1, 21:30" at the depot. */
export function dayTimeAt(at: Instant, timeZone: string): string {
  return format(at, timeZone, 'day-time', { weekday: 'short', day: 'numeric', month: 'short', ...CLOCK_OPTIONS });
}

/** "Dec 1, 2026, 21:30" at the depot (a moment that may lie months back). */
export function dateTimeAt(at: Instant, timeZone: string): string {
  return format(at, timeZone, 'date-time', { day: 'numeric', month: 'short', year: 'numeric', ...CLOCK_OPTIONS });
}

/**
 * "Friday, December 4, 2026": a night's date (YYYY-MM-DD) as e-mails name it, the way the screens
 * do in US English (a server does not know its reader's language).
 */
export function longDate(date: string): string {
  const ms = Date.parse(`${date}T12:00:00Z`);
  if (Number.isNaN(ms)) return date;
  return format(ms, 'UTC', 'long-date', { weekday: 'long', day: 'numeric', month: 'long', year: 'numeric' }, 'en-US');
}

/** The depot's wall clock at an instant: `{ date: 'YYYY-MM-DD', time: 'HH:mm', hour }`. */
export function depotParts(at: Instant, timeZone: string): { date: string; time: string; hour: number } {
  const options: Intl.DateTimeFormatOptions = { year: 'numeric', month: '2-digit', day: '2-digit', ...CLOCK_OPTIONS };
  const ms = toMs(at);
  if (Number.isNaN(ms)) return { date: '', time: '', hour: 0 };
  const parts = Object.fromEntries(
    formatter('parts', 'en-CA', options, timeZone)
      .formatToParts(ms)
      .map((p) => [p.type, p.value]),
  );
  const hour = Number(parts['hour']) % 24;
  return {
    date: `${parts['year']}-${parts['month']}-${parts['day']}`,
    time: `${String(hour).padStart(2, '0')}:${parts['minute']}`,
    hour,
  };
}

/**
 * Whether the depot's clock is past midnight, in the night's morning (before noon): a time of day
 * earlier than now has passed, where in the evening it means tomorrow morning.
 */
export function pastMidnightAt(at: Instant, timeZone: string): boolean {
  return depotParts(at, timeZone).hour < 12;
}

/** The depot's date at an instant, `YYYY-MM-DD`: "today at the depot" with the Clock's now. */
export function depotDate(at: Instant, timeZone: string): string {
  return depotParts(at, timeZone).date;
}

/** An instant at the depot as `YYYY-MM-DD HH:mm` (CSV files, read back by machines). */
export function depotStamp(at: Instant, timeZone: string): string {
  const p = depotParts(at, timeZone);
  return `${p.date} ${p.time}`;
}

/** The zone's short name at an instant: "CST", "CDT", "GMT+1". */
export function zoneName(timeZone: string, at: Instant): string {
  const ms = toMs(at);
  const parts = formatter('zone', 'en-US', { timeZoneName: 'short' }, timeZone).formatToParts(
    Number.isNaN(ms) ? 0 : ms,
  );
  return parts.find((p) => p.type === 'timeZoneName')?.value ?? timeZone;
}

/** "21:30 CST": a time with the depot zone's name, for a reader who is elsewhere. */
export function timeWithZone(at: Instant, timeZone: string): string {
  return `${timeAt(at, timeZone)} ${zoneName(timeZone, at)}`;
}

/** The browser's own time zone. */
export function viewerTimeZone(): string {
  try {
    return Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC';
  } catch {
    return 'UTC';
  }
}

function canonical(timeZone: string): string {
  try {
    return new Intl.DateTimeFormat('en-US', { timeZone }).resolvedOptions().timeZone;
  } catch {
    return timeZone;
  }
}

/**
 * The one line a page shows when the viewer is in another zone than the depot, so its times are
 * read as the depot's: "Times are at the depot: America/Chicago (CST), 24-hour." Null when the
 * zones are the same.
 */
export function zoneNote(depotZone: string, viewerZone: string, at: Instant): string | null {
  if (canonical(depotZone) === canonical(viewerZone)) return null;
  return `Times are at the depot: ${depotZone} (${zoneName(depotZone, at)}), 24-hour.`;
}

// ---------------------------------------------------------------------------------------------
// Calendar dates (`YYYY-MM-DD`, no zone: a service day is a date at the depot)

export const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/;

export function isIsoDate(value: unknown): value is string {
  return typeof value === 'string' && ISO_DATE.test(value) && !Number.isNaN(Date.parse(`${value}T00:00:00Z`));
}

/** A calendar date moved by whole days. */
export function addDays(isoDate: string, days: number): string {
  if (!isIsoDate(isoDate)) return isoDate;
  const d = new Date(`${isoDate}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

// ---------------------------------------------------------------------------------------------
// Times typed in forms: `HH:mm`, 24-hour

export const CLOCK_TIME = /^([01]\d|2[0-3]):[0-5]\d$/;
export const CLOCK_TIME_MESSAGE = 'Write the time as HH:mm, 24-hour (for example 21:30)';

/** "9:05", "0905", "21.30" as typed, written `HH:mm`; null when it is no time of day. */
export function normaliseClockTime(value: string): string | null {
  const m = /^\s*(\d{1,2})[:.h]?(\d{2})\s*$/.exec(value);
  if (!m) return null;
  const text = `${m[1]!.padStart(2, '0')}:${m[2]}`;
  return CLOCK_TIME.test(text) ? text : null;
}
