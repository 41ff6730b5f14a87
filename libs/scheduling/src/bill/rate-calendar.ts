import { DateTime } from 'luxon';
import { seasonMonths, windowMinutes, type DayType, type RatePlanDefinition, type Season } from '@nightyard/contracts';

export const SLOT_MINUTES = 15;

export interface PricedSlot {
  /** Start of the slot (an absolute instant, shown in the depot's zone). */
  start: DateTime;
  season: string;
  period: string;
  price: number;
  demandCharge: number;
  offPeak: boolean;
}

export function dayTypeOf(day: DateTime, holidays: readonly string[]): DayType {
  if (holidays.includes(day.toISODate()!)) return 'holiday';
  return day.weekday >= 6 ? 'weekend' : 'weekday';
}

export function seasonOf(def: RatePlanDefinition, month: number): Season {
  const season = def.seasons.find((s) => seasonMonths(s).includes(month));
  if (!season) throw new Error(`No season covers month ${month}`);
  return season;
}

/**
 * The period in force at a local wall-clock time. A window belongs to the day it starts on; a
 * window of the previous day that runs past midnight applies only where no window of the day
 * itself does.
 */
export function ratePlanPeriodAt(def: RatePlanDefinition, local: DateTime): Omit<PricedSlot, 'start'> {
  const minute = local.hour * 60 + local.minute;
  const candidates: [DateTime, number][] = [
    [local.startOf('day'), minute],
    [local.startOf('day').minus({ days: 1 }), minute + 1440],
  ];
  for (const [day, m] of candidates) {
    const season = seasonOf(def, day.month);
    const dayType = dayTypeOf(day, def.holidays);
    for (const p of season.periods) {
      for (const w of p.windows) {
        if (!w.dayTypes.includes(dayType)) continue;
        const [a, b] = windowMinutes(w);
        if (m >= a && m < b) {
          return { season: season.name, period: p.name, price: p.price, demandCharge: p.demandCharge, offPeak: false };
        }
      }
    }
  }
  const season = seasonOf(def, local.month);
  return { season: season.name, period: 'off-peak', price: season.offPeakPrice, demandCharge: 0, offPeak: true };
}

/** Every 15-minute slot from `start` (inclusive) to `end` (exclusive), clock changes included. */
export function pricedSlots(def: RatePlanDefinition, start: DateTime, end: DateTime): PricedSlot[] {
  const out: PricedSlot[] = [];
  // Step in absolute time so a 23- or 25-hour day gets 92 or 100 slots.
  for (let t = start; t < end; t = t.plus({ minutes: SLOT_MINUTES })) {
    out.push({ start: t, ...ratePlanPeriodAt(def, t) });
  }
  return out;
}

/** One local calendar day's slots, from its midnight to the next. */
export function daySlots(def: RatePlanDefinition, isoDate: string, zone: string): PricedSlot[] {
  const start = DateTime.fromISO(isoDate, { zone }).startOf('day');
  return pricedSlots(def, start, start.plus({ days: 1 }));
}
