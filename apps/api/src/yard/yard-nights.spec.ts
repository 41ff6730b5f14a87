import { sql } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { YardStep } from '@nightyard/contracts';
import { USER_CHANGED } from '../auth/known-users';
import { NotifiedCache } from '../db/notified-cache';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, signInAgain, type TestUser } from '../testing/test-app';
import { TEST_DATABASE_URL } from '../testing/test-env';
import { until, writeQuietly } from '../testing/notices';
import { YARD_CHANGED, type YardNights } from './yard-service';

// What Tonight reads of a depot's night is kept between requests while the database reports the
// yard's changes (as main.ts runs it): a change must show on the next request all the same.

const ZONE = 'America/Chicago';
const at = (local: string) => DateTime.fromISO(local, { zone: ZONE }).toJSDate();
let clock = at('2026-12-09T14:00');
const kept: YardNights = new NotifiedCache(TEST_DATABASE_URL, { channel: YARD_CHANGED, forgetAllOn: [USER_CHANGED] });
const app = createTestApp({ clock: () => clock, yardNights: kept });
let yard: TestUser;
let sup: TestUser;
let depotId: string;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const NUMBERS = ['71', '72'];

async function tonight() {
  return (await app.request().get(`/api/depots/${depotId}/tonight`).set(as(yard)).expect(200)).body as {
    depot: { name: string };
    plan: { id: string } | null;
    steps: YardStep[];
    acknowledged: boolean;
  };
}

/** Renames the depot without telling anyone (see writeQuietly). */
const renameQuietly = (name: string) =>
  writeQuietly(app.db, sql`update depots set name = ${name} where id = ${depotId}`);

beforeAll(async () => {
  await kept.start();
  const org = await createOrganisation(app, { yard: ['yard'], sup: ['supervisor'] });
  ({ yard, sup } = org.users as Record<string, TestUser>);
  depotId = (await createDepot(app.db, org.organisationId, 'Kept depot')).depot.id;
  await addBuses(app.db, org.organisationId, depotId, NUMBERS);
  for (const date of ['2026-12-09', '2026-12-10']) {
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(sup))
      .send({ runs: dayRuns(date, NUMBERS, () => 16) })
      .expect(200);
  }
});
afterAll(() => kept.close());

describe("Tonight's reads kept per depot while the database reports the yard's changes", () => {
  it('keeps the read, and sees a publish, an acknowledgement and a confirmation on the very next request', async () => {
    expect(kept.isListening).toBe(true);
    expect((await tonight()).plan).toBeNull();
    // Publishing (a write through the API) is seen at once: the write waits for its own notification.
    await publishedPlan(app, sup, depotId, '2026-12-09');
    clock = at('2026-12-09T21:00');
    await signInAgain(app, yard, sup);
    const first = await tonight();
    expect(first.plan).not.toBeNull();
    await renameQuietly('Renamed quietly');
    // Kept: the quiet rename is not seen (the proof that the night was not read again).
    expect((await tonight()).depot.name).toBe('Kept depot');
    await app.request().post(`/api/depots/${depotId}/tonight/acknowledge`).set(as(yard)).expect(204);
    const acknowledged = await tonight();
    expect(acknowledged.acknowledged).toBe(true);
    // The write forgot the depot's kept night: the read after it sees the quiet rename too.
    expect(acknowledged.depot.name).toBe('Renamed quietly');
    const step = acknowledged.steps.find((s) => s.status === 'overdue' || s.status === 'upcoming')!;
    await app
      .request()
      .post('/api/yard/confirmations')
      .set(as(yard))
      .send({ planId: first.plan!.id, stepKey: step.key })
      .expect(200);
    expect((await tonight()).steps.find((s) => s.key === step.key)?.status).toBe('done');
  });

  it('sees a change made straight in the database (as another process would) once it is notified', async () => {
    await tonight();
    await app.db.execute(sql`update depots set name = 'Renamed aloud' where id = ${depotId}`);
    await until(async () => (await tonight()).depot.name === 'Renamed aloud', 'the rename is seen');
  });

  it('reads per request while the listening connection is lost, and keeps again once it listens', async () => {
    await tonight();
    await app.db.execute(sql`select pg_terminate_backend(pid) from pg_stat_activity
      where datname = current_database() and application_name = 'nightyard listens nightyard_yard_changed'`);
    await until(async () => !kept.isListening, 'the loss is noticed');
    await renameQuietly('Read while deaf');
    expect((await tonight()).depot.name).toBe('Read while deaf');
    await until(async () => kept.isListening, 'listening again', 5_000);
    await tonight();
    await renameQuietly('Quiet again');
    expect((await tonight()).depot.name).toBe('Read while deaf');
  });
});
