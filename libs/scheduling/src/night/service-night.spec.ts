import { DateTime } from 'luxon';
import { describe, expect, it } from 'vitest';
import {
  calendarNight,
  nightAmong,
  nightAt,
  nightsOfDays,
  serviceDayAt,
  serviceDayTimes,
  serviceNights,
  type RunTimes,
} from './service-night';

const ZONE = 'America/Chicago';
const at = (local: string) => DateTime.fromISO(local, { zone: ZONE }).toJSDate();
const local = (isoInstant: string) => DateTime.fromISO(isoInstant, { zone: ZONE }).toFormat("yyyy-MM-dd'T'HH:mm");

/** School days (Mon-Fri) from `from` to `to`: bus A 06:00-08:30 and 14:30-16:45, bus B 07:00-09:15 and 15:00-17:30. */
function schoolRuns(from: string, to: string, skip: string[] = []): RunTimes[] {
  const out: RunTimes[] = [];
  for (
    let d = DateTime.fromISO(from, { zone: ZONE });
    d <= DateTime.fromISO(to, { zone: ZONE });
    d = d.plus({ days: 1 })
  ) {
    const date = d.toISODate()!;
    if (d.weekday > 5 || skip.includes(date)) continue;
    const t = (hhmm: string) => at(`${date}T${hhmm}`);
    out.push(
      { serviceDate: date, bus: 'A', pullOut: t('06:00'), pullIn: t('08:30') },
      { serviceDate: date, bus: 'A', pullOut: t('14:30'), pullIn: t('16:45') },
      { serviceDate: date, bus: 'B', pullOut: t('07:00'), pullIn: t('09:15') },
      { serviceDate: date, bus: 'B', pullOut: t('15:00'), pullIn: t('17:30') },
    );
  }
  return out;
}

describe('service night', () => {
  const runs = schoolRuns('2026-12-07', '2026-12-18');

  it("runs from the first pull-in of a day to the last bus's first pull-out of the next", () => {
    const nights = serviceNights(runs, ZONE);
    const wed = nights.find((n) => n.serviceDate === '2026-12-09')!;
    expect(local(wed.start)).toBe('2026-12-09T08:30');
    expect(local(wed.end)).toBe('2026-12-10T07:00');
    expect(wed).toMatchObject({ nextServiceDate: '2026-12-10', fromRuns: true });
  });

  it("a weekday afternoon (15:00) is in that day's night", () => {
    const n = nightAt(runs, ZONE, at('2026-12-09T15:00'));
    expect(n.inForce?.serviceDate).toBe('2026-12-09');
    expect(n.tonight.serviceDate).toBe('2026-12-09');
    expect(n.next.serviceDate).toBe('2026-12-10');
  });

  it("just after midnight (Wednesday 00:02) the night in progress is Tuesday's, not the coming evening", () => {
    const n = nightAt(runs, ZONE, at('2026-12-09T00:02'));
    expect(n.inForce?.serviceDate).toBe('2026-12-08');
    expect(n.tonight.serviceDate).toBe('2026-12-08');
    expect(n.next.serviceDate).toBe('2026-12-09');
    expect(serviceDayAt(runs, ZONE, at('2026-12-09T00:02'))).toBe('2026-12-08');
  });

  it('stays in force until the last bus has pulled out, then the day has no night until the first pull-in', () => {
    expect(nightAt(runs, ZONE, at('2026-12-09T06:59')).inForce?.serviceDate).toBe('2026-12-08');
    // Bus A is back from its morning run at 08:30: Wednesday's night (with its midday layover) starts.
    const between = nightAt(runs, ZONE, at('2026-12-09T07:30'));
    expect(between.inForce).toBeNull();
    expect(between.tonight.serviceDate).toBe('2026-12-09');
  });

  it("Friday night (22:00) runs to Monday's pull-outs", () => {
    const n = nightAt(runs, ZONE, at('2026-12-11T22:00'));
    expect(n.inForce).toMatchObject({ serviceDate: '2026-12-11', nextServiceDate: '2026-12-14' });
    expect(local(n.inForce!.end)).toBe('2026-12-14T07:00');
    expect(nightAt(runs, ZONE, at('2026-12-13T12:00')).inForce?.serviceDate).toBe('2026-12-11');
  });

  it('a holiday belongs to the night before it', () => {
    const holiday = schoolRuns('2026-12-07', '2026-12-18', ['2026-12-10']);
    const n = nightAt(holiday, ZONE, at('2026-12-10T12:00'));
    expect(n.inForce).toMatchObject({ serviceDate: '2026-12-09', nextServiceDate: '2026-12-11' });
  });

  it("autumn clock change: 01:30 (first occurrence) on 2026-11-01 is in Friday's night, which lasts 25 h more", () => {
    const dst = schoolRuns('2026-10-26', '2026-11-06');
    // The first 01:30 is still CDT (-05:00): written as an instant, not a wall time, which is ambiguous.
    const first = DateTime.fromISO('2026-11-01T01:30:00-05:00', { zone: ZONE });
    expect(first.toFormat('HH:mm ZZ')).toBe('01:30 -05:00');
    const n = nightAt(dst, ZONE, first.toJSDate());
    expect(n.inForce).toMatchObject({ serviceDate: '2026-10-30', nextServiceDate: '2026-11-02' });
    expect(n.inForce!.start.endsWith('-05:00')).toBe(true);
    expect(n.inForce!.end.endsWith('-06:00')).toBe(true);
    // 2026-10-30 08:30 CDT to 2026-11-02 07:00 CST: 70.5 h of wall time plus the repeated hour.
    expect((Date.parse(n.inForce!.end) - Date.parse(n.inForce!.start)) / 3_600_000).toBe(71.5);
  });

  it("spring clock change: 03:30 on 2027-03-14 is in Friday's night, one hour shorter", () => {
    const dst = schoolRuns('2027-03-08', '2027-03-19');
    const n = nightAt(dst, ZONE, at('2027-03-14T03:30'));
    expect(n.inForce).toMatchObject({ serviceDate: '2027-03-12', nextServiceDate: '2027-03-15' });
    expect((Date.parse(n.inForce!.end) - Date.parse(n.inForce!.start)) / 3_600_000).toBe(69.5);
  });

  it('without runs it falls back to calendar nights from noon to noon, marked as estimates', () => {
    const n = nightAt([], ZONE, at('2026-12-09T00:02'));
    expect(n.inForce).toEqual(calendarNight('2026-12-08', ZONE));
    expect(n.inForce!.fromRuns).toBe(false);
    expect(n.next.serviceDate).toBe('2026-12-09');
    expect(nightAt([], ZONE, at('2026-12-09T15:00')).tonight.serviceDate).toBe('2026-12-09');
  });

  it('past the last service day entered, the last night is open to noon and then calendar nights follow', () => {
    const short = schoolRuns('2026-12-07', '2026-12-09');
    const last = nightAt(short, ZONE, at('2026-12-09T20:00'));
    expect(last.inForce).toMatchObject({ serviceDate: '2026-12-09', fromRuns: false });
    expect(local(last.inForce!.start)).toBe('2026-12-09T08:30');
    const later = nightAt(short, ZONE, at('2026-12-20T09:00'));
    expect(later.inForce).toMatchObject({ serviceDate: '2026-12-19', fromRuns: false });
    expect(later.next.serviceDate).toBe('2026-12-20');
  });

  it('before the first service day entered, the next night is the first one the runs describe', () => {
    const n = nightAt(runs, ZONE, at('2026-12-01T15:00'));
    expect(n.inForce).toBeNull();
    expect(n.next.serviceDate).toBe('2026-12-07');
  });

  it('the nights worked out once answer every instant alike, and are not changed by the asking', () => {
    // The API keeps a depot's nights for the day and asks them at each request.
    const short = schoolRuns('2026-12-07', '2026-12-09');
    const nights = nightsOfDays(serviceDayTimes(short), ZONE);
    const before = structuredClone(nights);
    for (const t of ['2026-12-08T15:00', '2026-12-09T00:02', '2026-12-09T20:00', '2026-12-20T09:00']) {
      expect(nightAmong(nights, ZONE, at(t))).toEqual(nightAt(short, ZONE, at(t)));
    }
    expect(nights).toEqual(before);
  });

  it('gives the same answer in any zone the machine runs in (instants, not wall clocks)', () => {
    const tokyo = nightAt(runs, 'Asia/Tokyo', at('2026-12-09T00:02'));
    const chicago = nightAt(runs, ZONE, at('2026-12-09T00:02'));
    expect(Date.parse(tokyo.tonight.start)).toBe(Date.parse(chicago.tonight.start));
  });
});
