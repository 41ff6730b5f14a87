import { spawn, type ChildProcess } from 'node:child_process';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { eq } from 'drizzle-orm';
import { pino } from 'pino';
import { RPCClient } from 'ocpp-rpc';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateDepot } from '../../../libs/scheduling/src/testing/generate-depot';
import { chargers, depots, plans } from './db/schema';
import { startJobQueue, type JobQueue } from './jobs/job-queue';
import { CentralSystem } from './ocpp/central-system';
import { INTERRUPTED_TWICE, recoverInterruptedPlans, runPlanJob } from './plans/plan-runner';
import { withPlanLock } from './plans/plan-lock';
import { createDepot } from './testing/depot-fixture';
import { addBuses, dayRuns } from './testing/fleet-fixture';
import { generatedPlan } from './testing/plan-fixture';
import { createOrganisation, createTestApp, type TestUser } from './testing/test-app';
import { TEST_DATABASE_URL } from './testing/test-env';
import { KnownUsers } from './auth/known-users';
import { ThrowawayCluster, freePort } from './testing/throwaway-cluster';

const silent = pino({ level: 'silent' });
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });

const clusterPort = await freePort();

describe('PostgreSQL restarts under a running API', () => {
  const cluster = new ThrowawayCluster(clusterPort);
  // Registered before the app's own clean-up so the cluster stops last (after hooks run in reverse).
  afterAll(() => cluster.stop());
  // As main.ts runs it: signed-in users kept while the database reports their changes.
  const known = new KnownUsers(cluster.url, silent);
  afterAll(() => known.close());
  const app = createTestApp({ knownUsers: known }, cluster.url);
  const central = new CentralSystem(app.db, silent, app.deps.clock);
  let server: Server;
  let sup: TestUser;
  let fac: TestUser;
  let depotId: string;
  let identity: string;

  beforeAll(async () => {
    await cluster.setUp();
    await known.start();
    server = app.app.listen(0, '127.0.0.1');
    central.attachTo(server);
    await new Promise((r) => server.once('listening', r));
    const org = await createOrganisation(app, { sup: ['supervisor'], fac: ['facilities'] });
    ({ sup, fac } = org.users as Record<string, TestUser>);
    const depot = await createDepot(app.db, org.organisationId);
    depotId = depot.depot.id;
    identity = `R-A-${depotId.slice(0, 8)}`;
    await app
      .request()
      .put(`/api/depots/${depotId}/chargers/${depot.chargers[0]!.id}/ocpp`)
      .set(as(fac))
      .send({ identity, password: 'resilience-charger-pw' })
      .expect(204);
    await addBuses(app.db, org.organisationId, depotId, ['71', '72']);
    for (const date of ['2026-12-14', '2026-12-15', '2026-12-16']) {
      await app
        .request()
        .put(`/api/depots/${depotId}/service-days/${date}`)
        .set(as(sup))
        .send({ runs: dayRuns(date, ['71', '72'], () => 30) })
        .expect(200);
    }
  });

  afterAll(async () => {
    await central.close();
    server.close();
  });

  it('answers 503 while the database is down, keeps running, and recovers by itself with the data intact', async () => {
    // pg-boss is running (it generated this plan) before the database goes away.
    const before = await generatedPlan(app, sup, depotId, '2026-12-14');
    expect(before.status).toBe('done');
    const url = `ws://127.0.0.1:${(server.address() as AddressInfo).port}/ocpp`;
    const station = new RPCClient({
      endpoint: url,
      identity,
      password: 'resilience-charger-pw',
      protocols: ['ocpp1.6'],
      reconnect: false,
    } as never);
    await station.connect();

    await app.request().get(`/api/depots/${depotId}`).set(as(sup)).expect(200);
    expect(known.isListening).toBe(true);
    await cluster.stop();

    const down = await app.request().get(`/api/depots/${depotId}`).set(as(sup));
    expect(down.status).toBe(503);
    expect(down.body.error.code).toBe('unavailable');
    expect(down.headers['retry-after']).toBe('5');
    await app.request().get('/api/health').expect(503);
    await app
      .request()
      .post(`/api/depots/${depotId}/plans`)
      .set(as(sup))
      .send({ serviceDate: '2026-12-15' })
      .expect(503);
    // The connected charger is still answered; its state write fails quietly and is retried later.
    await expect(
      station.call('StatusNotification', { connectorId: 1, errorCode: 'NoError', status: 'Charging' }),
    ).resolves.toEqual({});
    await central.settled();

    await cluster.start();

    await expect
      .poll(async () => (await app.request().get(`/api/depots/${depotId}`).set(as(sup))).status, {
        timeout: 15_000,
        interval: 200,
      })
      .toBe(200);
    // Signed-in users are kept again once their change notifications resume.
    await expect.poll(() => known.isListening, { timeout: 15_000, interval: 200 }).toBe(true);
    const [depot] = await app.db.select().from(depots).where(eq(depots.id, depotId));
    expect(depot?.name).toBe('Test depot');
    const kept = await app.request().get(`/api/plans/${before.id}`).set(as(sup)).expect(200);
    expect(kept.body.plan.status).toBe('done');
    expect(kept.body.plan.result.sessions.length).toBeGreaterThan(0);
    // The job queue came back too: a new plan is generated.
    expect((await generatedPlan(app, sup, depotId, '2026-12-15')).status).toBe('done');
    // And the charger's next message is stored again.
    await station.call('StatusNotification', { connectorId: 1, errorCode: 'NoError', status: 'Faulted' });
    await central.settled();
    const [row] = await app.db.select().from(chargers).where(eq(chargers.ocppIdentity, identity));
    expect(row?.liveStatus).toBe('faulted');
    await station.close({ force: true });
  }, 60_000);
});

describe('a worker process killed in the middle of a plan job', () => {
  const app = createTestApp();
  let queue: JobQueue;
  const workers: ChildProcess[] = [];
  let organisationId: string;
  let depotId: string;
  let sup: TestUser;

  const startWorker = () => {
    // node itself (with tsx as its loader), not the tsx wrapper: SIGKILL must hit the process that works.
    const worker = spawn(process.execPath, ['--import', 'tsx', 'apps/api/src/worker.ts'], {
      env: { ...process.env, DATABASE_URL: TEST_DATABASE_URL, LOG_LEVEL: 'warn', NODE_ENV: 'test' },
      stdio: 'ignore',
    });
    workers.push(worker);
    return worker;
  };
  const planRow = async (id: string) => (await app.db.select().from(plans).where(eq(plans.id, id)))[0]!;
  let version = 0;
  const insertPlan = async (values: Partial<typeof plans.$inferInsert> = {}) => {
    // A large invented depot, so the engine run lasts long enough to be cut short.
    const scenario = generateDepot({ buses: 150, seed: 7 });
    const [row] = await app.db
      .insert(plans)
      .values({ organisationId, depotId, serviceDate: '2026-12-16', version: ++version, scenario, ...values })
      .returning();
    return row!;
  };

  beforeAll(async () => {
    queue = await startJobQueue({ databaseUrl: TEST_DATABASE_URL, log: silent });
    const org = await createOrganisation(app, { sup: ['supervisor'] });
    organisationId = org.organisationId;
    sup = org.users.sup!;
    depotId = (await createDepot(app.db, organisationId)).depot.id;
  });

  afterAll(async () => {
    for (const w of workers) if (w.exitCode === null && w.signalCode === null) w.kill('SIGTERM');
    await queue.stop();
  });

  it('kill -9 mid-run: a new worker finds the interrupted plan, runs it again and it ends done', async () => {
    const plan = await insertPlan();
    await queue.enqueuePlan(plan.id);
    const first = startWorker();
    await expect.poll(async () => (await planRow(plan.id)).status, { timeout: 30_000, interval: 20 }).toBe('running');
    const exited = new Promise((r) => first.once('exit', r));
    first.kill('SIGKILL');
    await exited;
    // Cut short for real: still "running", no result, one attempt counted.
    expect(await planRow(plan.id)).toMatchObject({ status: 'running', attempts: 1, result: null });

    const second = startWorker();
    await expect.poll(async () => (await planRow(plan.id)).status, { timeout: 45_000, interval: 200 }).toBe('done');
    const done = await planRow(plan.id);
    expect(done.attempts).toBe(2);
    expect(done.result!.sessions.length).toBeGreaterThan(0);
    // Stopped here so its recovery sweep cannot touch the next test's plans.
    const stopped = new Promise((r) => second.once('exit', r));
    second.kill('SIGTERM');
    await stopped;
  }, 60_000);

  it('an interrupted plan is queued again once; interrupted twice it fails with a message the supervisor sees', async () => {
    const once = await insertPlan({ status: 'running', attempts: 1 });
    const twice = await insertPlan({ status: 'running', attempts: 2 });
    const waiting = await insertPlan({ status: 'queued', attempts: 0 });
    const busy = await insertPlan({ status: 'running', attempts: 1 });
    const enqueued: string[] = [];
    // Another process is working `busy` (it holds the plan's lock): left alone.
    const outcome = await withPlanLock(app.db, busy.id, () =>
      recoverInterruptedPlans(app.db, silent, {
        waiting: new Set([waiting.id]),
        enqueue: async (id) => void enqueued.push(id),
      }),
    );
    expect(outcome).not.toBe('busy');
    const mine = [once.id, twice.id, waiting.id, busy.id];
    expect(enqueued.filter((id) => mine.includes(id))).toEqual([once.id]);
    expect(await planRow(once.id)).toMatchObject({ status: 'queued', stage: 'Queued again after an interruption' });
    expect(await planRow(twice.id)).toMatchObject({ status: 'failed', error: INTERRUPTED_TWICE });
    expect(await planRow(waiting.id)).toMatchObject({ status: 'queued', attempts: 0 });
    expect(await planRow(busy.id)).toMatchObject({ status: 'running' });
    // pg-boss retrying an expired job of a plan already run twice: failed, not run a third time.
    const third = await insertPlan({ status: 'running', attempts: 2 });
    await runPlanJob(app.db, silent, third.id);
    expect(await planRow(third.id)).toMatchObject({
      status: 'failed',
      error: INTERRUPTED_TWICE,
      attempts: 3,
      result: null,
    });
    const seen = await app.request().get(`/api/plans/${third.id}`).set(as(sup)).expect(200);
    expect(seen.body.plan).toMatchObject({ status: 'failed', error: INTERRUPTED_TWICE });
  });
});
