import type { Charger, Tonight, TonightPlan, YardStep } from '@nightyard/contracts';

/** Test data for the Yard unit tests: a night at a depot in America/Chicago (UTC-6 in December). */
export const ZONE = 'America/Chicago';
export const PLAN_ID = '00000000-0000-4000-8000-0000000000a1';
export const DEPOT_ID = '00000000-0000-4000-8000-0000000000d1';

/** 2026-12-01 at hh:mm depot time (hours below 12 are the next morning). */
export function at(hhmm: string): string {
  const [h, m] = hhmm.split(':').map(Number) as [number, number];
  const d = h < 12 ? 2 : 1;
  return new Date(Date.UTC(2026, 11, d, h + 6, m)).toISOString();
}

export function step(overrides: Partial<YardStep> & Pick<YardStep, 'action' | 'bus' | 'charger' | 'at'>): YardStep {
  return {
    key: `${overrides.action}|${overrides.bus}|${overrides.charger}|${overrides.at}`,
    kwh: 40,
    status: 'upcoming',
    confirmedAt: null,
    confirmedBy: null,
    text:
      overrides.action === 'connect'
        ? `Plug in bus ${overrides.bus} at charger ${overrides.charger}`
        : `Unplug bus ${overrides.bus} from charger ${overrides.charger}`,
    reason: null,
    moveTo: null,
    ...overrides,
  };
}

const sessions = [
  { bus: '201', charger: 'C1', start: at('21:00'), end: at('23:00'), kwh: 80 },
  { bus: '202', charger: 'C1', start: at('23:30'), end: at('02:00'), kwh: 60 },
  { bus: '203', charger: 'C2', start: at('22:00'), end: at('05:00'), kwh: 90 },
];

export function plan(overrides: Partial<TonightPlan> = {}): TonightPlan {
  return {
    id: PLAN_ID,
    depotId: DEPOT_ID,
    serviceDate: '2026-12-01',
    version: 1,
    kind: 'generated',
    state: 'published',
    status: 'done',
    stage: 'Done',
    error: null,
    includesMidday: false,
    createdAt: '2026-12-01T15:00:00.000Z',
    createdBy: 'Sam Reyes',
    publishedAt: '2026-12-01T16:00:00.000Z',
    publishedBy: 'Sam Reyes',
    totalCost: 120,
    shortBuses: 0,
    timezone: ZONE,
    currency: 'USD',
    busCapacityKwh: { '201': 200, '202': 200, '203': 200 },
    plannedFrom: null,
    // 18:00 to 07:00 in quarter hours.
    horizon: { start: Date.parse(at('18:00')), end: Date.parse(at('07:00')), slotMs: 15 * 60_000 },
    sessions,
    revisionNote: null,
    moved: null,
    ...overrides,
  };
}

/** Tonight at 22:30: bus 201's plug-in (21:00) is confirmed, its unplug (23:00) is next on C1. */
export function tonight(overrides: Partial<Tonight> = {}): Tonight {
  return {
    depot: { id: DEPOT_ID, name: 'North Depot', timezone: ZONE },
    now: at('22:30'),
    plan: plan(),
    steps: [
      step({
        action: 'connect',
        bus: '201',
        charger: 'C1',
        at: at('21:00'),
        status: 'done',
        confirmedAt: at('21:02'),
        confirmedBy: 'Kofi Brandt',
      }),
      step({ action: 'connect', bus: '203', charger: 'C2', at: at('22:00'), status: 'overdue' }),
      step({ action: 'disconnect', bus: '201', charger: 'C1', at: at('23:00') }),
      step({ action: 'connect', bus: '202', charger: 'C1', at: at('23:30') }),
      step({ action: 'disconnect', bus: '202', charger: 'C1', at: at('02:00') }),
      step({ action: 'disconnect', bus: '203', charger: 'C2', at: at('05:00'), by: 'driver' }),
    ],
    acknowledged: true,
    reports: [],
    ...overrides,
  };
}

export function charger(label: string, overrides: Partial<Charger> = {}): Charger {
  return {
    id: `charger-${label}`,
    label,
    maxKw: 60,
    connector: 'SAE J1772 CCS1',
    cabinetId: null,
    cabinetLabel: null,
    status: 'in_service',
    statusReason: null,
    statusSince: null,
    outFrom: null,
    outUntil: null,
    ocppIdentity: `OLD-${label}`,
    live: { status: 'available', powerKw: 0, seenAt: at('22:29') },
    ...overrides,
  };
}
