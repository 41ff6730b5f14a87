import { hourLabel, hourlyLoad, slotLabels } from './site-load-chart';

// Invented slots at a depot in Chicago (UTC-6 in December).
const slots = (fromUtc: string, hours: number) =>
  Array.from({ length: hours * 4 }, (_, i) => ({
    start: new Date(Date.parse(fromUtc) + i * 900_000).toISOString(),
    loadKw: 100 + (i % 4) * 10,
    limitKw: 450,
    price: 0.1,
  }));

describe('site load hour by hour', () => {
  it('names the hours of an ordinary night by the clock alone', () => {
    // Tuesday 18:00 to Wednesday 06:00.
    const hours = hourlyLoad({ slots: slots('2026-12-09T00:00:00Z', 12) } as never, 'America/Chicago');
    expect(hours.map((h) => h.hour).slice(0, 2)).toEqual(['18:00', '19:00']);
    expect(hours).toHaveLength(12);
    expect(hours[0]!.averageKw).toBe(115);
    expect(hours[0]!.highestKw).toBe(130);
  });

  it("names each hour's day on a night longer than a day, whose clock hours come round again", () => {
    // Friday 15:00 to Monday 06:00: 15:00 comes on Friday, Saturday and Sunday.
    const hours = hourlyLoad({ slots: slots('2026-12-11T21:00:00Z', 63) } as never, 'America/Chicago');
    const labels = hours.map((h) => h.hour);
    expect(labels.filter((l) => l.endsWith('15:00'))).toEqual(['Fri 15:00', 'Sat 15:00', 'Sun 15:00']);
    expect(new Set(labels).size).toBe(labels.length);
  });

  it('spaces the time axis labels at least 48 px apart, a weekend on a phone too', () => {
    // Friday 15:00 to Monday 07:00 in quarter hours (256 slots), as the axis labels them.
    const labels = Array.from({ length: 256 }, (_, i) => {
      const minutes = (15 * 60 + i * 15) % (24 * 60);
      return `${String(Math.floor(minutes / 60)).padStart(2, '0')}:${String(minutes % 60).padStart(2, '0')}`;
    });
    const shown = (width: number) => labels.flatMap((_, i) => (hourLabel(labels, i, width) ? [i] : []));
    for (const width of [230, 330, 1000]) {
      const at = shown(width);
      const gapPx = Math.min(...at.slice(1).map((i, k) => i - at[k]!)) * (width / labels.length);
      expect(gapPx, `${width} px`).toBeGreaterThanOrEqual(48);
    }
    // 230 px (a phone): one label a day, at midnight; before, every 6 hours at 22 px apart.
    expect(shown(230).map((i) => labels[i])).toEqual(['00:00', '00:00', '00:00']);
  });

  it("names the weekday at each midnight of a night longer than a day, and keeps the step's hours", () => {
    // Friday 15:00 to Monday 07:00 at a Chicago depot (December: UTC-6).
    const start = Date.parse('2026-12-11T15:00:00-06:00');
    const slots = Array.from({ length: 256 }, (_, i) => ({
      start: new Date(start + i * 900_000).toISOString(),
      loadKw: 0,
      price: 0.1,
      limitKw: 100,
    }));
    const labels = slotLabels({ slots }, 'America/Chicago');
    const shown = (width: number) => labels.flatMap((_, i) => hourLabel(labels, i, width) ?? []);
    expect(shown(230)).toEqual(['Sat 00:00', 'Sun 00:00', 'Mon 00:00']);
    expect(shown(1000).slice(0, 4)).toEqual(['16:00', '20:00', 'Sat 00:00', '04:00']);
    // One night: clock times alone.
    expect(slotLabels({ slots: slots.slice(0, 60) }, 'America/Chicago')).toContain('00:00');
  });
});
