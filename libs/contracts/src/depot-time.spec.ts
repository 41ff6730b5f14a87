import { describe, expect, it } from 'vitest';
import {
  addDays,
  dateTimeAt,
  dayTimeAt,
  depotDate,
  depotStamp,
  isIsoDate,
  normaliseClockTime,
  timeAt,
  timeWithZone,
  weekdayTimeAt,
  zoneName,
  zoneNote,
} from './depot-time';

// Fixed instants and explicit zones only: nothing here reads this machine's date or zone.
describe('depot time', () => {
  /** 21:42 UTC on Wednesday 2 December 2026: 15:42 in Chicago (CST), 06:42 next day in Tokyo. */
  const at = '2026-12-02T21:42:00.000Z';

  it('writes an instant on the depot clock, 24-hour', () => {
    expect(timeAt(at, 'America/Chicago')).toBe('15:42');
    expect(timeAt(at, 'Asia/Tokyo')).toBe('06:42');
    expect(timeAt('2026-12-02T06:05:00Z', 'America/Chicago')).toBe('00:05');
    expect(weekdayTimeAt(at, 'America/Chicago')).toMatch(/^Wed 15:42$/);
    expect(dayTimeAt(at, 'America/Chicago')).toMatch(/Wed.*2.*15:42/);
    expect(dayTimeAt(at, 'America/Chicago')).not.toMatch(/AM|PM/);
    expect(dateTimeAt(at, 'Europe/Berlin')).toMatch(/2026.*22:42/);
    expect(depotStamp(at, 'America/Chicago')).toBe('2026-12-02 15:42');
  });

  it('labels a time with the depot zone name for a reader elsewhere', () => {
    expect(zoneName('America/Chicago', at)).toBe('CST');
    expect(zoneName('America/Chicago', '2026-07-01T12:00:00Z')).toBe('CDT');
    expect(timeWithZone(at, 'America/Chicago')).toBe('15:42 CST');
  });

  it('notes the depot zone only when the viewer is in another one', () => {
    expect(zoneNote('America/Chicago', 'Europe/Berlin', at)).toBe(
      'Times are at the depot: America/Chicago (CST), 24-hour.',
    );
    expect(zoneNote('America/Chicago', 'America/Chicago', at)).toBeNull();
    // Another name of the same zone is the same zone.
    expect(zoneNote('America/Chicago', 'US/Central', at)).toBeNull();
  });

  it("takes the depot's date, not the viewer's or UTC's", () => {
    expect(depotDate('2026-12-02T04:00:00Z', 'America/Chicago')).toBe('2026-12-01');
    expect(depotDate('2026-12-01T23:30:00Z', 'Europe/Berlin')).toBe('2026-12-02');
    expect(depotDate(Date.parse('2026-12-02T07:30:00Z'), 'America/Chicago')).toBe('2026-12-02');
  });

  it('moves calendar dates across month and year ends and daylight-saving changes', () => {
    expect(addDays('2026-12-31', 1)).toBe('2027-01-01');
    expect(addDays('2026-03-01', -1)).toBe('2026-02-28');
    expect(addDays('2026-11-01', 1)).toBe('2026-11-02');
    expect(isIsoDate('2026-12-02')).toBe(true);
    expect(isIsoDate('2026-13-02')).toBe(false);
    expect(isIsoDate('tomorrow')).toBe(false);
  });

  it('reads times as typed into HH:mm, 24-hour, and refuses what is no time of day', () => {
    expect(normaliseClockTime('21:30')).toBe('21:30');
    expect(normaliseClockTime('9:05')).toBe('09:05');
    expect(normaliseClockTime('2130')).toBe('21:30');
    expect(normaliseClockTime('0905')).toBe('09:05');
    expect(normaliseClockTime('21.30')).toBe('21:30');
    expect(normaliseClockTime('24:00')).toBeNull();
    expect(normaliseClockTime('9:60')).toBeNull();
    expect(normaliseClockTime('9 PM')).toBeNull();
  });
});
