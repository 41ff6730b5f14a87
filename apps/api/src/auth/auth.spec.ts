import jwt from 'jsonwebtoken';
import { pino } from 'pino';
import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { refreshTokens, users } from '../db/schema';
import { TEST_PASSWORD, TEST_START, createOrganisation, createTestApp, type TestUser } from '../testing/test-app';
import { REFRESH_GRACE_SECONDS } from './auth-service';

/** The API's clock in this file: stopped, moved by hand. */
let at = TEST_START.getTime();
/** What the API logged at error level: a handled request logs nothing there. */
const errors: string[] = [];
const app = createTestApp({
  clock: () => new Date(at),
  log: pino({ level: 'error' }, { write: (line: string) => void errors.push(line) }),
});

function refreshCookie(res: { headers: Record<string, unknown> }): string {
  const cookies = res.headers['set-cookie'] as string[] | undefined;
  const c = cookies?.find((v) => v.startsWith('ny_refresh='));
  if (!c) throw new Error('no refresh cookie');
  return c.split(';')[0]!;
}

describe('sign-in', () => {
  let people: Record<string, TestUser>;
  beforeAll(async () => {
    ({ users: people } = await createOrganisation(app, { sup: ['supervisor', 'yard'], off: ['finance'] }));
  });

  it('signs in, sets an httpOnly refresh cookie and the token works on /me', async () => {
    const res = await app
      .request()
      .post('/api/auth/login')
      .send({ email: people.sup!.email, password: TEST_PASSWORD })
      .expect(200);
    expect(res.body.user.roles).toEqual(['supervisor', 'yard']);
    const cookie = (res.headers['set-cookie'] as unknown as string[])[0]!;
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Strict/);
    expect(cookie).toMatch(/Path=\/api\/auth/);
    const me = await app
      .request()
      .get('/api/auth/me')
      .set('Authorization', `Bearer ${res.body.accessToken}`)
      .expect(200);
    expect(me.body.user.email).toBe(people.sup!.email);
  });

  it('accepts the e-mail in any case and with spaces', async () => {
    await app
      .request()
      .post('/api/auth/login')
      .send({ email: `  ${people.off!.email.toUpperCase()} `, password: TEST_PASSWORD })
      .expect(200);
  });

  it('refuses a wrong password and an unknown account with the same message', async () => {
    const wrong = await app
      .request()
      .post('/api/auth/login')
      .send({ email: people.off!.email, password: 'nope-nope-nope' })
      .expect(401);
    const unknown = await app
      .request()
      .post('/api/auth/login')
      .send({ email: 'nobody@test.nightyard.example', password: 'x' })
      .expect(401);
    expect(wrong.body.error.message).toBe('E-mail or password is not right');
    expect(unknown.body.error).toEqual(wrong.body.error);
  });

  it('answers a refresh without a cookie with 204 (no session to restore), a bad cookie with 401', async () => {
    errors.length = 0;
    const none = await app.request().post('/api/auth/refresh').expect(204);
    expect(none.text).toBe('');
    // Answered by the handler itself: no response check after it ("unhandled error", headers sent twice).
    expect(errors).toEqual([]);
    await app.request().post('/api/auth/refresh').set('Cookie', 'ny_refresh=not-a-token').expect(401);
  });

  it('rotates the refresh token and ends the whole session when an old one is replayed after the grace window', async () => {
    at = TEST_START.getTime();
    const login = await app
      .request()
      .post('/api/auth/login')
      .send({ email: people.sup!.email, password: TEST_PASSWORD })
      .expect(200);
    const first = refreshCookie(login);
    const r1 = await app.request().post('/api/auth/refresh').set('Cookie', first).expect(200);
    const second = refreshCookie(r1);
    expect(second).not.toBe(first);
    expect(r1.body.accessToken).toBeTruthy();
    // Replaying the used token later is treated as theft: both it and its successor stop working.
    at += (REFRESH_GRACE_SECONDS + 1) * 1000;
    const replay = await app.request().post('/api/auth/refresh').set('Cookie', first).expect(401);
    expect(replay.body.error.message).toMatch(/used elsewhere/);
    await app.request().post('/api/auth/refresh').set('Cookie', second).expect(401);
  });

  it('lets tabs that refresh at once with the same cookie share the session within the grace window', async () => {
    at = Date.parse('2026-12-02T23:59:50-06:00');
    const login = await app
      .request()
      .post('/api/auth/login')
      .send({ email: people.sup!.email, password: TEST_PASSWORD })
      .expect(200);
    const old = refreshCookie(login);
    // Two tabs, one cookie: the first rotates it, the second arrives 20 s later with the same one.
    const tabA = await app.request().post('/api/auth/refresh').set('Cookie', old).expect(200);
    at += 20_000;
    const tabB = await app.request().post('/api/auth/refresh').set('Cookie', old).expect(200);
    expect(tabB.body.user.id).toBe(tabA.body.user.id);
    for (const tab of [tabA, tabB]) {
      await app.request().get('/api/auth/me').set('Authorization', `Bearer ${tab.body.accessToken}`).expect(200);
      // Each tab's new cookie carries the session on.
      const next = await app.request().post('/api/auth/refresh').set('Cookie', refreshCookie(tab)).expect(200);
      await app.request().get('/api/auth/me').set('Authorization', `Bearer ${next.body.accessToken}`).expect(200);
    }
    const family = await app.db.select().from(refreshTokens).where(eq(refreshTokens.userId, people.sup!.id));
    expect(family.filter((t) => t.revokedAt && t.revokedAt.getTime() >= at)).toHaveLength(0);

    // The window counts from the first rotation, not from the last presentation: 31 s after it, the
    // same old cookie is a replay and ends the whole family, the tabs' new tokens with it.
    at = Date.parse('2026-12-02T23:59:50-06:00') + (REFRESH_GRACE_SECONDS + 1) * 1000;
    const replay = await app.request().post('/api/auth/refresh').set('Cookie', old).expect(401);
    expect(replay.body.error.message).toMatch(/used elsewhere/);
    await app.request().post('/api/auth/refresh').set('Cookie', refreshCookie(tabB)).expect(401);
    await app.request().post('/api/auth/refresh').set('Cookie', refreshCookie(tabA)).expect(401);
  });

  it('does not reopen a revoked session within the grace window', async () => {
    at = Date.parse('2026-12-03T08:00:00-06:00');
    const login = await app
      .request()
      .post('/api/auth/login')
      .send({ email: people.sup!.email, password: TEST_PASSWORD })
      .expect(200);
    const old = refreshCookie(login);
    const r1 = await app.request().post('/api/auth/refresh').set('Cookie', old).expect(200);
    await app.request().post('/api/auth/logout').set('Cookie', refreshCookie(r1)).expect(204);
    at += 5_000;
    await app.request().post('/api/auth/refresh').set('Cookie', old).expect(401);
  });

  it('signs out: the refresh cookie no longer works', async () => {
    const login = await app
      .request()
      .post('/api/auth/login')
      .send({ email: people.sup!.email, password: TEST_PASSWORD })
      .expect(200);
    const cookie = refreshCookie(login);
    await app.request().post('/api/auth/logout').set('Cookie', cookie).expect(204);
    await app.request().post('/api/auth/refresh').set('Cookie', cookie).expect(401);
    await app.request().post('/api/auth/refresh').expect(204); // no cookie: no session to restore
  });

  it('rejects expired, forged, unsigned and malformed access tokens', async () => {
    const secret = app.deps.config.JWT_SECRET;
    const claims = { org: 'x', sub: people.sup!.id };
    const base = { issuer: 'nightyard', audience: 'nightyard-api' } as const;
    const expired = jwt.sign({ ...claims, exp: Math.floor(app.deps.clock().getTime() / 1000) - 60 }, secret, base);
    const forged = jwt.sign(claims, 'another-secret-of-sufficient-length-000000', { ...base, expiresIn: 600 });
    const unsigned = jwt.sign(claims, '', { ...base, algorithm: 'none', expiresIn: 600 } as jwt.SignOptions);
    const e = await app.request().get('/api/auth/me').set('Authorization', `Bearer ${expired}`).expect(401);
    expect(e.body.error.message).toMatch(/expired/);
    await app.request().get('/api/auth/me').set('Authorization', `Bearer ${forged}`).expect(401);
    await app.request().get('/api/auth/me').set('Authorization', `Bearer ${unsigned}`).expect(401);
    await app.request().get('/api/auth/me').set('Authorization', 'Bearer not.a.token').expect(401);
    const none = await app.request().get('/api/auth/me').expect(401);
    expect(none.body.error.code).toBe('unauthenticated');
  });

  it('a token for a user of another organisation claim is refused', async () => {
    const token = jwt.sign({ org: '00000000-0000-4000-8000-000000000000' }, app.deps.config.JWT_SECRET, {
      subject: people.sup!.id,
      issuer: 'nightyard',
      audience: 'nightyard-api',
      expiresIn: 600,
    });
    await app.request().get('/api/auth/me').set('Authorization', `Bearer ${token}`).expect(401);
  });
});

describe('login throttling', () => {
  it('locks an account after five failures, whatever the address', async () => {
    const { users: p } = await createOrganisation(app, { victim: ['yard'] });
    for (let i = 0; i < 5; i++) {
      await app
        .request()
        .post('/api/auth/login')
        .set('X-Forwarded-For', `10.0.0.${i}`)
        .send({ email: p.victim!.email, password: 'wrong-password' })
        .expect(401);
    }
    const res = await app
      .request()
      .post('/api/auth/login')
      .send({ email: p.victim!.email, password: TEST_PASSWORD })
      .expect(429);
    expect(res.headers['retry-after']).toBe('900');
    expect(res.body.error.message).toMatch(/Wait 15 minutes/);
  });

  it('limits one address trying many accounts', async () => {
    const ip = '192.0.2.77';
    for (let i = 0; i < 20; i++) {
      await app
        .request()
        .post('/api/auth/login')
        .set('X-Forwarded-For', ip)
        .send({ email: `guess${i}@test.nightyard.example`, password: 'x' })
        .expect(401);
    }
    const { users: p } = await createOrganisation(app, { other: ['yard'] });
    await app
      .request()
      .post('/api/auth/login')
      .set('X-Forwarded-For', ip)
      .send({ email: p.other!.email, password: TEST_PASSWORD })
      .expect(429);
    await app
      .request()
      .post('/api/auth/login')
      .set('X-Forwarded-For', '192.0.2.78')
      .send({ email: p.other!.email, password: TEST_PASSWORD })
      .expect(200);
  });
});

describe('deactivated accounts', () => {
  it('cannot sign in, refresh or use a token issued before', async () => {
    const { users: p } = await createOrganisation(app, { gone: ['finance'] });
    const login = await app
      .request()
      .post('/api/auth/login')
      .send({ email: p.gone!.email, password: TEST_PASSWORD })
      .expect(200);
    await app.db.update(users).set({ status: 'deactivated' }).where(eq(users.id, p.gone!.id));
    await app.request().get('/api/auth/me').set('Authorization', `Bearer ${p.gone!.token}`).expect(401);
    await app.request().post('/api/auth/refresh').set('Cookie', refreshCookie(login)).expect(401);
    const res = await app
      .request()
      .post('/api/auth/login')
      .send({ email: p.gone!.email, password: TEST_PASSWORD })
      .expect(401);
    expect(res.body.error.message).toMatch(/deactivated/);
    const tokens = await app.db.select().from(refreshTokens).where(eq(refreshTokens.userId, p.gone!.id));
    expect(tokens.length).toBeGreaterThan(0);
  });
});
