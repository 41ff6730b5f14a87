import { hourlyLoad } from './site-load-chart';

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
});
