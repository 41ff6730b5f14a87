import type { HttpTestingController } from '@angular/common/http/testing';
import type { PlanDetail, PlanResult, PlanSummary } from '@nightyard/contracts';
import { DEPOT_ID } from '../fleet/fleet-fixtures';

/** A small plan for the specs: one hour (four 15-minute slots) at a Chicago depot, three buses. */
export const PLAN_IDS = {
  draft: '00000000-0000-4000-8000-0000000000f2',
  published: '00000000-0000-4000-8000-0000000000f1',
};

export function planResult(overrides: Partial<PlanResult> = {}): PlanResult {
  const slot = (start: string, loadKw: number, price: number) => ({ start, loadKw, price, limitKw: 150 });
  return {
    status: 'short',
    cost: { energy: 10, demand: 90, total: 100 },
    baseline: {
      kind: 'arrival',
      energy: 20,
      demand: 380,
      total: 400,
      peakKw: 190,
      exceedsSiteLimit: false,
      shortfallKwh: 0,
      shortfallCost: 0,
    },
    lowerBound: 99,
    gap: 0.01,
    solveMs: 12,
    slots: [
      slot('2026-12-03T18:00:00.000-06:00', 120, 0.18),
      slot('2026-12-03T18:15:00.000-06:00', 120, 0.18),
      slot('2026-12-03T18:30:00.000-06:00', 90, 0.068),
      slot('2026-12-03T18:45:00.000-06:00', 90, 0.068),
    ],
    sessions: [
      {
        bus: '201',
        charger: 'C1',
        start: '2026-12-03T18:00:00.000-06:00',
        end: '2026-12-03T18:30:00.000-06:00',
        kwh: 30,
        kw: [60, 60],
      },
      {
        bus: '205',
        charger: 'C2',
        start: '2026-12-03T18:30:00.000-06:00',
        end: '2026-12-03T19:00:00.000-06:00',
        kwh: 15,
        kw: [30, 30],
      },
      {
        bus: '203',
        charger: 'C1',
        start: '2026-12-03T18:45:00.000-06:00',
        end: '2026-12-03T19:00:00.000-06:00',
        kwh: 10,
        kw: [40],
      },
    ],
    buses: [
      { id: '201', departures: [{ at: '2026-12-04T06:00:00.000-06:00', kwh: 147 }], shortfallKwh: 0, reason: null },
      {
        id: '205',
        departures: [{ at: '2026-12-04T06:10:00.000-06:00', kwh: 98 }],
        shortfallKwh: 12.5,
        reason: 'dwell',
      },
      { id: '203', departures: [{ at: '2026-12-04T06:20:00.000-06:00', kwh: 60 }], shortfallKwh: 30, reason: 'site' },
    ],
    ...overrides,
  };
}

export function planSummary(overrides: Partial<PlanSummary> = {}): PlanSummary {
  return {
    id: PLAN_IDS.draft,
    depotId: DEPOT_ID,
    serviceDate: '2026-12-03',
    version: 2,
    kind: 'generated',
    state: 'draft',
    status: 'done',
    stage: 'Done',
    error: null,
    includesMidday: true,
    createdAt: '2026-12-03T20:00:00.000Z',
    createdBy: 'Desmond Hale',
    publishedAt: null,
    publishedBy: null,
    totalCost: 100,
    shortBuses: 2,
    ...overrides,
  };
}

export function planDetail(overrides: Partial<PlanDetail> = {}): PlanDetail {
  return {
    ...planSummary(),
    timezone: 'America/Chicago',
    currency: 'USD',
    notes: ['Bus 205: no state of charge was entered for its 16:30 pull-in; 40 % is estimated from miles.'],
    result: planResult(),
    busCapacityKwh: { '201': 196, '203': 196, '205': 155 },
    plannedFrom: null,
    runsChanged: [],
    ...overrides,
  };
}

/**
 * Answers the Plans page's question of where each night looked at stands (GET .../nights/:date)
 * as a service day of its own, so specs about versions need not answer it themselves.
 */
export function answerAsServiceDays(mock: HttpTestingController): void {
  for (const req of mock.match((r) => /\/nights\/\d{4}-\d{2}-\d{2}$/.test(r.url))) {
    const date = req.request.url.slice(-10);
    req.flush({ date, serviceDay: true, within: null, previous: null, next: null });
  }
}
