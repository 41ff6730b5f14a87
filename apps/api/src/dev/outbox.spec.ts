import { randomUUID } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { createDepot } from '../testing/depot-fixture';
import { createOrganisation, createTestApp } from '../testing/test-app';
import { mailFor } from '../testing/mail';

const app = createTestApp();
const unique = (name: string) => `${name}-${randomUUID()}@test.nightyard.example`;

describe('the development outbox', () => {
  it('shows an admin only mail addressed to people of their own organisation', async () => {
    const a = await createOrganisation(app, { admin: ['admin'] });
    const b = await createOrganisation(app, { admin: ['admin'] });
    const depotA = (await createDepot(app.db, a.organisationId)).depot.id;
    const depotB = (await createDepot(app.db, b.organisationId)).depot.id;
    const ours = unique('ours');
    const theirs = unique('theirs');
    await app
      .request()
      .post('/api/users/invite')
      .set({ Authorization: `Bearer ${a.users.admin!.token}` })
      .send({ email: ours, name: 'Ours', roles: ['yard'], depotIds: [depotA] })
      .expect(201);
    await app
      .request()
      .post('/api/users/invite')
      .set({ Authorization: `Bearer ${b.users.admin!.token}` })
      .send({ email: theirs, name: 'Theirs', roles: ['yard'], depotIds: [depotB] })
      .expect(201);
    await mailFor(ours);
    await mailFor(theirs);
    const res = await app
      .request()
      .get('/api/dev/outbox')
      .set({ Authorization: `Bearer ${a.users.admin!.token}` })
      .expect(200);
    const recipients = res.body.messages.flatMap((m: { to: string[] }) => m.to);
    expect(recipients).toContain(ours);
    expect(recipients).not.toContain(theirs);
    // Dated by the app's clock (a test instant, days from the machine's), to the second a Date header keeps.
    const invite = res.body.messages.find((m: { to: string[] }) => m.to.includes(ours));
    expect(invite.sentAt).toBe(new Date(Math.floor(app.deps.clock().getTime() / 1000) * 1000).toISOString());
    const others = new Set(
      (await app.db.query.users.findMany({ columns: { email: true, organisationId: true } }))
        .filter((u) => u.organisationId !== a.organisationId)
        .map((u) => u.email),
    );
    expect(recipients.filter((r: string) => others.has(r))).toEqual([]);
  });

  it('is switched off in production (404) even with a fake mail server configured', async () => {
    const prod = createTestApp({ config: { ...app.deps.config, NODE_ENV: 'production' } });
    const org = await createOrganisation(prod, { admin: ['admin'] });
    const res = await prod
      .request()
      .get('/api/dev/outbox')
      .set({ Authorization: `Bearer ${org.users.admin!.token}` })
      .expect(404);
    expect(res.body.error.code).toBe('not_found');
    expect(app.deps.config.FAKE_MAIL_URL).toBeTruthy();
  });
});
