import type { PlanResult } from '@nightyard/contracts';
import { crewMovesLines } from './crew-moves-note';

const session = (startMove: 'driver' | 'crew', endMove: 'driver' | 'crew') => ({
  bus: '11',
  charger: 'C1',
  start: '2026-12-09T22:00:00Z',
  end: '2026-12-09T23:00:00Z',
  kwh: 30,
  kw: [60, 60],
  startMove,
  endMove,
});

describe('crew moves note', () => {
  it('says what the crew does, the moves saved and their cost, and why a re-plan moved buses', () => {
    const r = {
      sessions: [session('driver', 'crew'), session('crew', 'driver')],
      crewMoves: 2,
      crewTrade: { fewerMoves: 2, extraCost: 1.8 },
      replan: { moved: { buses: ['B1', 'B2'], reasons: ['charger C3 out of service: 2 buses were planned on it'] } },
    } as unknown as PlanResult;
    const lines = crewMovesLines(r, 'USD');
    expect(lines[0]).toBe('2 crew moves; 2 plug-ins and unplugs by drivers on pulling in or out.');
    expect(lines[1]).toMatch(/^2 fewer moves for \$1\.80 than the cheapest plan found\.$/);
    expect(lines[2]).toBe(
      'Re-plan: 2 buses moved (B1, B2) because charger C3 out of service: 2 buses were planned on it.',
    );
  });

  it("counts a revision's crew moves over the whole night, as its drivers' and the run sheet's", () => {
    // The engine's 1 is the re-plan's, from the cut-off on; the night has 3 crew moves.
    const r = {
      sessions: [session('crew', 'crew'), session('crew', 'driver')],
      crewMoves: 1,
      replan: { moved: { buses: [], reasons: [] } },
    } as unknown as PlanResult;
    expect(crewMovesLines(r, 'USD')[0]).toBe('3 crew moves; 1 plug-in or unplug by a driver on pulling in or out.');
    // A fresh plan's count is the engine's.
    expect(crewMovesLines({ ...r, replan: undefined } as PlanResult, 'USD')[0]).toMatch(/^1 crew move;/);
  });

  it('says what keeping the rest of the night costs in a re-plan that kept it', () => {
    const r = {
      sessions: [],
      keptPrevious: { extraCost: 3.1 },
      replan: { moved: { buses: ['B1'], reasons: ['charger C3 out of service: 1 bus was planned on it'] } },
    } as unknown as PlanResult;
    expect(crewMovesLines(r, 'USD').at(-1)).toBe(
      'Keeping the rest of the plan being carried out costs $3.10 more than the cheapest plan found.',
    );
    const free = { ...r, keptPrevious: { extraCost: 0 } } as PlanResult;
    expect(crewMovesLines(free, 'USD').at(-1)).toBe(
      'Keeping the rest of the plan being carried out costs no more than the cheapest plan found.',
    );
    expect(crewMovesLines({ ...r, keptPrevious: null } as PlanResult, 'USD').at(-1)).toMatch(/^Re-plan: 1 bus moved/);
    const none = {
      ...r,
      replan: { ...r.replan!, moved: { buses: [], reasons: ['bus 204 running late'] } },
    } as PlanResult;
    expect(crewMovesLines(none, 'USD')).toContain('Re-plan for bus 204 running late: no bus moved.');
    const short = { ...r, keptPrevious: { extraCost: 0, extraShortKwh: 6.8 } } as PlanResult;
    expect(crewMovesLines(short, 'USD').at(-1)).toBe(
      'Keeping the rest of the plan being carried out costs no more than the cheapest plan found. It leaves 6.8 kWh short that the cheapest plan would serve by moving other buses; the plan being carried out left it short already.',
    );
  });

  it('says what changed against the published version when the night is planned again', () => {
    const r = {
      sessions: [],
      keptFrom: { version: 2 },
      keptPrevious: { extraCost: 0, extraShortKwh: 0 },
      moved: {
        buses: ['224'],
        reasons: ["the night's data changed or a change keeps the cost down; every other bus keeps the published plan"],
      },
    } as unknown as PlanResult;
    expect(crewMovesLines(r, 'USD')).toEqual([
      "Against version 2 as published: 1 bus changed (224) because the night's data changed or a change keeps the cost down; every other bus keeps the published plan.",
      'Keeping the published plan costs no more than the cheapest plan found.',
    ]);
    const none = { ...r, moved: { buses: [], reasons: [] } } as PlanResult;
    expect(crewMovesLines(none, 'USD')[0]).toBe('Against version 2 as published: no bus changed.');
  });

  it('says nothing for a plan made before the crew rules', () => {
    expect(crewMovesLines({ sessions: [] } as unknown as PlanResult, 'USD')).toEqual([]);
  });
});
