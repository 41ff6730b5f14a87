import { randomUUID } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { actionTokens, passwordResetRequests } from '../db/schema';
import { mailFor } from '../testing/mail';
import { createOrganisation, createTestApp } from '../testing/test-app';

const app = createTestApp();
// Each test its own client address (the API trusts X-Forwarded-For from loopback, like its proxy).
// A fresh documentation-range IPv6 address per use, so runs on the same database never share one.
const fromAddress = () => `2001:db8::${randomUUID().slice(0, 4)}:${randomUUID().slice(0, 4)}`;
const forgot = (email: string, ip: string) =>
  app.request().post('/api/auth/forgot').set('X-Forwarded-For', ip).send({ email });

describe('password reset throttle', () => {
  it('the 6th reset for one account within the hour sends no mail, and the answer is the same 202', async () => {
    const { users } = await createOrganisation(app, { forgetful: ['yard'] });
    const user = users.forgetful!;
    const ip = fromAddress();
    const answers = [];
    for (let i = 0; i < 5; i++) answers.push(await forgot(user.email, ip).expect(202));
    expect(await mailFor(user.email, 5, 10_000)).toHaveLength(5);
    const sixth = await forgot(user.email, ip).expect(202);
    expect(sixth.body).toEqual(answers[0]!.body);
    // Refused at the door: not counted, no token made, no mail.
    expect(
      await app.db.select().from(passwordResetRequests).where(eq(passwordResetRequests.email, user.email)),
    ).toHaveLength(5);
    expect(
      await app.db
        .select()
        .from(actionTokens)
        .where(and(eq(actionTokens.userId, user.id), eq(actionTokens.purpose, 'reset'))),
    ).toHaveLength(5);
    expect(await mailFor(user.email, 6, 800)).toHaveLength(5);
  });

  it('one client address gets 20 requests per 15 minutes, known and unknown addresses alike', async () => {
    const ip = fromAddress();
    const { users } = await createOrganisation(app, { target: ['yard'] });
    const unknown = Array.from(
      { length: 20 },
      (_, i) => `nobody-${i}-${randomUUID().slice(0, 8)}@test.nightyard.example`,
    );
    const bodies = new Set<string>();
    for (const email of unknown) bodies.add(JSON.stringify((await forgot(email, ip).expect(202)).body));
    const refused = await forgot(users.target!.email, ip).expect(202);
    bodies.add(JSON.stringify(refused.body));
    expect(bodies.size).toBe(1);
    expect(await mailFor(users.target!.email, 1, 800)).toHaveLength(0);
    // Another client address is not affected.
    await forgot(users.target!.email, fromAddress()).expect(202);
    expect(await mailFor(users.target!.email, 1, 10_000)).toHaveLength(1);
  });
});
