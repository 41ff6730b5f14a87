import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { depots, users } from '../db/schema';
import { assignEveryone } from '../testing/depot-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

const app = createTestApp();
let a: { organisationId: string; users: Record<string, TestUser> };
let b: { organisationId: string; users: Record<string, TestUser> };

beforeAll(async () => {
  a = await createOrganisation(app, { admin: ['admin'], yard: ['yard'] });
  b = await createOrganisation(app, { admin: ['admin'], finance: ['finance'] });
  const made = await app.db
    .insert(depots)
    .values([
      {
        organisationId: a.organisationId,
        name: 'Depot of A',
        timezone: 'America/Chicago',
        serviceLimitKw: 300,
        otherLoadKw: [20],
      },
      {
        organisationId: b.organisationId,
        name: 'Depot of B',
        timezone: 'America/Denver',
        serviceLimitKw: 500,
        otherLoadKw: [30],
      },
    ])
    .returning();
  for (const d of made) await assignEveryone(app.db, d.organisationId, d.id);
});

const auth = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });

describe('organisation isolation', () => {
  it("lists only the caller's own people", async () => {
    const res = await app.request().get('/api/users').set(auth(a.users.admin!)).expect(200);
    const emails = res.body.users.map((u: { email: string }) => u.email);
    expect(emails.sort()).toEqual([a.users.admin!.email, a.users.yard!.email].sort());
  });

  it("lists only the caller's own depots", async () => {
    const res = await app.request().get('/api/depots').set(auth(b.users.finance!)).expect(200);
    expect(res.body.depots.map((d: { name: string }) => d.name)).toEqual(['Depot of B']);
  });

  it('cannot change a person of another organisation, and nothing changes', async () => {
    const res = await app
      .request()
      .patch(`/api/users/${b.users.finance!.id}`)
      .set(auth(a.users.admin!))
      .send({ roles: ['admin'], active: false })
      .expect(404);
    expect(res.body.error.code).toBe('not_found');
    const [row] = await app.db.select().from(users).where(eq(users.id, b.users.finance!.id));
    expect(row!.roles).toEqual(['finance']);
    expect(row!.status).toBe('active');
  });

  it('cannot invite someone who belongs to another organisation', async () => {
    await app
      .request()
      .post('/api/users/invite')
      .set(auth(a.users.admin!))
      .send({ email: b.users.finance!.email, name: 'Poach', roles: ['admin'], depotIds: [] })
      .expect(409);
    const [row] = await app.db.select().from(users).where(eq(users.id, b.users.finance!.id));
    expect(row!.organisationId).toBe(b.organisationId);
  });
});
