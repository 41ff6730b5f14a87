import { describe, expect, it } from 'vitest';
import type { PlanResult } from '@nightyard/contracts';
import { recountFaults } from './fault-counts';

// Local times of the night of Dec 3 (America/Chicago); before noon is the next morning.
const local = (hhmm: string) => `2026-12-0${hhmm < '12:00' ? 4 : 3}T${hhmm}:00.000-06:00`;
const session = (bus: string, charger: string, start: string, end: string) => ({
  bus,
  charger,
  start: local(start),
  end: local(end),
  kwh: 10,
  kw: [40],
});

describe('a re-plan after a charger is reported out', () => {
  it('counts the buses that were planned on that charger from the plan the yard followed, not from the stopped sessions', () => {
    const followed = {
      sessions: [
        session('202', 'C2', '16:30', '23:15'),
        session('204', 'C2', '23:15', '04:30'),
        session('214', 'C2', '04:30', '06:30'),
        session('210', 'C2', '15:45', '16:30'),
        session('201', 'C1', '16:00', '06:00'),
      ],
    } as unknown as PlanResult;
    const at = Date.parse('2026-12-03T19:34:00.000-06:00');
    const engine = {
      buses: ['201', '202', '204', '209', '214'],
      reasons: [
        'charger C2 out of service: 0 buses were planned on it',
        "the plan being carried out could not be kept within the depot's cost tolerance (keeping it: $41.68 more, where $5.00 is allowed): the rest of the night was planned afresh (5 other buses moved)",
      ],
    };
    expect(recountFaults(engine, followed, ['C2'], [], at)).toEqual({
      buses: engine.buses,
      reasons: [
        'charger C2 out of service: 3 buses were planned on it',
        "the plan being carried out could not be kept within the depot's cost tolerance (keeping it: $41.68 more, where $5.00 is allowed): the rest of the night was planned afresh (2 other buses moved)",
      ],
    });
    const kept = {
      buses: ['202', '209'],
      reasons: [
        'charger C2 out of service: 0 buses were planned on it',
        '2 other buses moved to make room or to keep the cost down',
      ],
    };
    expect(recountFaults(kept, followed, ['C2'], ['209'], at).reasons).toEqual([
      'charger C2 out of service: 3 buses were planned on it',
    ]);
    // The charger's buses are among those moved even where the engine saw no change of theirs from
    // its cut-off on (one stopped at the report inside the slot before it): the list and the count agree.
    expect(recountFaults(kept, followed, ['C2'], ['209'], at).buses).toEqual(['202', '204', '209', '214']);
  });

  it('leaves out a charger reported out before an earlier revision: nothing was planned on it any more', () => {
    const followed = { sessions: [session('201', 'C1', '16:00', '06:00')] } as unknown as PlanResult;
    const at = Date.parse('2026-12-03T19:34:00.000-06:00');
    const engine = {
      buses: ['201', '203'],
      reasons: [
        'charger D2 out of service: 0 buses were planned on it',
        'bus 201 running late',
        '1 other bus moved to make room or to keep the cost down',
      ],
    };
    expect(recountFaults(engine, followed, ['D2'], ['201'], at, 'bus 201 late, expected 23:30').reasons).toEqual([
      'bus 201 late, expected 23:30',
      '1 other bus moved to make room or to keep the cost down',
    ]);
  });

  it('drops the count beside a reason when every bus moved is one of the others: the headline says it', () => {
    const followed = { sessions: [session('201', 'C1', '16:00', '06:00')] } as unknown as PlanResult;
    const at = Date.parse('2026-12-03T22:49:00.000-06:00');
    const engine = {
      buses: ['201', '203'],
      reasons: [
        'the plan being carried out could not be kept: keeping it would leave buses 12.0 kWh short that a new plan delivers: the rest of the night was planned afresh (2 other buses moved)',
      ],
    };
    expect(recountFaults(engine, followed, [], ['212'], at, 'bus 212 absent tonight').reasons).toEqual([
      'bus 212 absent tonight',
      'the plan being carried out could not be kept: keeping it would leave buses 12.0 kWh short that a new plan delivers: the rest of the night was planned afresh',
    ]);
  });

  it("names this report, not the night's earlier late buses and readings the engine lists", () => {
    // Bus 212 was reported late and bus 221 read earlier; now bus 220 is reported absent.
    const followed = { sessions: [session('220', 'C2', '05:45', '06:30')] } as unknown as PlanResult;
    const at = Date.parse('2026-12-03T23:07:00.000-06:00');
    const engine = {
      buses: ['220'],
      reasons: ['bus 212 running late', 'battery levels reported for 1 bus'],
    };
    expect(recountFaults(engine, followed, [], ['220'], at, 'bus 220 absent tonight')).toEqual({
      buses: ['220'],
      reasons: ['bus 220 absent tonight'],
    });
  });
});
