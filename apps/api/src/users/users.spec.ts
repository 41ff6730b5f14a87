import { randomUUID } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import type { User } from '@nightyard/contracts';
import { actionTokens, users } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { linkToken, mailFor } from '../testing/mail';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

const app = createTestApp();
let admin: TestUser;
let organisationId: string;
let depotId: string;

beforeAll(async () => {
  const org = await createOrganisation(app, { admin: ['admin'], yard: ['yard'] });
  admin = org.users.admin!;
  organisationId = org.organisationId;
  depotId = (await createDepot(app.db, organisationId)).depot.id;
});

const auth = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const unique = (name: string) => `${name}-${randomUUID()}@test.nightyard.example`;

describe('invitations', () => {
  it('e-mails a link that sets a password, after which the person signs in with their roles', async () => {
    const email = unique('newhire');
    const invited = await app
      .request()
      .post('/api/users/invite')
      .set(auth(admin))
      .send({ email, name: 'Noor Haddad', roles: ['yard', 'supervisor'], depotIds: [depotId] })
      .expect(201);
    expect(invited.body.user.status).toBe('invited');
    // Dated by the app's clock (a test instant), not the machine's.
    expect(Math.abs(Date.parse(invited.body.user.createdAt) - app.deps.clock().getTime())).toBeLessThan(60_000);

    const [mail] = await mailFor(email);
    expect(mail!.subject).toMatch(/invited to Nightyard/);
    const token = linkToken(mail!.text);
    expect(mail!.text).toContain('http://nightyard.test/set-password?token=');

    const info = await app.request().get(`/api/auth/action-tokens/${token}`).expect(200);
    expect(info.body).toMatchObject({ email, name: 'Noor Haddad', purpose: 'invite' });

    // An invited account cannot sign in before it has a password.
    await app.request().post('/api/auth/login').send({ email, password: 'a-fresh-password-1' }).expect(401);
    await app.request().post('/api/auth/set-password').send({ token, password: 'a-fresh-password-1' }).expect(204);
    const login = await app
      .request()
      .post('/api/auth/login')
      .send({ email, password: 'a-fresh-password-1' })
      .expect(200);
    expect(login.body.user.roles).toEqual(['yard', 'supervisor']);
    // The link works once.
    await app.request().post('/api/auth/set-password').send({ token, password: 'another-password-2' }).expect(404);
  });

  it('refuses an e-mail that already has an account, and saves nothing', async () => {
    const before = await app.db.select().from(users).where(eq(users.organisationId, organisationId));
    const res = await app
      .request()
      .post('/api/users/invite')
      .set(auth(admin))
      .send({ email: admin.email, name: 'Someone', roles: ['yard'], depotIds: [depotId] })
      .expect(409);
    expect(res.body.error.fields).toEqual({ email: 'Already in use' });
    const after = await app.db.select().from(users).where(eq(users.organisationId, organisationId));
    expect(after).toHaveLength(before.length);
  });

  it('an expired link says so and sets nothing', async () => {
    const email = unique('late');
    await app
      .request()
      .post('/api/users/invite')
      .set(auth(admin))
      .send({ email, name: 'Late', roles: ['finance'], depotIds: [depotId] })
      .expect(201);
    const token = linkToken((await mailFor(email))[0]!.text);
    const [u] = await app.db.select().from(users).where(eq(users.email, email));
    await app.db
      .update(actionTokens)
      .set({ expiresAt: new Date(app.deps.clock().getTime() - 1000) })
      .where(eq(actionTokens.userId, u!.id));
    const res = await app
      .request()
      .post('/api/auth/set-password')
      .send({ token, password: 'a-fresh-password-1' })
      .expect(410);
    expect(res.body.error.message).toMatch(/expired/);
    const [still] = await app.db.select().from(users).where(eq(users.id, u!.id));
    expect(still!.passwordHash).toBeNull();
  });

  it('the link of a deactivated invitee says the account is deactivated, not that the link is broken', async () => {
    const email = unique('gone');
    const invited = await app
      .request()
      .post('/api/users/invite')
      .set(auth(admin))
      .send({ email, name: 'Gone', roles: ['yard'], depotIds: [depotId] })
      .expect(201);
    const token = linkToken((await mailFor(email))[0]!.text);
    await app
      .request()
      .patch(`/api/users/${invited.body.user.id}`)
      .set(auth(admin))
      .send({ active: false })
      .expect(200);
    const info = await app.request().get(`/api/auth/action-tokens/${token}`).expect(403);
    expect(info.body.error.message).toMatch(/deactivated/);
    await app.request().post('/api/auth/set-password').send({ token, password: 'a-fresh-password-1' }).expect(403);
  });

  it('rejects a short password with a field message', async () => {
    const res = await app
      .request()
      .post('/api/auth/set-password')
      .send({ token: 'x'.repeat(43), password: 'short' })
      .expect(400);
    expect(res.body.error.fields.password).toMatch(/at least 12/);
  });
});

describe('roles and deactivation', () => {
  it('changes roles; the next request sees them', async () => {
    const { users: p } = await createOrganisation(app, { boss: ['admin'], worker: ['yard'] });
    await app.request().get('/api/users').set(auth(p.worker!)).expect(403);
    const res = await app
      .request()
      .patch(`/api/users/${p.worker!.id}`)
      .set(auth(p.boss!))
      .send({ roles: ['yard', 'admin'] })
      .expect(200);
    expect(res.body.user.roles).toEqual(['yard', 'admin']);
    await app.request().get('/api/users').set(auth(p.worker!)).expect(200);
  });

  it('keeps at least one active administrator', async () => {
    const { users: p } = await createOrganisation(app, { only: ['admin'] });
    const res = await app
      .request()
      .patch(`/api/users/${p.only!.id}`)
      .set(auth(p.only!))
      .send({ active: false })
      .expect(409);
    expect(res.body.error.message).toMatch(/at least one active administrator/);
    await app
      .request()
      .patch(`/api/users/${p.only!.id}`)
      .set(auth(p.only!))
      .send({ roles: ['finance'] })
      .expect(409);
    const [still] = await app.db.select().from(users).where(eq(users.id, p.only!.id));
    expect(still!.roles).toEqual(['admin']);
  });

  it('deactivates and reactivates', async () => {
    const { users: p } = await createOrganisation(app, { boss: ['admin'], temp: ['finance'] });
    const off = await app
      .request()
      .patch(`/api/users/${p.temp!.id}`)
      .set(auth(p.boss!))
      .send({ active: false })
      .expect(200);
    expect(off.body.user.status).toBe('deactivated');
    await app.request().get('/api/depots').set(auth(p.temp!)).expect(401);
    const on = await app
      .request()
      .patch(`/api/users/${p.temp!.id}`)
      .set(auth(p.boss!))
      .send({ active: true })
      .expect(200);
    expect(on.body.user.status).toBe('active');
    await app.request().get('/api/depots').set(auth(p.temp!)).expect(200);
  });
});

describe('forgot password', () => {
  it('sends a reset link to an existing account and answers the same for an unknown one', async () => {
    const { users: p } = await createOrganisation(app, { forgetful: ['yard'] });
    const known = await app.request().post('/api/auth/forgot').send({ email: p.forgetful!.email }).expect(202);
    const unknownEmail = unique('ghost');
    const unknown = await app.request().post('/api/auth/forgot').send({ email: unknownEmail }).expect(202);
    expect(unknown.body).toEqual(known.body);
    const [mail] = await mailFor(p.forgetful!.email);
    expect(mail!.subject).toBe('Reset your Nightyard password');
    const token = linkToken(mail!.text);
    const info = await app.request().get(`/api/auth/action-tokens/${token}`).expect(200);
    expect(info.body.purpose).toBe('reset');
    await app.request().post('/api/auth/set-password').send({ token, password: 'brand-new-password-9' }).expect(204);
    await app
      .request()
      .post('/api/auth/login')
      .send({ email: p.forgetful!.email, password: 'brand-new-password-9' })
      .expect(200);
    expect(await mailFor(unknownEmail, 1, 300)).toHaveLength(0);
  });
});

describe("people's depots", () => {
  let boss: TestUser;
  let org: string;
  let one: string;
  let two: string;
  let theirs: string;
  beforeAll(async () => {
    const made = await createOrganisation(app, { boss: ['admin'] });
    boss = made.users.boss!;
    org = made.organisationId;
    one = (await createDepot(app.db, org, 'One')).depot.id;
    two = (await createDepot(app.db, org, 'Two')).depot.id;
    theirs = (await createDepot(app.db, organisationId, 'Not theirs')).depot.id;
  });
  const invite = (roles: string[], depotIds: string[]) =>
    app
      .request()
      .post('/api/users/invite')
      .set(auth(boss))
      .send({ email: unique('depots'), name: 'Depot Person', roles, depotIds });
  const listed = async (id: string) =>
    ((await app.request().get('/api/users').set(auth(boss)).expect(200)).body.users as User[]).find((u) => u.id === id)!
      .depotIds;

  it('invites with depots, and lists them', async () => {
    const sup = await invite(['supervisor', 'finance'], [two, one]).expect(201);
    expect(sup.body.user.depotIds).toEqual([one, two].sort());
    expect(await listed(sup.body.user.id)).toEqual([one, two].sort());
    const yard = await invite(['yard'], [one]).expect(201);
    expect(await listed(yard.body.user.id)).toEqual([one]);
    // An administrator sees every depot whatever they hold: none is fine.
    expect((await invite(['admin'], []).expect(201)).body.user.depotIds).toEqual([]);
  });

  it('refuses yard staff with other than one depot, others with none, and a depot of another organisation', async () => {
    const before = await app.db.select().from(users).where(eq(users.organisationId, org));
    const twoYard = await invite(['yard'], [one, two]).expect(400);
    expect(twoYard.body.error.fields.depotIds).toBe('Yard staff work at one depot: choose exactly one');
    const none = await invite(['finance'], []).expect(400);
    expect(none.body.error.fields.depotIds).toBe('Choose at least one depot');
    const foreign = await invite(['finance'], [one, theirs]).expect(400);
    expect(foreign.body.error.fields.depotIds).toBe(
      `Depot ${theirs} is not a depot of your organisation: choose among your depots`,
    );
    const unknown = randomUUID();
    const missing = await invite(['finance'], [unknown]).expect(400);
    expect(missing.body.error.fields.depotIds).toMatch(new RegExp(`Depot ${unknown} is not a depot of your`));
    expect(await app.db.select().from(users).where(eq(users.organisationId, org))).toHaveLength(before.length);
  });

  it("edits replace a person's depots, checked against their roles new or kept", async () => {
    const id = (await invite(['supervisor'], [one]).expect(201)).body.user.id as string;
    const patch = (body: object) => app.request().patch(`/api/users/${id}`).set(auth(boss)).send(body);
    expect((await patch({ depotIds: [one, two] }).expect(200)).body.user.depotIds).toEqual([one, two].sort());
    // Yard alone with two depots: refused, nothing changed.
    const res = await patch({ roles: ['yard'] }).expect(400);
    expect(res.body.error.fields).toEqual({ depotIds: 'Yard staff work at one depot: choose exactly one' });
    expect(await listed(id)).toEqual([one, two].sort());
    const [row] = await app.db.select().from(users).where(eq(users.id, id));
    expect(row!.roles).toEqual(['supervisor']);
    expect((await patch({ roles: ['yard'], depotIds: [two] }).expect(200)).body.user).toMatchObject({
      roles: ['yard'],
      depotIds: [two],
    });
    expect((await patch({ depotIds: [] }).expect(400)).body.error.fields.depotIds).toMatch(/exactly one/);
    expect((await patch({ depotIds: [theirs] }).expect(400)).body.error.fields.depotIds).toMatch(/not a depot of your/);
    expect(await listed(id)).toEqual([two]);
    // A name alone checks nothing of the depots; an admin may hold none.
    expect((await patch({ name: 'Renamed' }).expect(200)).body.user.depotIds).toEqual([two]);
    expect((await patch({ roles: ['admin'], depotIds: [] }).expect(200)).body.user.depotIds).toEqual([]);
  });

  it('edits of one person at once leave one whole set of depots (serialised per person)', async () => {
    const id = (await invite(['finance'], [one]).expect(201)).body.user.id as string;
    const sets = [[one], [two], [one, two], [two, one]];
    const answers = await Promise.all(
      Array.from({ length: 8 }, (_, i) =>
        app
          .request()
          .patch(`/api/users/${id}`)
          .set(auth(boss))
          .send({ depotIds: sets[i % sets.length] }),
      ),
    );
    expect(answers.map((a) => a.status)).toEqual(Array(8).fill(200));
    const final = await listed(id);
    expect([[one], [two], [one, two].sort()]).toContainEqual(final);
  });
});
