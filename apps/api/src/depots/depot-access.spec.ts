import { randomUUID } from 'node:crypto';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Role } from '@nightyard/contracts';
import { KnownUsers } from '../auth/known-users';
import { userDepots } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { until } from '../testing/notices';
import { publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';
import { TEST_DATABASE_URL } from '../testing/test-env';

// With the signed-in user cache, as in production: a removed depot must be refused all the same.
const known = new KnownUsers(TEST_DATABASE_URL);
const app = createTestApp({ knownUsers: known });
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });

const EVERYONE_BUT_ADMIN: Role[] = ['yard', 'supervisor', 'facilities', 'finance'];
const NUMBERS = ['71', '72'];
const DEPOT_GONE = 'That depot was not found';
const PLAN_GONE = 'That plan was not found';

let depotA: string;
let depotB: string;
let theirDepot: string;
let planB: string;
/** Every role but admin, assigned depot A only / depots A and B; an administrator assigned none. */
let onlyA: TestUser;
let both: TestUser;
let admin: TestUser;
let theirAdmin: TestUser;

beforeAll(async () => {
  await known.start();
  const org = await createOrganisation(app, { one: EVERYONE_BUT_ADMIN, both: EVERYONE_BUT_ADMIN, admin: ['admin'] });
  ({ one: onlyA, both, admin } = org.users as Record<string, TestUser>);
  depotA = (await createDepot(app.db, org.organisationId, 'Depot A', false)).depot.id;
  depotB = (await createDepot(app.db, org.organisationId, 'Depot B', false)).depot.id;
  await app.db.insert(userDepots).values([
    { userId: onlyA.id, depotId: depotA },
    { userId: both.id, depotId: depotA },
    { userId: both.id, depotId: depotB },
  ]);
  const other = await createOrganisation(app, { admin: ['admin'] });
  theirAdmin = other.users.admin!;
  theirDepot = (await createDepot(app.db, other.organisationId, 'Their depot')).depot.id;
  // A real published plan at depot B, for the routes that take a plan id.
  await addBuses(app.db, org.organisationId, depotB, NUMBERS);
  for (const date of ['2026-12-02', '2026-12-03']) {
    await app
      .request()
      .put(`/api/depots/${depotB}/service-days/${date}`)
      .set(as(both))
      .send({ forecastLowF: 30, runs: dayRuns(date, NUMBERS, () => 40) })
      .expect(200);
  }
  planB = await publishedPlan(app, both, depotB, '2026-12-02');
}, 60_000);
afterAll(() => known.close());

const filled = (path: string, depotId: string) =>
  path
    .replace(':depotId', depotId)
    .replace(':id', randomUUID())
    .replace(':effectiveFrom', '2026-01-01')
    .replace(':date', '2026-12-09');

/** Every route of the registry on a depot, and every route that reaches a depot through a plan id. */
const depotRoutes = () => app.routes.filter((r) => r.path.includes(':depotId'));

/** How each route that takes a plan id (not in its path's depot) is asked, with a plan id. */
const PLAN_ROUTES: Record<string, (planId: string) => { path: string; query?: object; body?: object }> = {
  'GET /plans/:id': (id) => ({ path: `/plans/${id}` }),
  'GET /plans/:id/scenario': (id) => ({ path: `/plans/${id}/scenario` }),
  'GET /plans/:id/compare': (id) => ({ path: `/plans/${id}/compare`, query: { with: id } }),
  'GET /plans/:id/adoption': (id) => ({ path: `/plans/${id}/adoption` }),
  'POST /plans/:id/adopt': (id) => ({ path: `/plans/${id}/adopt` }),
  'POST /plans/:id/publish': (id) => ({ path: `/plans/${id}/publish`, body: { expectedPublishedId: null } }),
  'GET /plans/:id/costs': (id) => ({ path: `/plans/${id}/costs` }),
  'GET /plans/:id/ocpp': (id) => ({ path: `/plans/${id}/ocpp`, query: { version: '1.6' } }),
  'POST /yard/confirmations': (planId) => ({ path: '/yard/confirmations', body: { planId, stepKey: 'none' } }),
};

async function call(user: TestUser, method: string, path: string, query?: object, body?: object) {
  const res = await app
    .request()
    [method.toLowerCase() as 'get'](`/api${path}`)
    .query(query ?? {})
    .set(as(user))
    .send(body ?? {});
  return { status: res.status, message: res.body?.error?.message as string | undefined };
}

describe('the per-depot access matrix (from the route registry)', () => {
  it('knows every route that takes a plan id, and there are depot routes to check', () => {
    const planRoutes = app.routes
      .filter((r) => r.path.startsWith('/plans/:id') || r.path === '/yard/confirmations')
      .map((r) => `${r.method.toUpperCase()} ${r.path}`);
    expect(planRoutes.sort()).toEqual(Object.keys(PLAN_ROUTES).sort());
    expect(depotRoutes().length).toBeGreaterThan(30);
  });

  it('a person assigned depot A gets 404 "That depot" on every route of depot B, as for another organisation\'s depot', async () => {
    for (const r of depotRoutes()) {
      const method = r.method.toUpperCase();
      for (const depot of [depotB, theirDepot]) {
        const res = await call(onlyA, method, filled(r.path, depot));
        expect(res, `${method} ${r.path} (${depot === depotB ? 'depot B' : 'their depot'})`).toEqual({
          status: 404,
          message: DEPOT_GONE,
        });
      }
    }
  });

  it('a person assigned depot A gets 404 "That plan" for a plan of depot B, on every route taking a plan id', async () => {
    for (const [route, ask] of Object.entries(PLAN_ROUTES)) {
      const { path, query, body } = ask(planB);
      expect(await call(onlyA, route.split(' ')[0]!, path, query, body), route).toEqual({
        status: 404,
        message: PLAN_GONE,
      });
    }
  });

  it('a person holding A and B, and an administrator holding none, get through to depot B; another organisation cannot', async () => {
    for (const user of [both, admin]) {
      for (const r of depotRoutes()) {
        // The live stream stays open while allowed; it is checked below.
        if (r.path.endsWith('/live')) continue;
        const method = r.method.toUpperCase();
        const res = await call(user, method, filled(r.path, depotB));
        expect(res.message, `${method} ${r.path}`).not.toBe(DEPOT_GONE);
        expect([401, 403, 500], `${method} ${r.path}`).not.toContain(res.status);
      }
      for (const [route, ask] of Object.entries(PLAN_ROUTES)) {
        const { path, query, body } = ask(planB);
        const res = await call(user, route.split(' ')[0]!, path, query, body);
        expect(res.message, route).not.toBe(PLAN_GONE);
        expect([401, 403, 500], route).not.toContain(res.status);
      }
    }
    // Another organisation's administrator sees every depot of theirs, and none of ours (a request
    // body is checked before the depot is read, so these are the reads that need none).
    for (const [path, query] of [
      ['', {}],
      ['/night', {}],
      ['/buses', {}],
      ['/plans', {}],
      ['/tonight', {}],
      ['/costs/month', { date: '2026-12-10' }],
      ['/live', {}],
    ] as const) {
      const res = await call(theirAdmin, 'GET', `/depots/${depotB}${path}`, query);
      expect(res, path).toEqual({ status: 404, message: DEPOT_GONE });
    }
    expect(await call(theirAdmin, 'GET', `/plans/${planB}`)).toEqual({ status: 404, message: PLAN_GONE });
  });

  it('the plans of a depot answer 200 to whoever holds it', async () => {
    for (const user of [both, admin]) {
      expect((await call(user, 'GET', `/plans/${planB}`)).status).toBe(200);
      expect((await call(user, 'GET', `/depots/${depotB}/plans`)).status).toBe(200);
    }
  });

  it('a depot taken from a person is refused on their very next request (API edit, then a direct write)', async () => {
    const { users: p, organisationId } = await createOrganisation(app, { boss: ['admin'], sup: ['supervisor'] });
    const one = (await createDepot(app.db, organisationId, 'One', false)).depot.id;
    const two = (await createDepot(app.db, organisationId, 'Two', false)).depot.id;
    await app
      .request()
      .patch(`/api/users/${p.sup!.id}`)
      .set(as(p.boss!))
      .send({ depotIds: [one, two] })
      .expect(200);
    // Read (and kept by the cache) with both depots.
    expect((await call(p.sup!, 'GET', `/depots/${two}/buses`)).status).toBe(200);
    expect((await call(p.sup!, 'GET', `/depots/${two}/buses`)).status).toBe(200);
    await app
      .request()
      .patch(`/api/users/${p.sup!.id}`)
      .set(as(p.boss!))
      .send({ depotIds: [one] })
      .expect(200);
    expect(await call(p.sup!, 'GET', `/depots/${two}/buses`)).toEqual({ status: 404, message: DEPOT_GONE });
    expect((await call(p.sup!, 'GET', `/depots/${one}/buses`)).status).toBe(200);
    // Another process removing the assignment straight in the database: the trigger tells the cache.
    await app.db.execute(sql`delete from user_depots where user_id = ${p.sup!.id} and depot_id = ${one}`);
    await until(
      async () => (await call(p.sup!, 'GET', `/depots/${one}/buses`)).status === 404,
      'the removed depot is refused',
    );
  });

  it('the live stream of a depot not held is 404 at once', async () => {
    expect(await call(onlyA, 'GET', `/depots/${depotB}/live`)).toEqual({ status: 404, message: DEPOT_GONE });
  });
});

describe('the depot list and the chosen depot', () => {
  it('lists only the depots the caller may see; an administrator sees every depot of the organisation', async () => {
    const names = async (u: TestUser) =>
      ((await app.request().get('/api/depots').set(as(u)).expect(200)).body.depots as { id: string }[]).map(
        (d) => d.id,
      );
    expect(await names(onlyA)).toEqual([depotA]);
    expect(await names(both)).toEqual([depotA, depotB]);
    expect(await names(admin)).toEqual([depotA, depotB]);
    expect(await names(theirAdmin)).toEqual([theirDepot]);
  });

  it('remembers the chosen depot per person; a depot not visible is 404 and changes nothing', async () => {
    const { users: p, organisationId } = await createOrganisation(app, { boss: ['admin'], sup: ['supervisor'] });
    const one = (await createDepot(app.db, organisationId, 'One', false)).depot.id;
    const two = (await createDepot(app.db, organisationId, 'Two', false)).depot.id;
    await app.db.insert(userDepots).values([{ userId: p.sup!.id, depotId: one }]);
    const list = async (u: TestUser) => (await app.request().get('/api/depots').set(as(u)).expect(200)).body;
    expect((await list(p.sup!)).chosenDepotId).toBeNull();
    const chosen = await app.request().put('/api/me/depot').set(as(p.sup!)).send({ depotId: one }).expect(200);
    expect(chosen.body).toEqual({ chosenDepotId: one });
    expect((await list(p.sup!)).chosenDepotId).toBe(one);
    // Per person: the administrator's choice is their own.
    expect((await list(p.boss!)).chosenDepotId).toBeNull();
    await app.request().put('/api/me/depot').set(as(p.boss!)).send({ depotId: two }).expect(200);
    expect((await list(p.boss!)).chosenDepotId).toBe(two);
    expect((await list(p.sup!)).chosenDepotId).toBe(one);
    // Not held, another organisation's, or none at all: the same 404, and the choice stays.
    for (const depotId of [two, theirDepot, randomUUID()]) {
      const res = await app.request().put('/api/me/depot').set(as(p.sup!)).send({ depotId }).expect(404);
      expect(res.body.error.message).toBe(DEPOT_GONE);
    }
    expect((await list(p.sup!)).chosenDepotId).toBe(one);
    await app.request().put('/api/me/depot').set(as(p.sup!)).send({ depotId: 'x' }).expect(400);
    // A chosen depot no longer held reads as not chosen; a removed depot forgets the choice.
    await app.db.execute(sql`delete from user_depots where user_id = ${p.sup!.id}`);
    await until(async () => (await list(p.sup!)).chosenDepotId === null, 'the choice no longer counts');
    await app.db.execute(sql`delete from depots where id = ${two}`);
    expect((await list(p.boss!)).chosenDepotId).toBeNull();
  });
});
