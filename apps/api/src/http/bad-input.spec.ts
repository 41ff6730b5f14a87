import { readFileSync } from 'node:fs';
import { count, eq } from 'drizzle-orm';
import express from 'express';
import supertest from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { MAX_RUNS_PER_DAY } from '@nightyard/contracts';
import {
  billingPeaks,
  buses,
  depotRatePlans,
  loadReductionWindows,
  meterImports,
  meterIntervals,
  runs,
  serviceDays,
  users,
} from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses } from '../testing/fleet-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';
import { errorHandler } from './error-handler';

const app = createTestApp();
let admin: TestUser;
let boss: TestUser;
let organisationId: string;
let depotId: string;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const NUMBERS = ['41', '42', '43', '44', '45', '46', '47', '48'];

beforeAll(async () => {
  const org = await createOrganisation(app, {
    admin: ['admin'],
    boss: ['admin', 'supervisor', 'facilities', 'finance'],
  });
  ({ organisationId } = org);
  admin = org.users.admin!;
  boss = org.users.boss!;
  depotId = (await createDepot(app.db, organisationId)).depot.id;
  await addBuses(app.db, organisationId, depotId, NUMBERS);
});

/** Rows the organisation holds in the tables these requests could write to. */
async function footprint() {
  const n = async (
    table:
      | typeof runs
      | typeof users
      | typeof buses
      | typeof serviceDays
      | typeof loadReductionWindows
      | typeof meterIntervals
      | typeof meterImports
      | typeof billingPeaks
      | typeof depotRatePlans,
  ) => (await app.db.select({ n: count() }).from(table).where(eq(table.organisationId, organisationId)))[0]!.n;
  return {
    users: await n(users),
    buses: await n(buses),
    serviceDays: await n(serviceDays),
    runs: await n(runs),
    windows: await n(loadReductionWindows),
    intervals: await n(meterIntervals),
    imports: await n(meterImports),
    peaks: await n(billingPeaks),
    ratePlans: await n(depotRatePlans),
  };
}

const peopleCount = async () =>
  (await app.db.select({ n: count() }).from(users).where(eq(users.organisationId, organisationId)))[0]!.n;

describe('bad input gets a 4xx that says what is wrong, and writes nothing', () => {
  it('malformed JSON', async () => {
    const res = await app
      .request()
      .post('/api/auth/login')
      .set('Content-Type', 'application/json')
      .send('{"email": ')
      .expect(400);
    expect(res.body).toEqual({ error: { code: 'bad_request', message: 'The request body is not valid JSON' } });
    expect(JSON.stringify(res.body)).not.toMatch(/at .*\.ts|node_modules/);
  });

  it('missing and wrong-typed fields on login', async () => {
    const res = await app.request().post('/api/auth/login').send({ email: 42 }).expect(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['email', 'password']);
    expect(res.body.error.fields.password).toBe('Required');
  });

  it('unknown fields are named', async () => {
    const before = await peopleCount();
    const res = await app
      .request()
      .post('/api/users/invite')
      .set('Authorization', `Bearer ${admin.token}`)
      .send({ email: 'x@test.nightyard.example', name: 'X', roles: ['yard'], depotIds: [depotId], isAdmin: true })
      .expect(400);
    expect(res.body.error.fields.isAdmin).toBe('Unknown field "isAdmin": remove it');
    expect(await peopleCount()).toBe(before);
  });

  it('an unknown role and an empty role list on invite', async () => {
    const before = await peopleCount();
    const bad = await app
      .request()
      .post('/api/users/invite')
      .set('Authorization', `Bearer ${admin.token}`)
      .send({ email: 'y@test.nightyard.example', name: 'Y', roles: ['driver'], depotIds: [depotId] })
      .expect(400);
    expect(bad.body.error.fields['roles[0]']).toMatch(/admin.*facilities.*supervisor.*yard.*finance/);
    const empty = await app
      .request()
      .post('/api/users/invite')
      .set('Authorization', `Bearer ${admin.token}`)
      .send({ email: 'y@test.nightyard.example', name: 'Y', roles: [], depotIds: [depotId] })
      .expect(400);
    expect(empty.body.error.fields.roles).toBe('Choose at least one role');
    expect(await peopleCount()).toBe(before);
  });

  it('a path parameter that is not an id', async () => {
    const res = await app
      .request()
      .patch('/api/users/not-a-uuid')
      .set('Authorization', `Bearer ${admin.token}`)
      .send({ name: 'Z' })
      .expect(400);
    expect(res.body.error.fields.id).toBe('Not a user id');
  });

  it('an empty change', async () => {
    const res = await app
      .request()
      .patch(`/api/users/${admin.id}`)
      .set('Authorization', `Bearer ${admin.token}`)
      .send({})
      .expect(400);
    expect(res.body.error.message).toMatch(/at least one of name, roles, active/);
  });

  it('an oversize body', async () => {
    const res = await app
      .request()
      .post('/api/auth/login')
      .send({ email: 'a@b.example', password: 'x'.repeat(2_000_000) })
      .expect(413);
    expect(res.body.error.code).toBe('payload_too_large');
  });

  it('an unknown API path is a JSON 404', async () => {
    const res = await app.request().get('/api/no-such-thing').expect(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('malformed percent-encoding in a path parameter', async () => {
    for (const path of ['/api/users/%E0%A4%A', '/api/users/%ED%A0%80', `/api/depots/${depotId}/service-days/%FF`]) {
      const res = await app.request().patch(path).set(as(admin)).send({ name: 'Z' });
      expect(res.status, path).toBe(400);
      expect(res.body.error.code).toBe('bad_request');
    }
    await app.request().get('/api/depots/%C0%AF').set(as(boss)).expect(400);
  });

  it('a NUL character or a lone surrogate in any text field names the field', async () => {
    const before = await footprint();
    const invite = await app
      .request()
      .post('/api/users/invite')
      .set(as(admin))
      .send({ email: 'nul@test.nightyard.example', name: 'A\u0000B', roles: ['yard'], depotIds: [depotId] })
      .expect(400);
    expect(invite.body.error.fields.name).toMatch(/NUL character/);
    const surrogate = await app
      .request()
      .post('/api/users/invite')
      .set(as(admin))
      .set('Content-Type', 'application/json')
      .send('{"email":"s@test.nightyard.example","name":"\\ud800x","roles":["yard"]}')
      .expect(400);
    expect(surrogate.body.error.fields.name).toMatch(/lone UTF-16 surrogate/);
    const bus = await app
      .request()
      .post(`/api/depots/${depotId}/buses`)
      .set(as(boss))
      .send({ number: '9\u0000', usableKwh: 200, maxChargeKw: 60, connector: 'CCS2', kwhPerMile: 1.2 })
      .expect(400);
    expect(bus.body.error.fields.number).toMatch(/NUL/);
    const csv = await app
      .request()
      .post(`/api/depots/${depotId}/service-days/2026-12-07/csv`)
      .set(as(boss))
      .send({ csv: 'bus,pull_out,pull_in,miles\n41\u0000,06:10,08:00,30\n' })
      .expect(400);
    expect(csv.body.error.fields.csv).toMatch(/NUL/);
    const meter = await app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(boss))
      .send({ fileName: 'a\u0000.csv', content: 'x', billingPeriodStart: '2026-12-01' })
      .expect(400);
    expect(meter.body.error.fields.fileName).toMatch(/NUL/);
    const windows = await app
      .request()
      .put(`/api/depots/${depotId}/load-reduction-windows`)
      .set(as(boss))
      .send({ windows: [{ start: '2026-12-08T16:00', end: '2026-12-08T19:00', limitKw: 100, note: '\u0000' }] })
      .expect(400);
    expect(windows.body.error.fields['windows[0].note']).toMatch(/NUL/);
    expect(await footprint()).toEqual(before);
  });

  it('a lone surrogate or other junk where an id belongs is a 400, not a crash', async () => {
    for (const id of [
      '%ED%B0%80',
      encodeURIComponent('\u{1F600}'),
      'x'.repeat(300),
      '00000000-0000-0000-0000-00000000000g',
    ]) {
      const res = await app.request().get(`/api/depots/${id}`).set(as(boss));
      expect(res.status, id).toBe(400);
    }
  });

  it('dates outside the years 2000 to 2100 are refused', async () => {
    const before = await footprint();
    for (const date of ['0000-01-01', '9999-12-31', '1999-12-31', '2101-01-01']) {
      const res = await app
        .request()
        .put(`/api/depots/${depotId}/service-days/${date}`)
        .set(as(boss))
        .send({ runs: [] });
      expect(res.status, date).toBe(400);
      expect(res.body.error.fields.date).toMatch(/2000 to 2100/);
    }
    const win = await app
      .request()
      .put(`/api/depots/${depotId}/load-reduction-windows`)
      .set(as(boss))
      .send({ windows: [{ start: '9999-12-31T16:00', end: '9999-12-31T19:00', limitKw: 100 }] })
      .expect(400);
    expect(win.body.error.fields['windows[0].start']).toMatch(/2000 to 2100/);
    const feb30 = await app
      .request()
      .put(`/api/depots/${depotId}/load-reduction-windows`)
      .set(as(boss))
      .send({ windows: [{ start: '2026-02-30T16:00', end: '2026-02-30T19:00', limitKw: 100 }] })
      .expect(400);
    expect(feb30.body.error.fields['windows[0].start']).toBe('That day does not exist');
    const plan = await app
      .request()
      .post(`/api/depots/${depotId}/rate-plans`)
      .set(as(boss))
      .send({ ratePlanId: '00000000-0000-4000-8000-000000000000', effectiveFrom: '0000-01-01' })
      .expect(400);
    expect(plan.body.error.fields.effectiveFrom).toMatch(/2000 to 2100/);
    await app.request().get(`/api/depots/${depotId}/costs/month?date=9999-12-31`).set(as(boss)).expect(400);
    expect(await footprint()).toEqual(before);
  });

  it('a reading of 1e308 kWh or a multiplier of 10^400 is refused before anything is stored', async () => {
    const before = await footprint();
    const csv = [
      'TYPE,DATE,START TIME,END TIME,USAGE,UNITS',
      'Electric usage,2026-12-02,22:00,22:14,7.5,kWh',
      'Electric usage,2026-12-02,22:15,22:29,1e308,kWh',
    ].join('\n');
    const big = await app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(boss))
      .send({ fileName: 'big.csv', content: csv, billingPeriodStart: '2026-12-01' })
      .expect(400);
    expect(big.body.error.fields['line 3.USAGE']).toMatch(/2026-12-02 22:15: .*above 100,000 kW/);
    const xml = readFileSync(new URL('../costs/fixtures/green-button-night.xml', import.meta.url), 'utf8');
    const power = await app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(boss))
      .send({
        fileName: 'p.xml',
        content: xml.replace(/<espi:powerOfTenMultiplier>2</, '<espi:powerOfTenMultiplier>400<'),
        billingPeriodStart: '2026-12-01',
      })
      .expect(400);
    expect(power.body.error.fields['ReadingType.powerOfTenMultiplier']).toMatch(/-12 to 12/);
    const huge = await app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(boss))
      .send({
        fileName: 'h.xml',
        content: xml.replace('<value>120</value>', '<value>1000000000000</value>'),
        billingPeriodStart: '2026-12-01',
      })
      .expect(400);
    expect(huge.body.error.fields['IntervalReading[1].value']).toMatch(/above 100,000 kW/);
    const peaks = await app
      .request()
      .put(`/api/depots/${depotId}/peaks-so-far`)
      .set(as(boss))
      .send({ billingPeriodStart: '2026-12-01', facilityKw: 1e308 })
      .expect(400);
    expect(peaks.body.error.fields.facilityKw).toMatch(/too large/);
    expect(await footprint()).toEqual(before);
    // The depot and its costs still answer for every role.
    await app.request().get(`/api/depots/${depotId}`).set(as(boss)).expect(200);
    await app.request().get(`/api/depots/${depotId}/costs/month?date=2026-12-02`).set(as(boss)).expect(200);
  });

  it('URDB rates out of range name the field', async () => {
    const record = JSON.parse(
      readFileSync(new URL('../rates/fixtures/urdb-summer-winter-evening-peak.json', import.meta.url), 'utf8'),
    );
    for (const [rate, message] of [
      [-5, /0 or more/],
      [-50, /Prices are -10 to 100/],
      [1e300, /Prices are -10 to 100/],
    ] as const) {
      const bad = structuredClone(record);
      bad.energyratestructure[0][0].rate = rate;
      const res = await app.request().post('/api/rate-plans/import-urdb').set(as(boss)).send(bad).expect(400);
      expect(res.body.error.fields['energyratestructure[0][0].rate']).toMatch(message);
    }
    const negative = structuredClone(record);
    negative.energyratestructure[0][0] = { rate: 0.05, adj: -0.5 };
    const res = await app.request().post('/api/rate-plans/import-urdb').set(as(boss)).send(negative).expect(400);
    expect(res.body.error.fields['energyratestructure[0][0].rate']).toMatch(/0 or more/);
    const demand = structuredClone(record);
    demand.flatdemandstructure[0][0].rate = 1e6;
    const d = await app.request().post('/api/rate-plans/import-urdb').set(as(boss)).send(demand).expect(400);
    expect(d.body.error.fields['flatdemandstructure[0][0].rate']).toMatch(/0 to 10,000 \$\/kW/);
  });

  it(`a runs file holds at most ${MAX_RUNS_PER_DAY} rows; a full one is stored whole`, async () => {
    const date = '2026-12-14';
    const hhmm = (m: number) => `${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`;
    // Each bus makes one-minute runs two minutes apart, all on the service day.
    const rows = (n: number) =>
      Array.from({ length: n }, (_, k) => {
        const bus = NUMBERS[k % NUMBERS.length]!;
        const slot = Math.floor(k / NUMBERS.length);
        return `${bus},${hhmm(slot * 2)},${hhmm(slot * 2 + 1)},1,,`;
      });
    const file = (n: number) => ['bus,pull_out,pull_in,miles,kwh,arrival_soc_pct', ...rows(n)].join('\n');
    const before = await footprint();
    const tooMany = await app
      .request()
      .post(`/api/depots/${depotId}/service-days/${date}/csv`)
      .set(as(boss))
      .send({ csv: file(MAX_RUNS_PER_DAY + 1) })
      .expect(413);
    expect(tooMany.body.error.message).toMatch(new RegExp(`at most ${MAX_RUNS_PER_DAY}`));
    expect(await footprint()).toEqual(before);
    await app
      .request()
      .post(`/api/depots/${depotId}/service-days/${date}/csv`)
      .set(as(boss))
      .send({ csv: file(MAX_RUNS_PER_DAY) })
      .expect(200);
    const stored = await app.db.select({ n: count() }).from(runs).where(eq(runs.depotId, depotId));
    expect(stored[0]!.n).toBe(MAX_RUNS_PER_DAY);
  });

  it('a unique violation from the database answers 409, never 500', async () => {
    const tiny = express();
    tiny.get('/dup', () => {
      throw Object.assign(new Error('Failed query'), {
        cause: Object.assign(new Error('duplicate key value'), { code: '23505' }),
      });
    });
    tiny.use(errorHandler);
    const res = await supertest(tiny).get('/dup').expect(409);
    expect(res.body.error.code).toBe('conflict');
  });

  it('a value the database cannot store answers 400, never 500', async () => {
    const tiny = express();
    tiny.get('/range', () => {
      throw Object.assign(new Error('Failed query'), {
        cause: Object.assign(new Error('integer out of range'), { code: '22003' }),
      });
    });
    tiny.use(errorHandler);
    const res = await supertest(tiny).get('/range').expect(400);
    expect(res.body.error.code).toBe('bad_request');
  });

  it('the server keeps serving after all of the above', async () => {
    await app.request().get('/api/health').expect(200, { status: 'ok' });
  });
});
