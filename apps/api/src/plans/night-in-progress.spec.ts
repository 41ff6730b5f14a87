import { describe, expect, it } from 'vitest';
import type { PlanResult } from '@nightyard/contracts';
import { staysPluggedIn } from './night-in-progress';

// The night of Friday Dec 11 (America/Chicago, UTC-6); a plan made at 16:23 re-plans from 16:30.
const at = (hhmm: string) => `2026-12-11T${hhmm}:00.000-06:00`;
const CUT = Date.parse(at('16:30'));
const session = (
  bus: string,
  charger: string,
  start: string,
  end: string,
  kw: number[],
  moves: ['driver' | 'crew', 'driver' | 'crew'] = ['driver', 'crew'],
): PlanResult['sessions'][number] => ({
  bus,
  charger,
  start: at(start),
  end: at(end),
  kw,
  kwh: kw.reduce((a, v) => a + v * 0.25, 0),
  startMove: moves[0],
  endMove: moves[1],
});
const scenario = {
  timezone: 'America/Chicago',
  slotMinutes: 15,
  buses: [
    { id: '206', stays: [{ arrive: '2026-12-11T16:15', depart: '2026-12-14T06:30' }] },
    {
      id: '207',
      stays: [
        { arrive: '2026-12-11T16:15', depart: '2026-12-11T16:50' },
        { arrive: '2026-12-11T17:30', depart: '2026-12-14T06:30' },
      ],
    },
  ],
} as never;

describe('a bus the cut-off unplugs and the re-plan puts back on the same charger', () => {
  it('stays plugged in: one session, no charging in the gap, the plug-in and the unplug as they were', () => {
    // 206 on C5 from its pull-in, cut at 16:30; the re-plan puts it back on C5 at 16:45.
    const merged = staysPluggedIn(
      [
        session('206', 'C5', '16:15', '16:30', [0]),
        session('206', 'C5', '16:45', '17:15', [60, 60], ['crew', 'driver']),
      ],
      scenario,
      CUT,
    );
    expect(merged).toEqual([{ ...session('206', 'C5', '16:15', '17:15', [0, 0, 60, 60]), endMove: 'driver' }]);
  });

  it('is unplugged where another bus uses the charger in between, or the bus leaves the depot', () => {
    const busy = [
      session('206', 'C5', '16:15', '16:30', [0]),
      session('209', 'C5', '16:30', '16:45', [60], ['crew', 'crew']),
      session('206', 'C5', '16:45', '17:15', [60, 60], ['crew', 'driver']),
    ];
    expect(staysPluggedIn(busy, scenario, CUT)).toHaveLength(3);
    // 207 pulls out at 16:50 and is back at 17:30: two stays, two sessions.
    const twoStays = [
      session('207', 'C6', '16:15', '16:30', [0]),
      session('207', 'C6', '17:30', '18:00', [60, 60], ['driver', 'crew']),
    ];
    expect(staysPluggedIn(twoStays, scenario, CUT)).toHaveLength(2);
  });
});
