import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseScenario } from './scenario.js';
import type { RawJson } from './testing/raw-json.js';

const small = () => JSON.parse(readFileSync(new URL('../examples/small-depot.json', import.meta.url), 'utf8'));

function problemsOf(mutate: (s: RawJson) => void) {
  const s = small();
  mutate(s);
  const r = parseScenario(s);
  return r.ok ? [] : r.problems;
}

describe('scenario validation', () => {
  it('accepts the example files', () => {
    for (const f of ['small-depot', 'demo-depot', 'autumn-clock-change', 'cannot-serve-all']) {
      const r = parseScenario(JSON.parse(readFileSync(new URL(`../examples/${f}.json`, import.meta.url), 'utf8')));
      expect(r.ok, f).toBe(true);
    }
  });

  // Each rule of the format, broken on purpose: [what, mutation, expected path, message part].
  const cases: [string, (s: RawJson) => void, string, RegExp][] = [
    ['version', (s) => (s.version = 2), 'version', /must be 1/],
    ['unknown field', (s) => (s.colour = 'red'), 'colour', /unknown field/],
    ['unknown nested field', (s) => (s.buses[1].soc = 3), 'buses[1].soc', /unknown field/],
    ['time zone', (s) => (s.timezone = 'Mars/Olympus'), 'timezone', /IANA/],
    ['time format', (s) => (s.start = '2026-01-14 12:00'), 'start', /YYYY-MM-DDTHH:mm/],
    ['time with offset', (s) => (s.end = '2026-01-15T09:00-06:00'), 'end', /no offset/],
    ['end before start', (s) => (s.end = '2026-01-14T11:00'), 'end', /after start/],
    ['slot boundary', (s) => (s.start = '2026-01-14T12:05'), 'start', /slot boundary/],
    ['slot minutes', (s) => (s.slotMinutes = 7), 'slotMinutes', /divide the hour/],
    ['efficiency', (s) => (s.efficiency = 1.2), 'efficiency', /at most 1/],
    ['site limit missing', (s) => delete s.site.limitKw, 'site.limitKw', /required/],
    ['other load above limit', (s) => (s.site.otherLoadKw = 500), 'site.otherLoadKw', /must not exceed/],
    ['negative charger power', (s) => (s.chargers[0].maxKw = -5), 'chargers[0].maxKw', /greater than 0/],
    ['duplicate charger', (s) => (s.chargers[1].id = 'C1'), 'chargers[1].id', /duplicate/],
    ['unknown cabinet', (s) => (s.chargers[2].cabinet = 'P9'), 'chargers[2].cabinet', /not in cabinets/],
    ['duplicate cabinet', (s) => s.cabinets.push({ id: 'P1', limitKw: 10 }), 'cabinets[1].id', /duplicate/],
    [
      'weekday out of range',
      (s) => (s.tariff.periods[0].windows[0].days = [0, 8]),
      'tariff.periods[0].windows[0].days[0]',
      /1 \(Monday\) to 7/,
    ],
    [
      'clock format',
      (s) => (s.tariff.periods[0].windows[0].from = '4pm'),
      'tariff.periods[0].windows[0].from',
      /HH:mm/,
    ],
    [
      'empty window',
      (s) => (s.tariff.periods[0].windows[0].to = '16:00'),
      'tariff.periods[0].windows[0].to',
      /must differ/,
    ],
    [
      'overlapping windows',
      (s) => (s.tariff.periods[1].windows[0].to = '17:00'),
      'tariff.periods[1].windows[0]',
      /overlaps/,
    ],
    ['duplicate period', (s) => (s.tariff.periods[1].name = 'on-peak'), 'tariff.periods[1].name', /duplicate/],
    [
      'peak of an unknown period',
      (s) => (s.tariff.peaksSoFarKw.shoulder = 3),
      'tariff.peaksSoFarKw.shoulder',
      /facility/,
    ],
    ['negative price', (s) => (s.tariff.offPeakPrice = -0.1), 'tariff.offPeakPrice', /0 or more/],
    ['no buses', (s) => (s.buses = []), 'buses', /at least one bus/],
    ['duplicate bus', (s) => (s.buses[1].id = 'B07'), 'buses[1].id', /duplicate/],
    ['arrival above usable', (s) => (s.buses[0].arrivalKwh = 300), 'buses[0].arrivalKwh', /usableKwh/],
    ['ceiling above usable', (s) => (s.buses[0].ceilingKwh = 300), 'buses[0].ceilingKwh', /usableKwh/],
    ['reserve above ceiling', (s) => (s.buses[0].reserveKwh = 180), 'buses[0].reserveKwh', /ceilingKwh/],
    ['taper at usable', (s) => (s.buses[0].taperFromKwh = 196), 'buses[0].taperFromKwh', /below usableKwh/],
    ['no stays', (s) => (s.buses[2].stays = []), 'buses[2].stays', /at least one stay/],
    [
      'depart before arrive',
      (s) => (s.buses[3].stays[0].depart = '2026-01-14T17:00'),
      'buses[3].stays[0].depart',
      /after arrive/,
    ],
    [
      'stay before start',
      (s) => (s.buses[0].stays[0].arrive = '2026-01-14T11:00'),
      'buses[0].stays[0].arrive',
      /scenario start/,
    ],
    [
      'stay after end',
      (s) => (s.buses[0].stays[0].depart = '2026-01-15T10:00'),
      'buses[0].stays[0].depart',
      /scenario end/,
    ],
    [
      'departure minimum above ceiling',
      (s) => (s.buses[0].stays[0].departMinKwh = 190),
      'buses[0].stays[0].departMinKwh',
      /ceilingKwh/,
    ],
    [
      'overlapping stays',
      (s) => s.buses[0].stays.push({ arrive: '2026-01-15T06:00', depart: '2026-01-15T08:00', departMinKwh: 50 }),
      'buses[0].stays[1].arrive',
      /previous stay/,
    ],
    [
      'invalid date',
      (s) => (s.buses[0].stays[0].arrive = '2026-02-30T15:40'),
      'buses[0].stays[0].arrive',
      /does not exist/,
    ],
    [
      'departure minimum missing',
      (s) => delete s.buses[0].stays[0].departMinKwh,
      'buses[0].stays[0].departMinKwh',
      /required/,
    ],
  ];
  it.each(cases)('rejects %s with its field path', (_what, mutate, path, message) => {
    const problems = problemsOf(mutate);
    const hit = problems.find((p) => p.path === path);
    expect(hit, JSON.stringify(problems)).toBeDefined();
    expect(hit!.message).toMatch(message);
  });

  it('rejects a local time skipped by the spring clock change', () => {
    const problems = problemsOf((s) => {
      s.start = '2026-03-07T12:00';
      s.end = '2026-03-08T12:00';
      s.buses.forEach(
        (b: RawJson) => (b.stays = [{ arrive: '2026-03-07T16:00', depart: '2026-03-08T02:30', departMinKwh: 60 }]),
      );
    });
    expect(problems.some((p) => p.path === 'buses[0].stays[0].depart' && /does not exist/.test(p.message))).toBe(true);
  });

  it('reports every problem, not only the first', () => {
    const problems = problemsOf((s) => {
      s.chargers[0].maxKw = 0;
      s.buses[0].maxKw = 'fast';
      s.tariff.extra = 1;
    });
    expect(problems.map((p) => p.path).sort()).toEqual(['buses[0].maxKw', 'chargers[0].maxKw', 'tariff.extra']);
  });
});
