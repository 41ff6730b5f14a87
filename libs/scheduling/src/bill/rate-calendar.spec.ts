import { DateTime } from 'luxon';
import { describe, expect, it } from 'vitest';
import { ratePlanDefinitionSchema } from '@nightyard/contracts';
import { daySlots, ratePlanPeriodAt } from './rate-calendar';
import { previewDay } from './rate-preview';

const plan = ratePlanDefinitionSchema.parse({
  currency: 'USD',
  holidays: ['2026-12-25'],
  seasons: [
    {
      name: 'All year',
      fromMonth: 1,
      toMonth: 12,
      offPeakPrice: 0.07,
      facilityDemandCharge: 5,
      periods: [
        {
          name: 'on-peak',
          price: 0.25,
          demandCharge: 10,
          windows: [{ dayTypes: ['weekday'], from: '16:00', to: '21:00' }],
        },
        {
          name: 'super-off-peak',
          price: 0.03,
          windows: [{ dayTypes: ['weekday', 'weekend'], from: '23:00', to: '05:00' }],
        },
      ],
    },
  ],
});

describe('tariff calendar', () => {
  it('a window past midnight belongs to the day it starts on', () => {
    // Friday 23:00 to Saturday 05:00 is super-off-peak; Saturday 04:00 came from Friday's window.
    const sat = DateTime.fromISO('2026-12-05T04:00', { zone: 'America/Chicago' });
    expect(ratePlanPeriodAt(plan, sat).period).toBe('super-off-peak');
    const sunEarly = DateTime.fromISO('2026-12-06T02:00', { zone: 'America/Chicago' });
    expect(ratePlanPeriodAt(plan, sunEarly).period).toBe('super-off-peak');
  });

  it('a holiday uses holiday windows only (none here: off-peak all day, also past midnight)', () => {
    const xmas = previewDay(plan, '2026-12-25', 'America/Chicago');
    expect(xmas.dayType).toBe('holiday');
    // 00:00-05:00 still comes from Thursday's window that runs past midnight.
    expect(xmas.intervals.map((i) => [i.start.slice(11, 16), i.period])).toEqual([
      ['00:00', 'super-off-peak'],
      ['05:00', 'off-peak'],
    ]);
  });

  it('clock-change days have 92 and 100 quarter hours (IANA zone data through luxon)', () => {
    expect(daySlots(plan, '2026-03-08', 'America/Chicago')).toHaveLength(92);
    expect(daySlots(plan, '2026-11-01', 'America/Chicago')).toHaveLength(100);
    expect(daySlots(plan, '2026-11-02', 'America/Chicago')).toHaveLength(96);
  });

  it('rejects overlapping windows and uncovered months, naming the field', () => {
    const bad = ratePlanDefinitionSchema.safeParse({
      currency: 'USD',
      seasons: [
        {
          name: 'Summer',
          fromMonth: 6,
          toMonth: 9,
          offPeakPrice: 0.1,
          periods: [
            { name: 'a', price: 0.2, windows: [{ dayTypes: ['weekday'], from: '22:00', to: '02:00' }] },
            { name: 'b', price: 0.3, windows: [{ dayTypes: ['weekday'], from: '01:00', to: '03:00' }] },
          ],
        },
      ],
    });
    expect(bad.success).toBe(false);
    const issues = bad.error!.issues.map((i) => [i.path.join('.'), i.message]);
    expect(issues).toContainEqual([
      'seasons.0.periods.1.windows.0',
      'Overlaps "a" 22:00-02:00 on weekdays from 01:00 to 02:00',
    ]);
    expect(issues).toContainEqual([
      'seasons',
      'No season covers January, February, March, April, May, October, November, December',
    ]);
  });
});
