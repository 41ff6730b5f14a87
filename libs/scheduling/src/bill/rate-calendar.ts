import { DateTime } from 'luxon';
import { seasonMonths, windowMinutes, type DayType, type RatePlanDefinition, type Season } from '@nightyard/contracts';
import { calendarDate, localParts, type LocalParts } from './local-time.js';

type CalendarDate = ReturnType<typeof calendarDate>;

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
  return dayTypeOn(day.toISODate()!, day.weekday, holidays);
}

function dayTypeOn(isoDate: string, weekday: number, holidays: readonly string[]): DayType {
  if (holidays.includes(isoDate)) return 'holiday';
  return weekday >= 6 ? 'weekend' : 'weekday';
}

export function seasonOf(def: RatePlanDefinition, month: number): Season {
  const season = def.seasons.find((s) => seasonMonths(s).includes(month));
  if (!season) throw new Error(`No season covers month ${month}`);
  return season;
}

type PeriodAt = Omit<PricedSlot, 'start'>;
/** A local wall-clock time: a luxon DateTime, or `localParts` of an instant. */
type WallClock = Pick<LocalParts, 'year' | 'month' | 'day' | 'hour' | 'minute'>;

/** Answers remembered per rate plan and wall-clock time (the same quarter hours are asked again and again). */
const periodsAt = new WeakMap<RatePlanDefinition, Map<string, PeriodAt>>();
const MAX_PERIODS_AT = 50_000;

/**
 * The period in force at a local wall-clock time. A window belongs to the day it starts on; a
 * window of the previous day that runs past midnight applies only where no window of the day
 * itself does.
 */
export function ratePlanPeriodAt(def: RatePlanDefinition, local: WallClock): PeriodAt {
  let known = periodsAt.get(def);
  if (!known) periodsAt.set(def, (known = new Map()));
  const minute = local.hour * 60 + local.minute;
  const key = `${local.year}-${local.month}-${local.day}|${minute}`;
  let hit = known.get(key);
  if (!hit) {
    hit = classify(def, calendarDate(local.year, local.month, local.day), minute);
    if (known.size >= MAX_PERIODS_AT) known.clear();
    known.set(key, hit);
  }
  return hit;
}

/** The period in force at the instant `ms` in `zone` (as ratePlanPeriodAt, without a DateTime). */
export function ratePlanPeriodAtMs(def: RatePlanDefinition, ms: number, zone: string): PeriodAt {
  return ratePlanPeriodAt(def, localParts(ms, zone));
}

function classify(def: RatePlanDefinition, today: CalendarDate, minute: number): PeriodAt {
  const candidates: [CalendarDate, number][] = [
    [today, minute],
    [calendarDate(today.year, today.month, today.day - 1), minute + 1440],
  ];
  for (const [day, m] of candidates) {
    const season = seasonOf(def, day.month);
    const dayType = dayTypeOn(day.isoDate, day.weekday, def.holidays);
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
  const season = seasonOf(def, today.month);
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
