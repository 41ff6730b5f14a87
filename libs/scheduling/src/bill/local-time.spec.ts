import { DateTime } from 'luxon';
import { describe, expect, it } from 'vitest';
import { localParts, offsetMinutes } from './local-time.js';

// The remembered offsets against luxon asking Intl afresh for each instant (the independent
// check): every 7 minutes across both clock changes of 2026 in the demo's zones, a zone whose
// clock moves by half an hour (Lord Howe Island), one 5:45 ahead of UTC (Kathmandu), and UTC.

const cases: { zone: string; days: string[] }[] = [
  { zone: 'America/Chicago', days: ['2026-03-07', '2026-11-01'] },
  { zone: 'America/Denver', days: ['2026-03-08', '2026-10-31'] },
  { zone: 'Australia/Lord_Howe', days: ['2026-04-04', '2026-10-03'] },
  { zone: 'Asia/Kathmandu', days: ['2026-12-04'] },
  { zone: 'UTC', days: ['2026-12-31'] },
];

describe('local wall-clock fields from remembered offsets', () => {
  for (const { zone, days } of cases) {
    it(`match luxon minute by minute around the clock changes: ${zone}`, () => {
      let checked = 0;
      for (const day of days) {
        const from = DateTime.fromISO(day, { zone }).toMillis();
        // Two passes: the first fills the memory, the second reads from it.
        for (let pass = 0; pass < 2; pass++) {
          for (let ms = from; ms < from + 48 * 3_600_000; ms += 7 * 60_000 + 13_000) {
            const l = DateTime.fromMillis(ms, { zone });
            const mine = localParts(ms, zone);
            expect(offsetMinutes(zone, ms)).toBe(l.offset);
            expect([mine.isoDate, mine.weekday, mine.hour, mine.minute]).toEqual([
              l.toISODate(),
              l.weekday,
              l.hour,
              l.minute,
            ]);
            checked++;
          }
        }
      }
      expect(checked).toBeGreaterThan(700);
    });
  }

  it('refuses a zone that is not one', () => {
    expect(() => localParts(0, 'Mars/Olympus_Mons')).toThrow(/Unknown time zone/);
  });
});
