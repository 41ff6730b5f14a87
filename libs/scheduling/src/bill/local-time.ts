import { Info, type Zone } from 'luxon';

// Wall-clock fields of an instant in a zone, for the loops that classify thousands of quarter
// hours (a billing period's bills, forecasts and peaks). Luxon asks Intl for the zone's offset on
// every DateTime it makes (formatToParts, about 40 µs), which was most of a cold month's costs
// request. Here the offset is asked once per zone and quarter hour and remembered: every clock
// change of the current zone database falls on a quarter hour (common practice of the rules), and
// a quarter hour whose two ends disagree is not remembered but asked each time.

const QUARTER_MS = 15 * 60_000;
const MAX_REMEMBERED = 400_000;
const offsets = new Map<string, Map<number, number>>();
const zones = new Map<string, Zone>();
let remembered = 0;

function zoneOf(name: string): Zone {
  let zone = zones.get(name);
  if (!zone) {
    // As luxon reads a zone option: an IANA name, "utc", "UTC+3"...
    zone = Info.normalizeZone(name);
    if (!zone.isValid) throw new RangeError(`Unknown time zone: ${name}`);
    if (zones.size > 1000) zones.clear();
    zones.set(name, zone);
  }
  return zone;
}

/** The zone's offset from UTC (minutes) at `ms`. */
export function offsetMinutes(zone: string, ms: number): number {
  let byQuarter = offsets.get(zone);
  if (!byQuarter) offsets.set(zone, (byQuarter = new Map()));
  const q = Math.floor(ms / QUARTER_MS);
  let offset = byQuarter.get(q);
  if (offset === undefined) {
    const z = zoneOf(zone);
    const a = z.offset(q * QUARTER_MS);
    offset = a === z.offset(q * QUARTER_MS + QUARTER_MS - 1) ? a : NaN;
    if (++remembered > MAX_REMEMBERED) {
      offsets.clear();
      remembered = 0;
      offsets.set(zone, byQuarter);
    }
    byQuarter.set(q, offset);
  }
  return Number.isNaN(offset) ? zoneOf(zone).offset(ms) : offset;
}

export interface LocalParts {
  year: number;
  /** 1-12 */
  month: number;
  day: number;
  /** ISO weekday: 1 Monday to 7 Sunday. */
  weekday: number;
  hour: number;
  minute: number;
  /** yyyy-MM-dd */
  isoDate: string;
}

/** A calendar date's fields (no zone: a date is a date), from its year, month and day. */
export function calendarDate(year: number, month: number, day: number): Omit<LocalParts, 'hour' | 'minute'> {
  const d = new Date(Date.UTC(year, month - 1, day));
  const y = d.getUTCFullYear();
  const m = d.getUTCMonth() + 1;
  const dd = d.getUTCDate();
  const yyyy = y >= 0 && y < 10_000 ? String(y).padStart(4, '0') : String(y);
  return {
    year: y,
    month: m,
    day: dd,
    weekday: ((d.getUTCDay() + 6) % 7) + 1,
    isoDate: `${yyyy}-${String(m).padStart(2, '0')}-${String(dd).padStart(2, '0')}`,
  };
}

/** The wall-clock fields of the instant `ms` in `zone`. */
export function localParts(ms: number, zone: string): LocalParts {
  const d = new Date(ms + offsetMinutes(zone, ms) * 60_000);
  return {
    ...calendarDate(d.getUTCFullYear(), d.getUTCMonth() + 1, d.getUTCDate()),
    hour: d.getUTCHours(),
    minute: d.getUTCMinutes(),
  };
}
