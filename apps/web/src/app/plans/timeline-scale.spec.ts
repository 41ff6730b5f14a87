import { axisTicks, placeAt, placeSpan, timelineSegments } from './timeline-scale';

const H = 3_600_000;
// 2026-12-09 06:00 at the depot (America/Chicago, UTC-6) is 12:00 UTC.
const T0 = Date.parse('2026-12-09T12:00:00Z');
const at = (hours: number) => T0 + hours * H;

describe('timeline scale', () => {
  // A night with the midday layover: 06:00 to 06:00 next day, plug-ins 08:00-09:30 and 16:00-05:00.
  const horizon = { start: at(0), end: at(24) };
  const busy = [
    [at(2), at(3.5)],
    [at(10), at(23)],
  ] as const;

  it('collapses an empty span of two hours or more to a narrow gap, on whole hours', () => {
    const segs = timelineSegments(horizon, busy);
    expect(segs.map((s) => [(s.start - T0) / H, (s.end - T0) / H, s.collapsed])).toEqual([
      [0, 2, true],
      [2, 4, false],
      [4, 10, true],
      [10, 24, false],
    ]);
    const gap = segs[2]!;
    // Six empty hours take the width of three quarters of an hour, not 6/24 of the picture.
    expect(gap.width).toBeLessThan(6);
    expect(segs.reduce((s, x) => s + x.width, 0)).toBeCloseTo(100, 6);
  });

  it('places instants and spans along the segments', () => {
    const segs = timelineSegments(horizon, busy);
    expect(placeAt(segs, at(0))).toBe(0);
    expect(placeAt(segs, at(24))).toBeCloseTo(100, 6);
    const a = placeSpan(segs, at(10), at(11));
    const b = placeSpan(segs, at(2), at(3));
    expect(a.width).toBeCloseTo(b.width, 6);
  });

  it('leaves a night without long empty spans to scale', () => {
    const segs = timelineSegments({ start: at(10), end: at(24) }, [
      [at(10), at(13)],
      [at(14), at(24)],
    ]);
    expect(segs).toHaveLength(1);
    expect(segs[0]!.collapsed).toBe(false);
  });

  it('puts axis marks on whole hours only and never lets two labels touch', () => {
    // 15:45 to 07:00: the marks must fall on whole hours, never 15:45 or 17:15.
    const start = at(9.75);
    const segs = timelineSegments({ start, end: at(25) }, [[start, at(25)]]);
    for (const width of [320, 640, 1200]) {
      const ticks = axisTicks(segs, 'America/Chicago', width);
      expect(ticks.length).toBeGreaterThan(2);
      for (const t of ticks) expect(t.label).toMatch(/^\d\d:00$/);
      const xs = ticks.map((t) => (t.left / 100) * width);
      for (let i = 1; i < xs.length; i++) expect(xs[i]! - xs[i - 1]!).toBeGreaterThanOrEqual(40);
    }
    // From 15:45: the marks step evenly from the first (not 16:00, 18:00, 19:00...).
    for (const width of [360, 500, 640, 800]) {
      const hours = axisTicks(segs, 'America/Chicago', width).map((t) => Number(t.label.slice(0, 2)));
      const steps = hours.slice(1).map((h, i) => (h - hours[i]! + 24) % 24);
      expect(new Set(steps).size, `${width} px: ${hours.join(', ')}`).toBe(1);
    }
    const narrow = axisTicks(segs, 'America/Chicago', 320);
    const wide = axisTicks(segs, 'America/Chicago', 1200);
    expect(wide.length).toBeGreaterThan(narrow.length);
  });

  it('names the day at midnight on a weekend horizon, where the hours come round more than once', () => {
    // Fri 2026-12-11 16:00 to Mon 06:00 at the depot (America/Chicago): plug-ins all the way.
    const start = Date.parse('2026-12-11T22:00:00Z');
    const end = Date.parse('2026-12-14T12:00:00Z');
    const segs = timelineSegments({ start, end }, [[start, end]]);
    const labels = axisTicks(segs, 'America/Chicago', 1200).map((t) => t.label);
    expect(labels.filter((l) => /^[A-Z][a-z]{2}$/.test(l))).toEqual(['Sat', 'Sun', 'Mon']);
    expect(labels.filter((l) => l === '00:00')).toEqual([]);
    // A single night keeps 00:00.
    const night = timelineSegments({ start: at(9.75), end: at(25) }, [[at(9.75), at(25)]]);
    expect(axisTicks(night, 'America/Chicago', 1200).map((t) => t.label)).toContain('00:00');
  });
});
