import { toCents, type MonthCosts } from '@nightyard/contracts';
import { addDays, dayTimeAt, depotStamp } from '@nightyard/contracts/depot-time';

/** Formatting for the Costs section: amounts in the rate plan's currency, kW, dates at the depot. */

function currencyFormat(currency: string, min: number, max: number): Intl.NumberFormat {
  try {
    return new Intl.NumberFormat(undefined, {
      style: 'currency',
      currency,
      minimumFractionDigits: min,
      maximumFractionDigits: max,
      // No "-$0.00": a figure that rounds to zero has no sign.
      signDisplay: 'negative',
    });
  } catch {
    return new Intl.NumberFormat(undefined, {
      minimumFractionDigits: min,
      maximumFractionDigits: max,
      signDisplay: 'negative',
    });
  }
}

/** An amount of money ("$1,234.56"). */
export function money(value: number, currency: string): string {
  // Rounded by the one rule first (`toCents`), so a figure reads the same on every page.
  return currencyFormat(currency, 2, 2).format(toCents(value));
}

/** A unit price: enough digits for tariffs quoted to a tenth of a cent ("$0.0685"). */
export function unitPrice(value: number, currency: string): string {
  return currencyFormat(currency, 2, 5).format(value);
}

export function num(value: number, digits = 1): string {
  return new Intl.NumberFormat(undefined, { maximumFractionDigits: digits, signDisplay: 'negative' }).format(value);
}

export function kw(value: number): string {
  return `${num(value)} kW`;
}

export function kwh(value: number): string {
  return `${num(value, 0)} kWh`;
}

export function percent(share: number): string {
  return `${num(share * 100, 1)} %`;
}

function parseDate(iso: string): Date | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(iso);
  return m ? new Date(Date.UTC(+m[1]!, +m[2]! - 1, +m[3]!)) : null;
}

function isoOf(d: Date): string {
  return d.toISOString().slice(0, 10);
}

/** A calendar date `months` on, the day kept (or the month's last day when it has fewer). */
export function addMonths(iso: string, months: number): string {
  const d = parseDate(iso);
  if (!d) return iso;
  const day = d.getUTCDate();
  const target = new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + months, 1));
  const last = new Date(Date.UTC(target.getUTCFullYear(), target.getUTCMonth() + 1, 0)).getUTCDate();
  target.setUTCDate(Math.min(day, last));
  return isoOf(target);
}

/** "Wed 2 Dec" (a night in a table). */
export function shortDay(iso: string): string {
  const d = parseDate(iso);
  if (!d) return iso;
  return new Intl.DateTimeFormat(undefined, {
    weekday: 'short',
    day: 'numeric',
    month: 'short',
    timeZone: 'UTC',
  }).format(d);
}

/** "Wednesday, 2 December 2026". */
export function longDay(iso: string): string {
  const d = parseDate(iso);
  if (!d) return iso;
  return new Intl.DateTimeFormat(undefined, {
    weekday: 'long',
    day: 'numeric',
    month: 'long',
    year: 'numeric',
    timeZone: 'UTC',
  }).format(d);
}

/** "2 Dec 2026". */
export function mediumDay(iso: string): string {
  const d = parseDate(iso);
  if (!d) return iso;
  return new Intl.DateTimeFormat(undefined, {
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    timeZone: 'UTC',
  }).format(d);
}

/**
 * A billing period by name: "December 2026" when it runs from the 1st to the month's end, else its
 * days ("15 Nov – 14 Dec 2026"). `end` is the first day of the next period.
 */
export function periodLabel(start: string, end: string): string {
  const s = parseDate(start);
  const e = parseDate(addDays(end, -1));
  if (!s || !e) return `${start} – ${end}`;
  if (s.getUTCDate() === 1 && isoOf(s) === addMonths(end, -1) && end.endsWith('-01')) {
    return new Intl.DateTimeFormat(undefined, { month: 'long', year: 'numeric', timeZone: 'UTC' }).format(s);
  }
  const sameYear = s.getUTCFullYear() === e.getUTCFullYear();
  const from = new Intl.DateTimeFormat(undefined, {
    day: 'numeric',
    month: 'short',
    ...(sameYear ? {} : { year: 'numeric' }),
    timeZone: 'UTC',
  }).format(s);
  return `${from} – ${mediumDay(isoOf(e))}`;
}

/** "2026-12" from a period start, for file names. */
export function monthKey(start: string): string {
  return start.slice(0, 7);
}

/** An instant (ISO string or epoch ms) at the depot: "Wed 2 Dec, 17:15". */
export function instantAt(value: string | number | null, timeZone: string): string | null {
  return value === null ? null : dayTimeAt(value, timeZone);
}

/** An instant at the depot as `YYYY-MM-DD HH:mm`, for CSV files (machines read it back). */
export function instantCsv(value: string | number | null, timeZone: string): string {
  if (value === null) return '';
  return Number.isNaN(new Date(value).getTime()) ? String(value) : depotStamp(value, timeZone);
}

/** A local wall-clock time `YYYY-MM-DDTHH:mm` (as the import reports gaps) as "Wed 2 Dec, 22:00". */
export function localTime(local: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(local);
  if (!m) return local;
  const at = new Date(Date.UTC(+m[1]!, +m[2]! - 1, +m[3]!, +m[4]!, +m[5]!));
  return new Intl.DateTimeFormat(undefined, {
    weekday: 'short',
    day: 'numeric',
    month: 'short',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
    timeZone: 'UTC',
  }).format(at);
}

/** Rounds money for a CSV cell (plain number, cents). */
export function cents(value: number): number {
  return toCents(value);
}

/** An amount with its sign: "+$1.20", "−$0.50", "$0.00". */
export function signedMoney(value: number, currency: string): string {
  try {
    return new Intl.NumberFormat(undefined, {
      style: 'currency',
      currency,
      minimumFractionDigits: 2,
      maximumFractionDigits: 2,
      signDisplay: 'exceptZero',
    }).format(value);
  } catch {
    return `${value > 0 ? '+' : ''}${value.toFixed(2)}`;
  }
}

/** An amount without cents, for a chart's axis ("$8,000"). */
export function wholeMoney(value: number, currency: string): string {
  return currencyFormat(currency, 0, 0).format(value);
}

/**
 * A night whose hours are all metered. Only then are metered and projected costs comparable: the
 * API's metered cost covers the metered intervals only, its projection the whole night.
 */
export function fullyMetered(n: MonthCosts['nights'][number]): boolean {
  return n.actualSiteEnergyCost !== null && n.actualCoverage >= 0.999;
}
