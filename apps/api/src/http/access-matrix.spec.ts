import { beforeAll, describe, expect, it } from 'vitest';
import { ROLES, type Role } from '@nightyard/contracts';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

const app = createTestApp();

/**
 * Who may call what, written out by hand from the product brief, so that a route whose declared
 * roles drift from it fails here. Every registered route must appear.
 */
// Facilities describe the depot and its tariff; admins may too; everyone else reads.
const EDIT_DEPOT = ['facilities', 'admin'] as const;

// Supervisors keep the fleet and the plans; admins may too. The office roles read the days.
const FLEET = ['supervisor', 'admin'] as const;
const OFFICE = ['supervisor', 'admin', 'facilities', 'finance'] as const;
// Finance reviews costs with admins; supervisors and facilities read them.
const COSTS = ['finance', 'admin', 'supervisor', 'facilities'] as const;
// The yard carries out the night; supervisors and admins may act for them.
const YARD = ['yard', 'supervisor', 'admin'] as const;

const EXPECTED: Record<string, 'public' | readonly Role[]> = {
  'GET /health': 'public',
  'POST /auth/login': 'public',
  'POST /auth/refresh': 'public',
  'POST /auth/logout': 'public',
  'GET /auth/me': ROLES,
  'POST /auth/forgot': 'public',
  'GET /auth/action-tokens/:token': 'public',
  'POST /auth/set-password': 'public',
  'GET /users': ['admin'],
  'POST /users/invite': ['admin'],
  'PATCH /users/:id': ['admin'],
  'GET /depots': ROLES,
  'GET /depots/:depotId/night': ROLES,
  'GET /depots/:depotId/nights/:date': ROLES,
  'PUT /me/depot': ROLES,
  'GET /district': ['admin', 'finance'],
  'GET /dev/outbox': ['admin'],
  'GET /depots/:depotId': ROLES,
  'PUT /depots/:depotId': EDIT_DEPOT,
  'POST /depots/:depotId/chargers': EDIT_DEPOT,
  'PUT /depots/:depotId/chargers/:id': EDIT_DEPOT,
  'DELETE /depots/:depotId/chargers/:id': EDIT_DEPOT,
  'POST /depots/:depotId/cabinets': EDIT_DEPOT,
  'PUT /depots/:depotId/cabinets/:id': EDIT_DEPOT,
  'DELETE /depots/:depotId/cabinets/:id': EDIT_DEPOT,
  'PUT /depots/:depotId/load-reduction-windows': EDIT_DEPOT,
  'PUT /depots/:depotId/peaks-so-far': EDIT_DEPOT,
  'PUT /depots/:depotId/yard-crew': EDIT_DEPOT,
  'POST /depots/:depotId/rate-plans': EDIT_DEPOT,
  'DELETE /depots/:depotId/rate-plans/:effectiveFrom': EDIT_DEPOT,
  'GET /depots/:depotId/scenario-base': ['supervisor', 'facilities', 'admin'],
  'GET /rate-plans': ROLES,
  'GET /rate-plans/:id': ROLES,
  'POST /rate-plans': EDIT_DEPOT,
  'PUT /rate-plans/:id': EDIT_DEPOT,
  'DELETE /rate-plans/:id': EDIT_DEPOT,
  'GET /rate-plans/:id/preview': ROLES,
  'POST /rate-plans/import-urdb': EDIT_DEPOT,
  'GET /depots/:depotId/buses': ROLES,
  'POST /depots/:depotId/buses': FLEET,
  'PUT /depots/:depotId/buses/:id': FLEET,
  'GET /depots/:depotId/cold-weather': OFFICE,
  'PUT /depots/:depotId/cold-weather': FLEET,
  'GET /depots/:depotId/service-days/:date': OFFICE,
  'PUT /depots/:depotId/service-days/:date': FLEET,
  'POST /depots/:depotId/service-days/:date/copy': FLEET,
  'POST /depots/:depotId/service-days/:date/csv': FLEET,
  'GET /depots/:depotId/service-days/:date/csv-template': OFFICE,
  'GET /depots/:depotId/plans': ROLES,
  'POST /depots/:depotId/plans': FLEET,
  'POST /depots/:depotId/plans/what-if': FLEET,
  'GET /plans/:id': ROLES,
  'GET /plans/:id/scenario': FLEET,
  'GET /plans/:id/compare': ROLES,
  'POST /plans/:id/publish': FLEET,
  'GET /plans/:id/adoption': FLEET,
  'POST /plans/:id/adopt': FLEET,
  'GET /plans/:id/costs': COSTS,
  'GET /depots/:depotId/costs/month': COSTS,
  'POST /depots/:depotId/meter-data': ['finance', 'admin'],
  'GET /plans/:id/ocpp': ['supervisor', 'admin', 'facilities'],
  'PUT /depots/:depotId/chargers/:id/ocpp': EDIT_DEPOT,
  'GET /depots/:depotId/tonight': YARD,
  'POST /depots/:depotId/tonight/acknowledge': YARD,
  'POST /yard/confirmations': YARD,
  'POST /depots/:depotId/tonight/reports': YARD,
  // Charger states, publications and reports: what Tonight and Depot show every role.
  'GET /depots/:depotId/live': ROLES,
  'POST /depots/:depotId/tonight/missed': YARD,
};

const samplePath = (p: string) =>
  p
    .replace(':id', '00000000-0000-4000-8000-000000000000')
    .replace(':depotId', '00000000-0000-4000-8000-000000000001')
    .replace(':effectiveFrom', '2026-01-01')
    .replace(':date', '2026-12-09')
    .replace(':token', 'x'.repeat(43));

let people: Record<Role, TestUser>;
beforeAll(async () => {
  const org = await createOrganisation(app, Object.fromEntries(ROLES.map((r) => [r, [r]])) as Record<Role, Role[]>);
  people = org.users as Record<Role, TestUser>;
});

describe('access matrix', () => {
  it('lists every registered route', () => {
    const registered = app.routes.map((r) => `${r.method.toUpperCase()} ${r.path}`).sort();
    expect(registered).toEqual(Object.keys(EXPECTED).sort());
    for (const r of app.routes) {
      const expected = EXPECTED[`${r.method.toUpperCase()} ${r.path}`];
      expect(r.access === 'public' ? 'public' : [...r.access].sort(), r.path).toEqual(
        expected === 'public' ? 'public' : [...expected!].sort(),
      );
    }
  });

  const protectedRoutes = Object.entries(EXPECTED).filter(([, access]) => access !== 'public');

  it.each(protectedRoutes)('%s needs a signed-in caller', async (route) => {
    const [method, path] = route.split(' ') as [string, string];
    const res = await app
      .request()
      [method.toLowerCase() as 'get'](`/api${samplePath(path)}`)
      .send({});
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  for (const role of ROLES) {
    it.each(protectedRoutes)(`%s as ${role}`, async (route, access) => {
      const [method, path] = route.split(' ') as [string, string];
      const res = await app
        .request()
        [method.toLowerCase() as 'get'](`/api${samplePath(path)}`)
        .set('Authorization', `Bearer ${people[role].token}`)
        .send({});
      if ((access as readonly Role[]).includes(role)) {
        // Allowed: whatever the outcome of this empty request, it is not a refusal of the role.
        expect([401, 403]).not.toContain(res.status);
      } else {
        expect(res.status).toBe(403);
        expect(res.body.error).toEqual({ code: 'forbidden', message: 'Your role does not allow this' });
      }
    });
  }
});
