import { DateTime } from 'luxon';
import { limitWindowsMs, localToMillis, otherLoadAt, siteLimitAt, type Scenario } from './scenario.js';

/** One demand interval of the horizon. Times are absolute; `start` carries the local offset. */
export interface Slot {
  index: number;
  startMs: number;
  endMs: number;
  /** ISO time with the depot's offset, e.g. 2026-11-01T01:00:00.000-05:00. */
  start: string;
  /** ISO weekday (1 = Monday) and minute of the local day of the slot's start. */
  weekday: number;
  minuteOfDay: number;
  /** Index into the tariff's periods, or -1 for off-peak. */
  period: number;
  periodName: string;
  price: number;
  otherKw: number;
  limitKw: number;
}

function minutesOf(clockText: string): number {
  const [h, m] = clockText.split(':').map(Number);
  return h! * 60 + m!;
}

/** The TOU period index (or -1 for off-peak) of a local weekday and minute. */
export function tariffPeriodAt(periods: Scenario['tariff']['periods'], weekday: number, minute: number): number {
  const previousDay = weekday === 1 ? 7 : weekday - 1;
  for (let i = 0; i < periods.length; i++) {
    for (const w of periods[i]!.windows) {
      const from = minutesOf(w.from);
      const to = minutesOf(w.to);
      if (to > from) {
        if (w.days.includes(weekday) && minute >= from && minute < to) return i;
      } else {
        // Past midnight: the window belongs to the day it starts on.
        if (w.days.includes(weekday) && minute >= from) return i;
        if (w.days.includes(previousDay) && minute < to) return i;
      }
    }
  }
  return -1;
}

/**
 * The horizon's slots in absolute time: a night over a clock change has 4 fewer or 4 more
 * 15-minute slots than 96 per day, because slots are real minutes, not wall-clock labels.
 */
export function buildSlots(scenario: Scenario): Slot[] {
  const zone = scenario.timezone;
  const startMs = localToMillis(scenario.start, zone);
  const endMs = localToMillis(scenario.end, zone);
  if (startMs === null || endMs === null) throw new Error('scenario start/end do not exist in its time zone');
  const slotMs = scenario.slotMinutes * 60_000;
  const slots: Slot[] = [];
  const windows = limitWindowsMs(scenario);
  for (let ms = startMs, i = 0; ms < endMs; ms += slotMs, i++) {
    const dt = DateTime.fromMillis(ms, { zone });
    const minuteOfDay = dt.hour * 60 + dt.minute;
    const period = tariffPeriodAt(scenario.tariff.periods, dt.weekday, minuteOfDay);
    slots.push({
      index: i,
      startMs: ms,
      endMs: ms + slotMs,
      start: dt.toISO()!,
      weekday: dt.weekday,
      minuteOfDay,
      period,
      periodName: period < 0 ? 'off-peak' : scenario.tariff.periods[period]!.name,
      price: period < 0 ? scenario.tariff.offPeakPrice : scenario.tariff.periods[period]!.price,
      otherKw: otherLoadAt(scenario, ms),
      limitKw: siteLimitAt(scenario, ms, slotMs, windows),
    });
  }
  return slots;
}

/** ISO time with offset of an absolute time in the depot's zone. */
export function isoAt(ms: number, zone: string): string {
  return DateTime.fromMillis(ms, { zone }).toISO()!;
}
