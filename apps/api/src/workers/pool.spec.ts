import { randomInt } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { generateDepot } from '../../../../libs/scheduling/src/testing/generate-depot';
import { plans } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { TEST_PASSWORD, createOrganisation, createTestApp, type TestUser } from '../testing/test-app';
import { workPoolCompleted } from './pool';

// The engine and bcrypt run in worker threads: the request thread stays free for everyone else.
const app = createTestApp();
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
let sup: TestUser;
let people: TestUser[];
let depotId: string;

beforeAll(async () => {
  const org = await createOrganisation(app, {
    sup: ['supervisor'],
    ...Object.fromEntries(Array.from({ length: 20 }, (_, i) => [`p${i}`, ['yard'] as const])),
  });
  sup = org.users.sup!;
  people = Array.from({ length: 20 }, (_, i) => org.users[`p${i}`]!);
  depotId = (await createDepot(app.db, org.organisationId)).depot.id;
});

const statusOf = async (id: string) =>
  (await app.db.select({ status: plans.status }).from(plans).where(eq(plans.id, id)))[0]!.status;

describe('the worker pool', () => {
  it('/api/health keeps answering while a 150-bus what-if solves', async () => {
    const engineBefore = workPoolCompleted().engine;
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/plans/what-if`)
      .set(as(sup))
      .send(generateDepot({ buses: 150, seed: 7 }))
      .expect(202);
    const id = res.body.plan.id as string;
    await vi.waitFor(async () => expect(await statusOf(id)).not.toBe('queued'), { timeout: 30_000, interval: 20 });

    // Health answers counted only when the plan was still solving after the answer came back.
    // Were the engine on the request thread, each answer would wait for the whole solve.
    const whileSolving: number[] = [];
    const deadline = performance.now() + 120_000;
    while (performance.now() < deadline) {
      const t0 = performance.now();
      await app.request().get('/api/health').expect(200);
      const ms = performance.now() - t0;
      if ((await statusOf(id)) !== 'running') break;
      whileSolving.push(ms);
    }
    expect(await statusOf(id)).toBe('done');
    // The solve takes seconds (its time budget): health answers in milliseconds all along. With the
    // engine on the request thread, at most the first one or two got through before it stalled.
    expect(whileSolving.length).toBeGreaterThanOrEqual(10);
    // Generous for a busy 2-core machine; the stall this guards against lasted the whole solve.
    const median = [...whileSolving].sort((a, b) => a - b)[Math.floor(whileSolving.length / 2)]!;
    expect(median).toBeLessThan(250);
    expect(workPoolCompleted().engine).toBe(engineBefore + 1);
  });

  it('twenty sign-ins at once are checked in the pool and each gets the right answer', async () => {
    const quickBefore = workPoolCompleted().quick;
    // An address of its own, so the test's failures never reach another test's throttle.
    const address = `198.51.100.${randomInt(1, 255)}`;
    const wrong = (i: number) => i % 5 === 0;
    const answers = await Promise.all(
      people.map((p, i) =>
        app
          .request()
          .post('/api/auth/login')
          .set('X-Forwarded-For', address)
          .send({ email: p.email, password: wrong(i) ? `${TEST_PASSWORD}-not` : TEST_PASSWORD }),
      ),
    );
    answers.forEach((a, i) => {
      expect(a.status, people[i]!.email).toBe(wrong(i) ? 401 : 200);
      if (!wrong(i)) expect(a.body.accessToken).toEqual(expect.any(String));
    });
    expect(workPoolCompleted().quick - quickBefore).toBeGreaterThanOrEqual(20);
  });
});
