import { count, eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { users } from '../db/schema';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

const app = createTestApp();
let admin: TestUser;
let organisationId: string;

beforeAll(async () => {
  ({ organisationId, users: { admin: admin! } } = await createOrganisation(app, { admin: ['admin'] }) as never);
});

const peopleCount = async () =>
  (await app.db.select({ n: count() }).from(users).where(eq(users.organisationId, organisationId)))[0]!.n;

describe('bad input gets a 4xx that says what is wrong, and writes nothing', () => {
  it('malformed JSON', async () => {
    const res = await app.request().post('/api/auth/login').set('Content-Type', 'application/json').send('{"email": ').expect(400);
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
    const res = await app.request().post('/api/users/invite').set('Authorization', `Bearer ${admin.token}`)
      .send({ email: 'x@test.nightyard.example', name: 'X', roles: ['yard'], isAdmin: true }).expect(400);
    expect(res.body.error.fields.isAdmin).toBe('Unknown field "isAdmin": remove it');
    expect(await peopleCount()).toBe(before);
  });

  it('an unknown role and an empty role list on invite', async () => {
    const before = await peopleCount();
    const bad = await app.request().post('/api/users/invite').set('Authorization', `Bearer ${admin.token}`)
      .send({ email: 'y@test.nightyard.example', name: 'Y', roles: ['driver'] }).expect(400);
    expect(bad.body.error.fields['roles[0]']).toMatch(/admin.*facilities.*supervisor.*yard.*finance/);
    const empty = await app.request().post('/api/users/invite').set('Authorization', `Bearer ${admin.token}`)
      .send({ email: 'y@test.nightyard.example', name: 'Y', roles: [] }).expect(400);
    expect(empty.body.error.fields.roles).toBe('Choose at least one role');
    expect(await peopleCount()).toBe(before);
  });

  it('a path parameter that is not an id', async () => {
    const res = await app.request().patch('/api/users/not-a-uuid').set('Authorization', `Bearer ${admin.token}`)
      .send({ name: 'Z' }).expect(400);
    expect(res.body.error.fields.id).toBe('Not a user id');
  });

  it('an empty change', async () => {
    const res = await app.request().patch(`/api/users/${admin.id}`).set('Authorization', `Bearer ${admin.token}`).send({}).expect(400);
    expect(res.body.error.message).toMatch(/at least one of name, roles, active/);
  });

  it('an oversize body', async () => {
    const res = await app.request().post('/api/auth/login').send({ email: 'a@b.example', password: 'x'.repeat(2_000_000) }).expect(413);
    expect(res.body.error.code).toBe('payload_too_large');
  });

  it('an unknown API path is a JSON 404', async () => {
    const res = await app.request().get('/api/no-such-thing').expect(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('the server keeps serving after all of the above', async () => {
    await app.request().get('/api/health').expect(200, { status: 'ok' });
  });
});
