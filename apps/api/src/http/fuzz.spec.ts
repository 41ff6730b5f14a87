import { asc, eq, inArray } from 'drizzle-orm';
import fc from 'fast-check';
import { beforeAll, describe, expect, it } from 'vitest';
import {
  billingPeaks,
  buses,
  chargers,
  depotRatePlans,
  depots,
  idempotencyKeys,
  loadReductionWindows,
  meterImports,
  meterIntervals,
  powerCabinets,
  ratePlans,
  runs,
  serviceDays,
  users,
} from '../db/schema';
import { leafPaths, setAt } from '../../../../libs/contracts/src/testing/json-paths';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

// Malformed requests generated with a fixed seed against the write routes: every answer is a
// 4xx (never a 500), and the organisation's rows are exactly as before.

const SEED = 20261202;
const REQUESTS = 300;
const app = createTestApp();
let boss: TestUser;
let organisationId: string;
let depotId: string;
const NUMBERS = ['51', '52'];

beforeAll(async () => {
  const org = await createOrganisation(app, { boss: ['admin', 'supervisor', 'facilities', 'finance'] });
  boss = org.users.boss!;
  organisationId = org.organisationId;
  depotId = (await createDepot(app.db, organisationId)).depot.id;
  await addBuses(app.db, organisationId, depotId, NUMBERS);
  // Data already there, so a write that deleted before it validated would show.
  const as = { Authorization: `Bearer ${boss.token}` };
  await app
    .request()
    .put(`/api/depots/${depotId}/service-days/2026-12-07`)
    .set(as)
    .send({ runs: dayRuns('2026-12-07', NUMBERS) })
    .expect(200);
  await app
    .request()
    .put(`/api/depots/${depotId}/load-reduction-windows`)
    .set(as)
    .send({ windows: [{ start: '2026-12-08T16:00', end: '2026-12-08T19:00', limitKw: 100 }] })
    .expect(200);
  await app
    .request()
    .put(`/api/depots/${depotId}/peaks-so-far`)
    .set(as)
    .send({ billingPeriodStart: '2026-12-01', facilityKw: 80 })
    .expect(200);
  await app
    .request()
    .post(`/api/depots/${depotId}/meter-data`)
    .set(as)
    .send({
      fileName: 'n.csv',
      content: 'TYPE,DATE,START TIME,END TIME,USAGE,UNITS\nElectric usage,2026-12-01,02:00,02:14,7.5,kWh',
      billingPeriodStart: '2026-12-01',
    })
    .expect(201);
});

/** Every row of the organisation in the tables these routes write, in a stable order. */
async function snapshot(): Promise<string> {
  const org = (t: { organisationId: unknown }) => eq(t.organisationId as typeof runs.organisationId, organisationId);
  const people = await app.db.select().from(users).where(org(users)).orderBy(asc(users.id));
  const rows = {
    users: people,
    depots: await app.db.select().from(depots).where(org(depots)).orderBy(asc(depots.id)),
    cabinets: await app.db.select().from(powerCabinets).where(org(powerCabinets)).orderBy(asc(powerCabinets.id)),
    chargers: await app.db.select().from(chargers).where(org(chargers)).orderBy(asc(chargers.id)),
    buses: await app.db.select().from(buses).where(org(buses)).orderBy(asc(buses.id)),
    serviceDays: await app.db.select().from(serviceDays).where(org(serviceDays)).orderBy(asc(serviceDays.serviceDate)),
    runs: await app.db.select().from(runs).where(org(runs)).orderBy(asc(runs.id)),
    windows: await app.db
      .select()
      .from(loadReductionWindows)
      .where(org(loadReductionWindows))
      .orderBy(asc(loadReductionWindows.id)),
    peaks: await app.db.select().from(billingPeaks).where(org(billingPeaks)),
    intervals: await app.db
      .select()
      .from(meterIntervals)
      .where(org(meterIntervals))
      .orderBy(asc(meterIntervals.startsAt)),
    imports: await app.db.select().from(meterImports).where(org(meterImports)).orderBy(asc(meterImports.id)),
    ratePlans: await app.db.select().from(ratePlans).where(org(ratePlans)).orderBy(asc(ratePlans.id)),
    assignments: await app.db.select().from(depotRatePlans).where(org(depotRatePlans)).orderBy(asc(depotRatePlans.id)),
    keys: await app.db
      .select()
      .from(idempotencyKeys)
      .where(
        inArray(
          idempotencyKeys.userId,
          people.map((p) => p.id),
        ),
      ),
  };
  return JSON.stringify(rows);
}

const uuid = '00000000-0000-4000-8000-000000000000';
interface Route {
  method: 'put' | 'post';
  path: (p: { depotId: string; date: string }) => string;
  body: unknown;
}
const ROUTES: Route[] = [
  {
    method: 'put',
    path: (p) => `/api/depots/${p.depotId}/service-days/${p.date}`,
    body: { forecastLowF: 20, runs: dayRuns('2026-12-09', NUMBERS) },
  },
  {
    method: 'post',
    path: (p) => `/api/depots/${p.depotId}/service-days/${p.date}/csv`,
    body: { csv: 'bus,pull_out,pull_in,miles\n51,06:10,08:40,30\n', forecastLowF: null },
  },
  {
    method: 'post',
    path: (p) => `/api/depots/${p.depotId}/service-days/${p.date}/copy`,
    body: { fromDate: '2026-12-07', replace: true },
  },
  {
    method: 'put',
    path: (p) => `/api/depots/${p.depotId}/load-reduction-windows`,
    body: { windows: [{ start: '2026-12-10T16:00', end: '2026-12-10T18:00', limitKw: 90, note: 'x' }] },
  },
  {
    method: 'put',
    path: (p) => `/api/depots/${p.depotId}/peaks-so-far`,
    body: { billingPeriodStart: '2026-12-01', facilityKw: 120, periods: { 'on-peak': 100 } },
  },
  {
    method: 'post',
    path: (p) => `/api/depots/${p.depotId}/meter-data`,
    body: {
      fileName: 'm.csv',
      content: 'TYPE,DATE,START TIME,END TIME,USAGE,UNITS\nElectric usage,2026-12-03,22:00,22:14,7.5,kWh',
      billingPeriodStart: '2026-12-01',
    },
  },
  {
    method: 'post',
    path: (p) => `/api/depots/${p.depotId}/buses`,
    body: { number: '77', usableKwh: 200, maxChargeKw: 60, connector: 'CCS2', kwhPerMile: 1.2 },
  },
  {
    method: 'put',
    path: (p) => `/api/depots/${p.depotId}`,
    body: { name: 'Renamed', timezone: 'America/Chicago', serviceLimitKw: 400, otherLoadKw: [10], billingStartDay: 1 },
  },
  {
    method: 'post',
    path: (p) => `/api/depots/${p.depotId}/rate-plans`,
    body: { ratePlanId: uuid, effectiveFrom: '2026-06-01' },
  },
  {
    method: 'post',
    path: () => '/api/users/invite',
    body: { email: 'fuzz@test.nightyard.example', name: 'Fuzz', roles: ['yard'], depotIds: [uuid] },
  },
];

/** Text no field accepts: a NUL or a lone surrogate makes any body invalid wherever it lands. */
const poison = fc.constantFrom('\u0000', 'a\u0000b', '\ud800', 'x\udc00', '51\u0000');
const nasty = fc.oneof(
  poison,
  fc.constantFrom(
    1e308,
    -1e308,
    1e300,
    -1,
    0,
    1e7,
    '',
    ' ',
    '0000-01-01',
    '9999-12-31',
    '9999-12-31T23:59',
    '2026-02-30',
    'x'.repeat(3000),
    true,
    null,
    {},
    [],
    [[]],
  ),
  fc.string({ maxLength: 12 }),
  fc.double(),
);
/** Path segments that are never a valid id or date: bad percent-encoding, years out of range. */
const badSegment = fc.constantFrom(
  '%ED%A0%80',
  '%E0%A4%A',
  '%00',
  '%FF%FE',
  'not-a-uuid',
  '0000-01-01',
  '9999-12-31',
  '2026-13-01',
  uuid,
);

/** A valid body with a poisoned leaf (placed last, so nothing overwrites it) and up to two other nasty values. */
const poisonedBody = (body: unknown) => {
  const paths = leafPaths(body).filter((p) => p.length > 0);
  return fc
    .tuple(fc.array(fc.tuple(fc.nat(paths.length - 1), nasty), { maxLength: 2 }), fc.nat(paths.length - 1), poison)
    .map(([changes, at, bad]) =>
      setAt(
        changes.reduce((acc, [i, v]) => setAt(acc, paths[i]!, v), body),
        paths[at]!,
        bad,
      ),
    );
};

const request = fc.nat(ROUTES.length - 1).chain((r) => {
  const route = ROUTES[r]!;
  const hasParams = route.path({ depotId: 'D', date: 'X' }).includes('D');
  const body = fc.oneof(
    {
      weight: 5,
      arbitrary: poisonedBody(route.body).map((b) => ({ json: b as object, raw: undefined as string | undefined })),
    },
    {
      weight: 1,
      arbitrary: fc
        .constantFrom('{"runs": ', '[1,', '"text"', '42', 'null', '{"a":1}}')
        .map((raw) => ({ json: undefined, raw })),
    },
  );
  const params = hasParams
    ? fc.record({
        depotId: fc.oneof(fc.constant('OK'), badSegment),
        date: fc.oneof(fc.constant('2026-12-09'), badSegment),
      })
    : fc.constant({ depotId: 'OK', date: '2026-12-09' });
  const key = fc.option(fc.constantFrom('k1', 'has space', 'x'.repeat(300)), { nil: undefined });
  return fc.record({ route: fc.constant(route), body, params, key });
});

describe('fuzzing the write routes', () => {
  it(`${REQUESTS} malformed requests: each answers 4xx and nothing changes`, async () => {
    const before = await snapshot();
    const codes = new Set<string>();
    await fc.assert(
      fc.asyncProperty(request, async ({ route, body, params, key }) => {
        const path = route.path({ depotId: params.depotId === 'OK' ? depotId : params.depotId, date: params.date });
        let req = app.request()[route.method](path).set('Authorization', `Bearer ${boss.token}`);
        if (key) req = req.set('Idempotency-Key', key);
        const res =
          body.raw !== undefined
            ? await req.set('Content-Type', 'application/json').send(body.raw)
            : await req.send(body.json);
        codes.add(res.body.error?.code);
        expect(
          res.status,
          `${route.method.toUpperCase()} ${path} ${JSON.stringify(body)} -> ${JSON.stringify(res.body)}`,
        ).toBeGreaterThanOrEqual(400);
        expect(res.status).toBeLessThan(500);
        expect(res.body.error?.message).toEqual(expect.any(String));
      }),
      { seed: SEED, numRuns: REQUESTS, endOnFailure: true },
    );
    expect(await snapshot()).toEqual(before);
    // The run reached both the checks of bodies and parameters and the refusal of unreadable input.
    expect([...codes].sort()).toEqual(expect.arrayContaining(['bad_request', 'validation_failed']));
  });
});
