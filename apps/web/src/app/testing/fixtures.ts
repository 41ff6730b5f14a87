import type {
  DepotNight,
  DepotSummary,
  Role,
  SessionUser,
  ServiceNight,
  TokenResponse,
  User,
} from '@nightyard/contracts';
import { addDays } from '@nightyard/contracts/depot-time';

/** Test data for unit tests (client side only; HTTP is faked with HttpTestingController). */
export function sessionUser(roles: Role[], overrides: Partial<SessionUser> = {}): SessionUser {
  return {
    id: '00000000-0000-4000-8000-000000000001',
    email: 'ada@example.org',
    name: 'Ada Okafor',
    roles,
    organisation: { id: '00000000-0000-4000-8000-0000000000aa', name: 'Test District' },
    ...overrides,
  };
}

export function tokenResponse(roles: Role[], accessToken = 'token-1'): TokenResponse {
  return { accessToken, expiresInSeconds: 900, user: sessionUser(roles) };
}

export function user(overrides: Partial<User> = {}): User {
  return {
    id: '00000000-0000-4000-8000-000000000002',
    email: 'sam@example.org',
    name: 'Sam Reyes',
    roles: ['yard'],
    status: 'active',
    createdAt: '2026-11-01T10:00:00.000Z',
    lastSignInAt: null,
    depotIds: [NORTH_ID],
    ...overrides,
  };
}

export const NORTH_ID = '00000000-0000-4000-8000-0000000000d1';
export const SOUTH_ID = '00000000-0000-4000-8000-0000000000d2';

export function depot(overrides: Partial<DepotSummary> = {}): DepotSummary {
  return {
    id: NORTH_ID,
    name: 'North Depot',
    timezone: 'America/Chicago',
    serviceLimitKw: 500,
    chargerCount: 6,
    chargersInService: 5,
    busCount: 12,
    ratePlanName: 'Commercial TOU',
    currency: 'USD',
    nextServiceDay: {
      date: '2026-12-03',
      firstPullOut: '05:40',
      lastPullOut: '07:10',
      busesOut: 11,
      absentBuses: [],
      lastPullInToday: '17:30',
    },
    ...overrides,
  };
}

/** A second depot of the same organisation (another zone, smaller). */
export function southDepot(overrides: Partial<DepotSummary> = {}): DepotSummary {
  return depot({
    id: SOUTH_ID,
    name: 'Riverside Depot',
    timezone: 'America/Denver',
    serviceLimitKw: 300,
    chargerCount: 4,
    chargersInService: 4,
    busCount: 8,
    ...overrides,
  });
}

/** Lets promise chains (HTTP -> promise -> next request) run. */
export async function settle(): Promise<void> {
  for (let i = 0; i < 10; i++) await Promise.resolve();
}

/**
 * The API's answer to GET /api/depots/:id/night for a depot in America/Chicago (UTC-6 in
 * winter), `tonight` being the night of `serviceDate`: from 14:00 that day to 06:30 the next.
 */
export function depotNight(serviceDate: string, now: string, overrides: Partial<DepotNight> = {}): DepotNight {
  const night = (date: string): ServiceNight => {
    const nextDate = addDays(date, 1);
    return {
      serviceDate: date,
      nextServiceDate: nextDate,
      start: `${date}T14:00:00-06:00`,
      end: `${nextDate}T06:30:00-06:00`,
      fromRuns: true,
    };
  };
  const tonight = night(serviceDate);
  const inForce = Date.parse(now) >= Date.parse(tonight.start) ? tonight : null;
  return {
    now,
    timezone: 'America/Chicago',
    inForce,
    next: inForce ? night(tonight.nextServiceDate) : tonight,
    tonight,
    ...overrides,
  };
}
