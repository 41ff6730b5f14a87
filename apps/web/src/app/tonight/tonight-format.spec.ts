import { planDetail, planResult } from '../plans/plan-fixtures';
import { candidateNights, liveCounts, peakLoad, shortBuses } from './tonight-format';

describe('tonight-format', () => {
  it('tries tonight, then up to 4 nights back, across month ends', () => {
    expect(candidateNights('2026-12-02')).toEqual([
      '2026-12-02',
      '2026-12-01',
      '2026-11-30',
      '2026-11-29',
      '2026-11-28',
    ]);
  });

  it('lists short buses with reasons in words', () => {
    const result = planResult();
    result.buses.push(
      { id: '209', departures: [], shortfallKwh: 5, reason: 'taper' },
      { id: '210', departures: [], shortfallKwh: 1e-9, reason: 'cabinet' },
    );
    expect(shortBuses(planDetail({ result }))).toEqual([
      { bus: '203', shortfallKwh: 30, reason: 'Site service limit' },
      { bus: '205', shortfallKwh: 12.5, reason: 'Dwell too short' },
      { bus: '209', shortfallKwh: 5, reason: 'Battery taper' },
    ]);
    expect(shortBuses(planDetail({ result: null }))).toEqual([]);
  });

  it('finds the peak against the limit in force then', () => {
    expect(peakLoad(planDetail())).toEqual({ peakKw: 120, limitKw: 150, over: false });
    expect(peakLoad(planDetail({ result: null }))).toBeNull();
    const result = planResult();
    result.slots[3] = { ...result.slots[3]!, loadKw: 110, limitKw: 100 };
    expect(peakLoad(planDetail({ result }))).toEqual({ peakKw: 120, limitKw: 150, over: true });
  });

  it('counts live states, chargers without a reading apart', () => {
    const counts = liveCounts([
      { live: { status: 'faulted', powerKw: null, seenAt: null } },
      { live: { status: 'charging', powerKw: 10, seenAt: null } },
      { live: { status: 'connected', powerKw: 0, seenAt: null } },
      { live: null },
    ]);
    expect(Object.fromEntries(counts.map((c) => [c.state, c.count]))).toEqual({
      charging: 1,
      connected: 1,
      available: 0,
      faulted: 1,
      out: 0,
      offline: 0,
      unknown: 1,
    });
  });

  it('counts a charger out of service as out of service, not as the available its station reports', () => {
    const chargers = [
      { label: 'D2', live: { status: 'available' as const, powerKw: 0, seenAt: null } },
      { label: 'D1', live: { status: 'available' as const, powerKw: 0, seenAt: null } },
      { label: 'C1', live: { status: 'charging' as const, powerKw: 30, seenAt: null } },
    ];
    const counts = liveCounts(chargers, (c) => c.label !== 'D1');
    expect(Object.fromEntries(counts.map((c) => [c.state, c.count]))).toMatchObject({
      available: 1,
      out: 1,
      charging: 1,
    });
  });
});
