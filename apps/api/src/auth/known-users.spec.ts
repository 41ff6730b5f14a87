import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';
import { TEST_DATABASE_URL } from '../testing/test-env';
import { until, writeQuietly } from '../testing/notices';
import { KnownUsers } from './known-users';

const known = new KnownUsers(TEST_DATABASE_URL);
const app = createTestApp({ knownUsers: known });
let admin: TestUser;
let yard: TestUser;

/** Whether the API takes the caller for an admin: People is theirs alone. */
const seenAsAdmin = async (user: TestUser) => {
  const res = await app.request().get('/api/users').set('Authorization', `Bearer ${user.token}`);
  expect([200, 403]).toContain(res.status);
  return res.status === 200;
};

/** Changes a user's roles without telling anyone (see writeQuietly). */
const setRolesQuietly = (user: TestUser, roles: string[]) =>
  writeQuietly(
    app.db,
    sql`update users set roles = ${sql.raw(`ARRAY[${roles.map((r) => `'${r}'`).join(',')}]::text[]`)} where id = ${user.id}`,
  );

beforeAll(async () => {
  await known.start();
  ({
    users: { admin, yard },
  } = await createOrganisation(app, { admin: ['admin'], yard: ['yard'] }));
});
afterAll(() => known.close());

describe('signed-in users kept between requests', () => {
  it('listens, and serves a user as last read until the database says they changed', async () => {
    expect(known.isListening).toBe(true);
    expect(await seenAsAdmin(yard)).toBe(false);
    await setRolesQuietly(yard, ['yard', 'admin']);
    // Kept: the quiet change is not seen (the proof that the user was not read again).
    expect(await seenAsAdmin(yard)).toBe(false);
    // Any change the trigger hears is: a rename by another process, straight in the database.
    await app.db.execute(sql`update users set name = 'Renamed aloud' where id = ${yard.id}`);
    await until(() => seenAsAdmin(yard), 'the change is seen');
  });

  it('a deactivation through the API refuses the very next request of that user', async () => {
    const {
      users: { boss, crew },
    } = await createOrganisation(app, { boss: ['admin'], crew: ['yard'] });
    await app.request().get('/api/auth/me').set('Authorization', `Bearer ${crew!.token}`).expect(200);
    await app
      .request()
      .patch(`/api/users/${crew!.id}`)
      .set('Authorization', `Bearer ${boss!.token}`)
      .send({ active: false })
      .expect(200);
    await app.request().get('/api/auth/me').set('Authorization', `Bearer ${crew!.token}`).expect(401);
  });

  it('a deactivation by another process (straight in the database) is refused once the notification arrives', async () => {
    const {
      users: { crew },
    } = await createOrganisation(app, { crew: ['yard'] });
    await app.request().get('/api/auth/me').set('Authorization', `Bearer ${crew!.token}`).expect(200);
    await app.db.execute(sql`update users set status = 'deactivated' where id = ${crew!.id}`);
    await until(
      async () =>
        (await app.request().get('/api/auth/me').set('Authorization', `Bearer ${crew!.token}`)).status === 401,
      'the deactivation is seen',
      1_000,
    );
  });

  it('while the listening connection is lost, users are read per request; listening resumes by itself', async () => {
    expect(await seenAsAdmin(admin)).toBe(true);
    await app.db.execute(sql`select pg_terminate_backend(pid) from pg_stat_activity
      where datname = current_database() and application_name = 'nightyard listens nightyard_user_changed'`);
    await until(async () => !known.isListening, 'the loss is noticed');
    await setRolesQuietly(admin, ['finance']);
    // Not kept while deaf: even a change nobody announced is seen.
    expect(await seenAsAdmin(admin)).toBe(false);
    await until(async () => known.isListening, 'listening again', 5_000);
    await setRolesQuietly(admin, ['admin']);
    expect(await seenAsAdmin(admin)).toBe(true);
    await setRolesQuietly(admin, ['finance']);
    // Kept again.
    expect(await seenAsAdmin(admin)).toBe(true);
  });

  it('drops a read that was under way when a change arrived (it may have seen the old row)', () => {
    const mark = known.mark();
    known.forget(admin.id);
    known.keep(
      { id: admin.id, organisationId: 'x', email: 'a@b.c', name: 'stale', roles: ['admin'], depotIds: [] },
      mark,
    );
    expect(known.get(admin.id, 'x')).toBeNull();
    const fresh = known.mark();
    known.keep(
      { id: admin.id, organisationId: 'x', email: 'a@b.c', name: 'fresh', roles: ['admin'], depotIds: [] },
      fresh,
    );
    expect(known.get(admin.id, 'x')?.name).toBe('fresh');
    // Another organisation's token never finds it.
    expect(known.get(admin.id, 'y')).toBeNull();
  });
});
