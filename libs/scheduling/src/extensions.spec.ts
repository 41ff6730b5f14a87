import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { planScenario, type Plan } from './plan.js';
import { parseScenario, type ScenarioInput } from './scenario.js';
import { buildSlots } from './slots.js';
import { checkPlan } from './testing/plan-checker.js';
import type { RawJson } from './testing/raw-json.js';

// Format extensions of scenario version 1: site.otherLoadByHourKw (kW by local hour, overrides
// otherLoadKw) and site.limitWindows (load-reduction requests: a lower site limit inside each
// window). Absent, nothing changes.

const small = () => JSON.parse(readFileSync(new URL('../examples/small-depot.json', import.meta.url), 'utf8'));

function problemsOf(mutate: (s: RawJson) => void) {
  const s = small();
  mutate(s);
  const r = parseScenario(s);
  return r.ok ? [] : r.problems;
}

async function plan(input: ScenarioInput): Promise<Plan> {
  const parsed = parseScenario(input);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  const result = await planScenario(parsed.scenario, { timeBudgetMs: 5000, maxMoves: 40 });
  expect(checkPlan(input, result)).toEqual([]);
  return result;
}

/** One bus, one charger, a flat price and a facility demand charge: the plan spreads charging. */
function night(site: Record<string, unknown>): ScenarioInput {
  return {
    version: 1,
    timezone: 'America/Chicago',
    start: '2026-01-13T12:00',
    end: '2026-01-14T09:00',
    slotMinutes: 15,
    efficiency: 1,
    site: { limitKw: 1000, otherLoadKw: 0, ...site },
    cabinets: [],
    chargers: [
      { id: 'C1', maxKw: 100 },
      { id: 'C2', maxKw: 100 },
    ],
    tariff: { currency: 'USD', offPeakPrice: 0.1, periods: [], facilityDemandCharge: 10, peaksSoFarKw: {} },
    buses: [
      {
        id: 'B1',
        usableKwh: 300,
        maxKw: 100,
        arrivalKwh: 50,
        stays: [{ arrive: '2026-01-13T22:00', depart: '2026-01-14T06:00', departMinKwh: 250 }],
      },
      {
        id: 'B2',
        usableKwh: 300,
        maxKw: 100,
        arrivalKwh: 50,
        stays: [{ arrive: '2026-01-13T22:00', depart: '2026-01-14T06:00', departMinKwh: 250 }],
      },
    ],
  } as ScenarioInput;
}
const hourly = (base: number, over: Record<number, number>) => Array.from({ length: 24 }, (_, h) => over[h] ?? base);
const kwAt = (p: Plan, local: string) => p.slots.find((s) => s.start.startsWith(local))!;

describe('format extensions: validation', () => {
  const cases: [string, (s: RawJson) => void, string, RegExp][] = [
    [
      '23 hourly values',
      (s) => (s.site.otherLoadByHourKw = hourly(20, {}).slice(1)),
      'site.otherLoadByHourKw',
      /24 values/,
    ],
    [
      'a negative hourly value',
      (s) => (s.site.otherLoadByHourKw = hourly(20, { 3: -1 })),
      'site.otherLoadByHourKw[3]',
      /0 or more/,
    ],
    [
      'an hourly value above the limit',
      (s) => (s.site.otherLoadByHourKw = hourly(20, { 18: 450 })),
      'site.otherLoadByHourKw[18]',
      /must not exceed site.limitKw/,
    ],
    [
      'a window ending before it starts',
      (s) => (s.site.limitWindows = [{ from: '2026-01-14T22:00', to: '2026-01-14T21:00', limitKw: 200 }]),
      'site.limitWindows[0].to',
      /after from/,
    ],
    [
      'a window outside the horizon',
      (s) => (s.site.limitWindows = [{ from: '2026-01-15T10:00', to: '2026-01-15T12:00', limitKw: 200 }]),
      'site.limitWindows[0]',
      /outside the horizon/,
    ],
    [
      'a window limit of 0',
      (s) => (s.site.limitWindows = [{ from: '2026-01-14T22:00', to: '2026-01-14T23:00', limitKw: 0 }]),
      'site.limitWindows[0].limitKw',
      /greater than 0/,
    ],
    [
      'a window limit below the other load',
      (s) => (s.site.limitWindows = [{ from: '2026-01-14T22:00', to: '2026-01-14T23:00', limitKw: 20 }]),
      'site.limitWindows[0].limitKw',
      /below the other load/,
    ],
    [
      'a window time with an offset',
      (s) => (s.site.limitWindows = [{ from: '2026-01-14T22:00-06:00', to: '2026-01-14T23:00', limitKw: 200 }]),
      'site.limitWindows[0].from',
      /YYYY-MM-DDTHH:mm/,
    ],
    [
      'a window time that does not exist',
      (s) => (s.site.limitWindows = [{ from: '2026-01-14T22:00', to: '2026-01-32T23:00', limitKw: 200 }]),
      'site.limitWindows[0].to',
      /does not exist/,
    ],
    [
      'an unknown window field',
      (s) =>
        (s.site.limitWindows = [{ from: '2026-01-14T22:00', to: '2026-01-14T23:00', limitKw: 200, reason: 'heat' }]),
      'site.limitWindows[0].reason',
      /unknown field/,
    ],
  ];
  it.each(cases)('rejects %s with its field path', (_what, mutate, path, message) => {
    const problems = problemsOf(mutate);
    const hit = problems.find((p) => p.path === path);
    expect(hit, JSON.stringify(problems)).toBeDefined();
    expect(hit!.message).toMatch(message);
  });

  it('accepts a window that only overlaps the horizon, and a window limit above the site limit', () => {
    expect(
      problemsOf((s) => (s.site.limitWindows = [{ from: '2026-01-14T10:00', to: '2026-01-14T13:00', limitKw: 900 }])),
    ).toEqual([]);
  });
});

describe('format extensions: slots', () => {
  it('takes the other load from the local hour of each slot, also over the autumn clock change', () => {
    const s = small();
    s.start = '2026-10-31T12:00';
    s.end = '2026-11-01T09:00';
    s.buses.forEach(
      (b: RawJson) =>
        (b.stays = [{ arrive: '2026-10-31T17:00', depart: '2026-11-01T06:00', departMinKwh: b.stays[0].departMinKwh }]),
    );
    s.site.otherLoadByHourKw = Array.from({ length: 24 }, (_, h) => 10 + h);
    const r = parseScenario(s);
    if (!r.ok) throw new Error(JSON.stringify(r.problems));
    const slots = buildSlots(r.scenario);
    expect(slots).toHaveLength(22 * 4);
    for (const slot of slots) expect(slot.otherKw).toBe(10 + Number(slot.start.slice(11, 13)));
    // 01:00-02:00 happens twice: both hours carry hour 1's value.
    expect(slots.filter((x) => x.start.slice(11, 13) === '01').map((x) => x.otherKw)).toEqual(Array(8).fill(11));
  });

  it('lowers the limit in every slot a window touches, the lowest window winning', () => {
    const s = small();
    s.site.limitWindows = [
      { from: '2026-01-14T18:10', to: '2026-01-14T19:00', limitKw: 300 },
      { from: '2026-01-14T18:30', to: '2026-01-14T18:45', limitKw: 250 },
    ];
    const r = parseScenario(s);
    if (!r.ok) throw new Error(JSON.stringify(r.problems));
    const limits = Object.fromEntries(buildSlots(r.scenario).map((x) => [x.start.slice(11, 16), x.limitKw]));
    expect([
      limits['17:45'],
      limits['18:00'],
      limits['18:15'],
      limits['18:30'],
      limits['18:45'],
      limits['19:00'],
    ]).toEqual([400, 300, 300, 250, 300, 400]);
  });
});

describe('format extensions: plans', () => {
  it('change nothing when absent or neutral', async () => {
    const base = await plan(night({ otherLoadKw: 30 }));
    const flat = await plan(
      night({
        otherLoadKw: 5,
        otherLoadByHourKw: hourly(30, {}),
        limitWindows: [{ from: '2026-01-13T23:00', to: '2026-01-14T02:00', limitKw: 1000 }],
      }),
    );
    expect(flat.cost).toEqual(base.cost);
    expect(flat.sessions).toEqual(base.sessions);
    expect(flat.slots).toEqual(base.slots);
  });

  it('keeps charging out of an hour of high other load (it would raise the peak)', async () => {
    const p = await plan(night({ otherLoadByHourKw: hourly(0, { 1: 120 }) }));
    // 400 kWh over 8 hours is 50 kW flat; with 120 kW of other load from 01:00 to 02:00 the
    // cheapest plan charges 400 kWh in the other 7 hours (57.1 kW) and nothing in that hour.
    for (const t of ['01:00', '01:15', '01:30', '01:45']) expect(kwAt(p, `2026-01-14T${t}`).loadKw).toBeCloseTo(120, 6);
    expect(p.cost.demand).toBeCloseTo(10 * 120, 4);
    expect(p.savings.peakKw).toBeCloseTo(120, 6);
  });

  it('meets a load-reduction window, reports it per slot, and the bound and checker follow it', async () => {
    const p = await plan(
      night({ otherLoadKw: 10, limitWindows: [{ from: '2026-01-14T00:00', to: '2026-01-14T04:00', limitKw: 30 }] }),
    );
    for (const s of p.slots) {
      const inside =
        Date.parse(s.start) >= Date.parse('2026-01-14T00:00:00-06:00') &&
        Date.parse(s.start) < Date.parse('2026-01-14T04:00:00-06:00');
      expect(s.limitKw).toBe(inside ? 30 : 1000);
      expect(s.loadKw).toBeLessThanOrEqual(s.limitKw + 1e-6);
    }
    expect(p.status).toBe('optimal');
    // Both baselines keep to the window too (a main breaker would make them).
    expect(p.baselines.arrival.exceedsSiteLimit).toBe(false);
    expect(p.baselines.timer.exceedsSiteLimit).toBe(false);
  });

  it('names the site as the reason when a window leaves too little power', async () => {
    // The buses need 400 kWh between 22:00 and 06:00; a 50 kW limit over the whole stay leaves
    // 40 kW for charging: 320 kWh in 8 hours, 80 kWh short.
    const p = await plan(
      night({ otherLoadKw: 10, limitWindows: [{ from: '2026-01-13T21:00', to: '2026-01-14T07:00', limitKw: 50 }] }),
    );
    expect(p.status).toBe('short');
    const short = p.buses.filter((b) => b.shortfallKwh > 0);
    expect(short.every((b) => b.reason === 'site')).toBe(true);
    expect(p.buses.reduce((a, b) => a + b.shortfallKwh, 0)).toBeCloseTo(80, 4);
  });
});
