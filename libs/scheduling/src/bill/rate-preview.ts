import { DateTime } from 'luxon';
import type { RatePlanDefinition, RatePreview } from '@nightyard/contracts';
import { dayTypeOf, daySlots, seasonOf } from './rate-calendar';

/** A day's price bands: runs of slots with the same period, in local times with offsets. */
export function previewDay(def: RatePlanDefinition, isoDate: string, zone: string): RatePreview {
  const slots = daySlots(def, isoDate, zone);
  const intervals: RatePreview['intervals'] = [];
  for (let i = 0; i < slots.length; i++) {
    const s = slots[i]!;
    const end = (slots[i + 1]?.start ?? s.start.startOf('day').plus({ days: 1 })).toISO()!;
    const last = intervals.at(-1);
    if (last && last.period === s.period && last.price === s.price) last.end = end;
    else
      intervals.push({ start: s.start.toISO()!, end, period: s.period, price: s.price, demandCharge: s.demandCharge });
  }
  const day = DateTime.fromISO(isoDate, { zone });
  const season = seasonOf(def, day.month);
  return {
    date: isoDate,
    dayType: dayTypeOf(day, def.holidays),
    season: season.name,
    currency: def.currency,
    facilityDemandCharge: season.facilityDemandCharge,
    intervals,
  };
}
