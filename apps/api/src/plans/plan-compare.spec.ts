import { describe, expect, it } from 'vitest';
import type { PlanResult } from '@nightyard/contracts';
import { movedBetween } from './plan-compare';

const plan = (sessions: [string, string, string, string][]) =>
  ({
    buses: [...new Set(sessions.map(([bus]) => bus))].map((id) => ({ id })),
    sessions: sessions.map(([bus, charger, start, end]) => ({ bus, charger, start, end, kwh: 10, kw: [40] })),
  }) as unknown as PlanResult;

describe('two versions of a night compared', () => {
  it('a weekend plug-in a whole day later is a change, and the words name the day', () => {
    // Friday 16:00 to Monday 07:00 at the depot (America/Chicago).
    const v1 = plan([
      ['222', 'C1', '2026-12-06T04:30:00.000-06:00', '2026-12-06T06:30:00.000-06:00'],
      ['218', 'C2', '2026-12-04T15:00:00.000-06:00', '2026-12-05T15:00:00.000-06:00'],
    ]);
    const v2 = plan([
      ['222', 'C1', '2026-12-07T04:30:00.000-06:00', '2026-12-07T06:30:00.000-06:00'],
      ['218', 'C2', '2026-12-04T15:00:00.000-06:00', '2026-12-05T15:00:00.000-06:00'],
    ]);
    expect(movedBetween(v1, v2, 'America/Chicago', true)).toEqual([
      { bus: '222', before: 'C1 Sun 04:30-Sun 06:30', after: 'C1 Mon 04:30-Mon 06:30' },
    ]);
    // A night of a day keeps the short words.
    expect(movedBetween(v1, plan([]), 'America/Chicago', false)[0]).toEqual({
      bus: '218',
      before: 'C2 15:00-15:00',
      after: 'not plugged in',
    });
  });
});
