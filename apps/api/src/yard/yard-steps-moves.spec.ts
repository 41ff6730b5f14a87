import { describe, expect, it } from 'vitest';
import type { PlanResult } from '@nightyard/contracts';
import { yardSteps } from './yard-steps';

const session = (
  bus: string,
  charger: string,
  start: string,
  end: string,
  startMove?: 'driver' | 'crew',
  endMove?: 'driver' | 'crew',
) => ({
  bus,
  charger,
  start,
  end,
  kwh: 30,
  kw: [60, 60],
  ...(startMove ? { startMove } : {}),
  ...(endMove ? { endMove } : {}),
});

describe('yard steps: who makes each move', () => {
  it('names the driver on pulling in or out and the crew for every other move (older plans: the crew)', () => {
    const result = {
      sessions: [
        session('11', 'A', '2026-12-09T22:00:00.000Z', '2026-12-09T23:00:00.000Z', 'driver', 'crew'),
        session('12', 'A', '2026-12-09T23:00:00.000Z', '2026-12-10T12:00:00.000Z', 'crew', 'driver'),
        session('13', 'B', '2026-12-09T22:00:00.000Z', '2026-12-09T23:00:00.000Z'),
      ],
    } as unknown as PlanResult;
    const steps = yardSteps(result, new Date('2026-12-09T21:00:00Z'), new Map());
    const by = Object.fromEntries(steps.map((s) => [`${s.action} ${s.bus}`, s.by]));
    expect(by).toEqual({
      'connect 11': 'driver',
      'disconnect 11': 'crew',
      'connect 12': 'crew',
      'disconnect 12': 'driver',
      'connect 13': 'crew',
      'disconnect 13': 'crew',
    });
  });
});
