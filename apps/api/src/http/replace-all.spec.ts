import { and, eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { billingPeaks, idempotencyKeys, loadReductionWindows, meterIntervals, runs, users } from '../db/schema';
import { requestHash } from './idempotency';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { mailFor } from '../testing/mail';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

// Replace-all writes sent at the same moment: the stored set is exactly one request's set,
// never the sum of several nor a mix of two.

const app = createTestApp();
const NUMBERS = ['31', '32', '33', '34'];
const TIMES = 10;
let boss: TestUser;
let organisationId: string;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const key = () => `k-${Math.random().toString(36).slice(2)}`;
const all = <T>(n: number, send: (i: number) => PromiseLike<T>) =>
  Promise.all(Array.from({ length: n }, (_, i) => send(i)));

let inviteDepotId: string;
beforeAll(async () => {
  const org = await createOrganisation(app, { boss: ['admin', 'supervisor', 'facilities', 'finance'] });
  boss = org.users.boss!;
  organisationId = org.organisationId;
  inviteDepotId = (await createDepot(app.db, organisationId)).depot.id;
});

async function newDepot() {
  const { depot } = await createDepot(app.db, organisationId);
  await addBuses(app.db, organisationId, depot.id, NUMBERS);
  return depot.id;
}

/** A day's runs as comparable lines, from the API's answer or from what was sent. */
const runLines = (list: { busNumber: string; pullOut: string; pullIn: string; miles: number | null }[]) =>
  list.map((r) => `${r.busNumber} ${r.pullOut} ${r.pullIn} ${r.miles}`).sort();

async function storedRuns(depotId: string, date: string) {
  const res = await app.request().get(`/api/depots/${depotId}/service-days/${date}`).set(as(boss)).expect(200);
  const count = (
    await app.db
      .select()
      .from(runs)
      .where(and(eq(runs.depotId, depotId), eq(runs.serviceDate, date)))
  ).length;
  expect(count).toBe(res.body.runs.length);
  return runLines(res.body.runs);
}

describe("a service day's runs", () => {
  const date = '2026-12-07';

  it('10 identical replacements at once store one set', async () => {
    const depotId = await newDepot();
    const body = { forecastLowF: 30, runs: dayRuns(date, NUMBERS) };
    const answers = await all(TIMES, () =>
      app.request().put(`/api/depots/${depotId}/service-days/${date}`).set(as(boss)).send(body),
    );
    expect(answers.map((a) => a.status)).toEqual(Array(TIMES).fill(200));
    expect(await storedRuns(depotId, date)).toEqual(
      runLines(dayRuns(date, NUMBERS).map((r) => ({ ...r, miles: r.miles }))),
    );
  });

  it('two different replacements at once leave exactly one of them', async () => {
    const depotId = await newDepot();
    const a = dayRuns(date, ['31', '32']);
    const b = dayRuns(date, ['33', '34']).slice(0, 3);
    const answers = await all(TIMES, (i) =>
      app
        .request()
        .put(`/api/depots/${depotId}/service-days/${date}`)
        .set(as(boss))
        .send({ runs: i % 2 ? a : b }),
    );
    expect(answers.map((x) => x.status)).toEqual(Array(TIMES).fill(200));
    expect([runLines(a), runLines(b)]).toContainEqual(await storedRuns(depotId, date));
  });

  const csv = (rows: string[]) => ['bus,pull_out,pull_in,miles,kwh,arrival_soc_pct', ...rows].join('\n');
  const fileA = csv(['31,06:10,08:25,31.5,,', '31,14:05,16:30,20,,', '32,06:20,08:40,25,,']);
  const fileB = csv(['33,07:00,09:00,40,,', '34,07:30,09:30,41,,']);
  const linesOf = (file: string) =>
    file
      .split('\n')
      .slice(1)
      .map((l) => {
        const [bus, out, back, miles] = l.split(',');
        return `${bus} ${date}T${out} ${date}T${back} ${Number(miles)}`;
      })
      .sort();

  it("10 identical CSV uploads at once store the file's runs once", async () => {
    const depotId = await newDepot();
    const answers = await all(TIMES, () =>
      app.request().post(`/api/depots/${depotId}/service-days/${date}/csv`).set(as(boss)).send({ csv: fileA }),
    );
    expect(answers.map((x) => x.status)).toEqual(Array(TIMES).fill(200));
    expect(await storedRuns(depotId, date)).toEqual(linesOf(fileA));
  });

  it("two different CSV files at once leave one file's rows, never a mix", async () => {
    const depotId = await newDepot();
    const answers = await all(TIMES, (i) =>
      app
        .request()
        .post(`/api/depots/${depotId}/service-days/${date}/csv`)
        .set(as(boss))
        .send({ csv: i % 2 ? fileA : fileB }),
    );
    expect(answers.map((x) => x.status)).toEqual(Array(TIMES).fill(200));
    expect([linesOf(fileA), linesOf(fileB)]).toContainEqual(await storedRuns(depotId, date));
  });
});

describe('load-reduction windows', () => {
  const setA = [
    { start: '2026-12-08T16:00', end: '2026-12-08T19:00', limitKw: 150, note: 'A1' },
    { start: '2026-12-09T16:00', end: '2026-12-09T19:00', limitKw: 120, note: 'A2' },
  ];
  const setB = [{ start: '2026-12-08T17:00', end: '2026-12-08T18:00', limitKw: 100, note: 'B1' }];
  const stored = async (depotId: string) =>
    (await app.db.select().from(loadReductionWindows).where(eq(loadReductionWindows.depotId, depotId)))
      .map((w) => `${w.note} ${w.limitKw}`)
      .sort();
  const put = (depotId: string, windows: unknown) =>
    app.request().put(`/api/depots/${depotId}/load-reduction-windows`).set(as(boss)).send({ windows });

  it('10 identical replacements at once store one set', async () => {
    const depotId = await newDepot();
    const answers = await all(TIMES, () => put(depotId, setA));
    expect(answers.map((x) => x.status)).toEqual(Array(TIMES).fill(200));
    expect(await stored(depotId)).toEqual(['A1 150', 'A2 120']);
  });

  it('two different sets at once leave exactly one of them', async () => {
    const depotId = await newDepot();
    const answers = await all(TIMES, (i) => put(depotId, i % 2 ? setA : setB));
    expect(answers.map((x) => x.status)).toEqual(Array(TIMES).fill(200));
    expect([['A1 150', 'A2 120'], ['B1 100']]).toContainEqual(await stored(depotId));
  });
});

describe('peaks so far', () => {
  it("different values at once leave one request's values whole", async () => {
    const depotId = await newDepot();
    const body = (i: number) => ({
      billingPeriodStart: '2026-12-01',
      facilityKw: 100 + i,
      periods: { 'on-peak': 100 + i },
    });
    const answers = await all(TIMES, (i) =>
      app.request().put(`/api/depots/${depotId}/peaks-so-far`).set(as(boss)).send(body(i)),
    );
    expect(answers.map((x) => x.status)).toEqual(Array(TIMES).fill(200));
    const [row] = await app.db.select().from(billingPeaks).where(eq(billingPeaks.depotId, depotId));
    expect(row!.periodsKw['on-peak']).toBe(row!.facilityKw);
  });
});

describe('meter data', () => {
  const file = (kwh: number) =>
    [
      'TYPE,DATE,START TIME,END TIME,USAGE,UNITS',
      ...Array.from({ length: 8 }, (_, k) => {
        // The small hours of the period's first day: read before the test clock's afternoon.
        const m = 1 * 60 + k * 15;
        const hhmm = (t: number) => `${String(Math.floor(t / 60)).padStart(2, '0')}:${String(t % 60).padStart(2, '0')}`;
        return `Electric usage,2026-12-01,${hhmm(m)},${hhmm(m + 14)},${kwh},kWh`;
      }),
    ].join('\n');
  const send = (depotId: string, kwh: number) =>
    app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(boss))
      .send({ fileName: 'night.csv', content: file(kwh), billingPeriodStart: '2026-12-01' });
  const stored = async (depotId: string) =>
    (await app.db.select().from(meterIntervals).where(eq(meterIntervals.depotId, depotId))).map((i) => i.kwh);

  it('10 identical imports at once all succeed and store each interval once', async () => {
    const depotId = await newDepot();
    const answers = await all(TIMES, () => send(depotId, 7.5));
    expect(answers.map((x) => x.status)).toEqual(Array(TIMES).fill(201));
    expect(await stored(depotId)).toEqual(Array(8).fill(7.5));
  });

  it("two different files at once leave one file's readings, never a mix", async () => {
    const depotId = await newDepot();
    const answers = await all(TIMES, (i) => send(depotId, i % 2 ? 7.5 : 9));
    expect(answers.map((x) => x.status)).toEqual(Array(TIMES).fill(201));
    const kwh = await stored(depotId);
    expect([Array(8).fill(7.5), Array(8).fill(9)]).toContainEqual(kwh);
    // The peak so far is the higher of the two files (each import raises it, never lowers it).
    const [peaks] = await app.db.select().from(billingPeaks).where(eq(billingPeaks.depotId, depotId));
    expect(peaks!.facilityKw).toBe(36);
  });
});

describe('invitations', () => {
  it('the same invitation 10 times at once makes one account and answers 201 each time', async () => {
    const email = `race-${key()}@test.nightyard.example`;
    const answers = await all(TIMES, () =>
      app
        .request()
        .post('/api/users/invite')
        .set(as(boss))
        .send({ email, name: 'Race', roles: ['yard'], depotIds: [inviteDepotId] }),
    );
    expect(answers.map((x) => x.status)).toEqual(Array(TIMES).fill(201));
    expect(new Set(answers.map((x) => x.body.user.id)).size).toBe(1);
    expect(await app.db.select().from(users).where(eq(users.email, email))).toHaveLength(1);
  });

  it('two different invitations to one address at once leave one of them', async () => {
    const email = `race2-${key()}@test.nightyard.example`;
    const answers = await all(TIMES, (i) =>
      app
        .request()
        .post('/api/users/invite')
        .set(as(boss))
        .send({ email, name: i % 2 ? 'Ann' : 'Bea', roles: i % 2 ? ['yard'] : ['finance'], depotIds: [inviteDepotId] }),
    );
    expect(answers.map((x) => x.status)).toEqual(Array(TIMES).fill(201));
    const rows = await app.db.select().from(users).where(eq(users.email, email));
    expect(rows).toHaveLength(1);
    expect([
      ['Ann', ['yard']],
      ['Bea', ['finance']],
    ]).toContainEqual([rows[0]!.name, rows[0]!.roles]);
  });
});

describe('Idempotency-Key', () => {
  const date = '2026-12-10';

  it('10 repeats with one key at once: the write is done once, every answer is the first one', async () => {
    const depotId = await newDepot();
    const k = key();
    const body = { runs: dayRuns(date, NUMBERS) };
    const answers = await all(TIMES, () =>
      app
        .request()
        .put(`/api/depots/${depotId}/service-days/${date}`)
        .set(as(boss))
        .set('Idempotency-Key', k)
        .send(body),
    );
    expect(answers.map((x) => x.status)).toEqual(Array(TIMES).fill(200));
    expect(answers.filter((x) => x.headers['idempotent-replayed'] === 'true')).toHaveLength(TIMES - 1);
    const ids = new Set(answers.map((x) => JSON.stringify(x.body.runs.map((r: { id: string }) => r.id))));
    expect(ids.size).toBe(1);
    expect(await storedRuns(depotId, date)).toEqual(runLines(body.runs));
  });

  it('the same key with another body is refused with 422 and changes nothing', async () => {
    const depotId = await newDepot();
    const k = key();
    const first = { runs: dayRuns(date, ['31']) };
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(boss))
      .set('Idempotency-Key', k)
      .send(first)
      .expect(200);
    const res = await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(boss))
      .set('Idempotency-Key', k)
      .send({ runs: dayRuns(date, ['32']) })
      .expect(422);
    expect(res.body.error.code).toBe('idempotency_key_reused');
    expect(res.body.error.fields['Idempotency-Key']).toBeDefined();
    // The same key on another day's address is another request too.
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/2026-12-11`)
      .set(as(boss))
      .set('Idempotency-Key', k)
      .send(first)
      .expect(422);
    expect(await storedRuns(depotId, date)).toEqual(runLines(first.runs));
    expect(await storedRuns(depotId, '2026-12-11')).toEqual([]);
  });

  it('a refused request does not use up its key', async () => {
    const depotId = await newDepot();
    const k = key();
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(boss))
      .set('Idempotency-Key', k)
      .send({ runs: dayRuns(date, ['99']) })
      .expect(400);
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(boss))
      .set('Idempotency-Key', k)
      .send({ runs: dayRuns(date, ['31']) })
      .expect(200);
    expect(await storedRuns(depotId, date)).toEqual(runLines(dayRuns(date, ['31'])));
  });

  it('an invitation retried with its key sends one e-mail', async () => {
    const email = `idem-${key()}@test.nightyard.example`;
    const k = key();
    const send = () =>
      app
        .request()
        .post('/api/users/invite')
        .set(as(boss))
        .set('Idempotency-Key', k)
        .send({ email, name: 'Once', roles: ['yard'], depotIds: [inviteDepotId] });
    const first = await send().expect(201);
    const again = await send().expect(201);
    expect(again.body).toEqual(first.body);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(await mailFor(email)).toHaveLength(1);
  });

  it('a key left without an answer by a stopped process is taken over after five minutes', async () => {
    const depotId = await newDepot();
    const k = key();
    const path = `/api/depots/${depotId}/service-days/${date}`;
    const body = { runs: dayRuns(date, ['31']) };
    await app.db.insert(idempotencyKeys).values({
      userId: boss.id,
      key: k,
      route: 'PUT /depots/:depotId/service-days/:date',
      requestHash: requestHash('PUT', path, body),
      createdAt: new Date(app.deps.clock().getTime() - 6 * 60_000),
    });
    await app.request().put(path).set(as(boss)).set('Idempotency-Key', k).send(body).expect(200);
    expect(await storedRuns(depotId, date)).toEqual(runLines(body.runs));
    const [row] = await app.db
      .select()
      .from(idempotencyKeys)
      .where(and(eq(idempotencyKeys.userId, boss.id), eq(idempotencyKeys.key, k)));
    expect(row!.status).toBe(200);
  });

  it('a malformed key is refused before anything is written', async () => {
    const depotId = await newDepot();
    const res = await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(boss))
      .set('Idempotency-Key', 'has space')
      .send({ runs: dayRuns(date, ['31']) })
      .expect(400);
    expect(res.body.error.fields['Idempotency-Key']).toMatch(/visible ASCII/);
    expect(await storedRuns(depotId, date)).toEqual([]);
  });
});
