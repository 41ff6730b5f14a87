import { randomUUID } from 'node:crypto';
import { pino } from 'pino';
import { sql } from 'drizzle-orm';
import supertest from 'supertest';
import { afterAll } from 'vitest';
import type { Role } from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import { createApp } from '../app';
import { loadConfig } from '../config';
import { createDb, createPool, type Db } from '../db/client';
import { organisations, users } from '../db/schema';
import bcrypt from 'bcryptjs';
import { smtpMailer } from '../mail/mailer';
import { startJobQueue, type JobQueue } from '../jobs/job-queue';
import { runPlanJob } from '../plans/plan-runner';
import { clockFrom } from '../time/clock';
import { LiveBus } from '../live/live-bus';

/**
 * Where the API's clock starts in tests that do not stand it elsewhere: a weekday afternoon at the
 * test depots (America/Chicago) before the nights the tests plan, never the machine's date.
 */
export const TEST_START = new Date('2026-12-01T15:00:00-06:00');
import { TEST_DATABASE_URL, TEST_FAKE_MAIL_URL, TEST_SMTP_PORT } from './test-env';

export const TEST_PASSWORD = 'correct-horse-battery';
// The test people's hash at bcrypt's lowest cost (4): a check takes its cost from the hash, so each
// of the few hundred sign-ins of the API tests is a real check in the pool at about 1 ms, not 70.
// Passwords set through the API, the demo's and the dummy hash keep the production cost (secrets.ts).
let passwordHash: Promise<string> | undefined;

/** An app wired to the real test database and the fake mail server, closed after the file. */
export function createTestApp(overrides: Partial<AppDeps> = {}, databaseUrl = TEST_DATABASE_URL) {
  const pool = createPool(databaseUrl);
  const db = createDb(pool);
  afterAll(() => pool.end());
  const config = loadConfig({
    NODE_ENV: 'test',
    DATABASE_URL: databaseUrl,
    SMTP_PORT: String(TEST_SMTP_PORT),
    FAKE_MAIL_URL: TEST_FAKE_MAIL_URL,
  });
  const log = pino({ level: process.env.TEST_LOG ?? 'silent' });
  // Real pg-boss on the test database, started only by the tests that queue work.
  let queue: Promise<JobQueue> | undefined;
  const jobs: JobQueue = {
    async enqueuePlan(planId) {
      queue ??= startJobQueue({ databaseUrl, log, work: (id) => runPlanJob(db, log, id) });
      await (await queue).enqueuePlan(planId);
    },
    async stop() {
      if (queue) await (await queue).stop();
    },
  };
  afterAll(() => jobs.stop(), 20_000);
  const clock = overrides.clock ?? clockFrom(TEST_START);
  const deps: AppDeps = {
    db,
    clock,
    live: new LiveBus(),
    jobs,
    config,
    log,
    mailer: smtpMailer(
      { host: '127.0.0.1', port: TEST_SMTP_PORT, from: 'Nightyard <test@nightyard.example>' },
      log,
      clock,
    ),
    ping: async () => {
      await db.execute(sql`select 1`);
    },
    auth: {
      jwtSecret: config.JWT_SECRET,
      accessTokenSeconds: 900,
      refreshTokenDays: 14,
      resetMinutes: 60,
      throttle: { perAccount: 5, perAddress: 20, windowMinutes: 15 },
      publicUrl: (p) => new URL(p, 'http://nightyard.test').toString(),
    },
    ...overrides,
  };
  const built = createApp(deps);
  return { ...built, db, deps, request: () => supertest(built.app) };
}

export interface TestUser {
  id: string;
  email: string;
  roles: Role[];
  token: string;
}

/** A fresh organisation with one active user per role set given; every e-mail is unique. */
export async function createOrganisation(
  app: ReturnType<typeof createTestApp>,
  people: Record<string, Role[]>,
): Promise<{ organisationId: string; users: Record<string, TestUser> }> {
  passwordHash ??= bcrypt.hash(TEST_PASSWORD, 4);
  const hash = await passwordHash;
  const tag = randomUUID().slice(0, 8);
  const [org] = await app.db
    .insert(organisations)
    .values({ name: `Test district ${tag}` })
    .returning();
  const out: Record<string, TestUser> = {};
  for (const [key, roles] of Object.entries(people)) {
    const email = `${key}-${tag}@test.nightyard.example`;
    const [u] = await app.db
      .insert(users)
      .values({ organisationId: org!.id, email, name: `${key} ${tag}`, roles, passwordHash: hash, status: 'active' })
      .returning();
    const res = await app.request().post('/api/auth/login').send({ email, password: TEST_PASSWORD }).expect(200);
    out[key] = { id: u!.id, email, roles, token: res.body.accessToken };
  }
  return { organisationId: org!.id, users: out };
}

/**
 * Signs the users in again, at the app's clock: after a test moves its clock past the access
 * tokens' life (15 minutes), the API refuses the old ones as a real one would.
 */
export async function signInAgain(app: ReturnType<typeof createTestApp>, ...people: TestUser[]): Promise<void> {
  for (const u of people) {
    const res = await app
      .request()
      .post('/api/auth/login')
      .send({ email: u.email, password: TEST_PASSWORD })
      .expect(200);
    u.token = res.body.accessToken;
  }
}

export type { Db };
