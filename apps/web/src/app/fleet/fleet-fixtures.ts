import type { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import type { Bus, Role, Run, ServiceDay } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';
import { DepotListStore } from '../depot-state/depot-list-store';
import { depot, tokenResponse } from '../testing/fixtures';

/** Test data and set-up for the Fleet and Plans specs (client side; HTTP faked). */
export const DEPOT_ID = depot().id;

export function bus(overrides: Partial<Bus> = {}): Bus {
  return {
    id: '00000000-0000-4000-8000-0000000000b1',
    number: '201',
    usableKwh: 196,
    maxChargeKw: 80,
    connector: 'SAE J1772 CCS1',
    kwhPerMile: 1.28,
    ceilingPct: 90,
    reservePct: 15,
    taperStartPct: 85,
    status: 'active',
    ...overrides,
  };
}

export function run(overrides: Partial<Run> = {}): Run {
  return {
    id: '00000000-0000-4000-8000-0000000000e1',
    busId: bus().id,
    busNumber: '201',
    pullOut: '2026-12-03T14:05',
    pullIn: '2026-12-03T16:30',
    miles: 30,
    kwh: null,
    energyKwh: 38.4,
    arrivalSocPct: 38,
    arrivalSocSource: 'uploaded',
    estimatedArrivalSocPct: 52.1,
    ...overrides,
  };
}

export function serviceDay(overrides: Partial<ServiceDay> = {}): ServiceDay {
  return { date: '2026-12-03', forecastLowF: 28, coldWeatherFactor: 1.25, runs: [run()], ...overrides };
}

/** Signs in with the given roles and loads the depot list, as the shell would have. */
export async function signedInAs(mock: HttpTestingController, roles: Role[]): Promise<void> {
  const auth = TestBed.inject(AuthStore);
  const signingIn = auth.signIn('ada@example.org', 'pw');
  mock.expectOne('/api/auth/login').flush(tokenResponse(roles));
  await signingIn;
  const loading = TestBed.inject(DepotListStore).load();
  mock.expectOne('/api/depots').flush({ depots: [depot()] });
  await loading;
}
