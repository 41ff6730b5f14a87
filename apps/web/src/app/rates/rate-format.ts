import { MONTH_NAMES, type DayType, type TouWindow } from '@nightyard/contracts';

export { MONTH_NAMES };

export const DAY_TYPE_LABELS: Record<DayType, string> = {
  weekday: 'Weekdays',
  weekend: 'Weekends',
  holiday: 'Holidays',
};
export const DAY_TYPE_ONE: Record<DayType, string> = { weekday: 'weekday', weekend: 'weekend day', holiday: 'holiday' };

function currencyFormat(currency: string, min: number, max: number): Intl.NumberFormat {
  try {
    return new Intl.NumberFormat(undefined, {
      style: 'currency',
      currency,
      minimumFractionDigits: min,
      maximumFractionDigits: max,
    });
  } catch {
    return new Intl.NumberFormat(undefined, { minimumFractionDigits: min, maximumFractionDigits: max });
  }
}

/** An energy price: enough digits for tariffs quoted to a tenth of a cent or finer ("$0.2854"). */
export function formatPrice(value: number, currency: string): string {
  return currencyFormat(currency, 2, 5).format(value);
}

/** A demand or fixed charge ("$14.25"). */
export function formatMoney(value: number, currency: string): string {
  return currencyFormat(currency, 2, 2).format(value);
}

/** "June to September", "All year" or "October to May". */
export function monthRange(fromMonth: number, toMonth: number): string {
  if (toMonth === ((fromMonth + 10) % 12) + 1) return 'All year';
  const from = MONTH_NAMES[fromMonth - 1] ?? String(fromMonth);
  const to = MONTH_NAMES[toMonth - 1] ?? String(toMonth);
  return fromMonth === toMonth ? from : `${from} to ${to}`;
}

const minutes = (t: string) => Number(t.slice(0, 2)) * 60 + Number(t.slice(3, 5));

/** How a window's end reads: "runs past midnight" when it ends the next day, "until midnight" at 00:00/24:00. */
export function windowEndNote(from: string, to: string): string | null {
  if (!/^\d{2}:\d{2}$/.test(from) || !/^\d{2}:\d{2}$/.test(to)) return null;
  if (to === '00:00' || to === '24:00') return 'until midnight';
  return minutes(to) < minutes(from) ? 'runs past midnight' : null;
}

/** "Weekdays, 16:00 to 21:00" ("... to 06:00 next day, runs past midnight"). */
export function describeWindow(w: TouWindow): string {
  const days = w.dayTypes.map((d) => DAY_TYPE_LABELS[d]).join(', ');
  const note = windowEndNote(w.from, w.to);
  return `${days}, ${w.from} to ${w.to}${note === 'runs past midnight' ? ' next day (runs past midnight)' : ''}`;
}
