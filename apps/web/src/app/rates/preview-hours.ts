import type { RatePreview } from '@nightyard/contracts';
import { timeAt, zoneName } from '@nightyard/contracts/depot-time';

/** The part of an hour at one price (an hour has several parts when a window starts mid-hour). */
export interface HourPart {
  from: string;
  period: string;
  price: number;
  demandCharge: number;
  minutes: number;
}

/** One clock hour of a previewed day. A 23- or 25-hour day has 23 or 25 of them. */
export interface PreviewHour {
  start: number;
  /** "16:00–17:00", with the zone's short name when the clock repeats the hour ("01:00–02:00 CDT"). */
  label: string;
  /** Start clock time only, for the chart's axis ("01:00 CST" on a repeated hour). */
  short: string;
  parts: HourPart[];
  /** The part covering most of the hour: its period colours the chart. */
  main: HourPart;
}

const HOUR = 3_600_000;

/** Minutes ahead of UTC at an instant in the zone (from the zone's "GMT-05:00" name). */
function offsetIn(timeZone: string): (ms: number) => number {
  try {
    const f = new Intl.DateTimeFormat('en-US', { timeZone, timeZoneName: 'longOffset' });
    return (ms) => {
      const name = f.formatToParts(ms).find((p) => p.type === 'timeZoneName')?.value ?? '';
      const m = /GMT([+-])(\d{2}):?(\d{2})?/.exec(name);
      return m ? (m[1] === '-' ? -1 : 1) * (Number(m[2]) * 60 + Number(m[3] ?? 0)) : 0;
    };
  } catch {
    return () => 0;
  }
}

/**
 * Splits the preview's price runs into the clock hours of the day, stepping in absolute time so
 * the spring-forward day has 23 hours and the fall-back day 25 (its repeated hour named twice,
 * with the zone's abbreviation).
 */
export function previewHours(preview: RatePreview, timeZone: string): PreviewHour[] {
  const runs = preview.intervals.map((i) => ({ ...i, s: Date.parse(i.start), e: Date.parse(i.end) }));
  if (!runs.length) return [];
  const dayStart = runs[0]!.s;
  const dayEnd = runs.at(-1)!.e;
  const clock = (ms: number) => timeAt(ms, timeZone);
  const zone = (ms: number) => zoneName(timeZone, ms);
  const offset = offsetIn(timeZone);
  // The end of an hour as the clock on the wall reads it; when the clocks go back, the end of
  // the first 01:00 hour is read on the clock it started on (02:00 CDT, not 01:00 CST).
  const endClock = (start: number, end: number) => {
    if (end === dayEnd) return '24:00';
    const plain = clock(end);
    if (plain > clock(start)) return plain;
    return new Date(end + offset(start) * 60_000).toISOString().slice(11, 16);
  };
  const hours: PreviewHour[] = [];
  for (let t = dayStart; t < dayEnd; t += HOUR) {
    const end = Math.min(t + HOUR, dayEnd);
    const parts: HourPart[] = runs
      .filter((r) => r.s < end && r.e > t)
      .map((r) => ({
        from: clock(Math.max(r.s, t)),
        period: r.period,
        price: r.price,
        demandCharge: r.demandCharge,
        minutes: Math.round((Math.min(r.e, end) - Math.max(r.s, t)) / 60_000),
      }));
    const main = parts.reduce((a, b) => (b.minutes > a.minutes ? b : a), parts[0]!);
    hours.push({ start: t, label: `${clock(t)}–${endClock(t, end)}`, short: clock(t), parts, main });
  }
  // The fall-back day shows one clock hour twice: tell them apart by the zone's name.
  const seen = new Map<string, number>();
  for (const h of hours) seen.set(h.short, (seen.get(h.short) ?? 0) + 1);
  for (const h of hours) {
    if ((seen.get(h.short) ?? 0) > 1) {
      const name = zone(h.start);
      h.label = `${h.label} ${name}`;
      h.short = `${h.short} ${name}`;
    }
  }
  return hours;
}
