import { and, eq, isNull } from 'drizzle-orm';
import { randomUUID } from 'node:crypto';
import type { ActionTokenInfo, SessionUser, TokenResponse } from '@nightyard/contracts';
import type { Db } from '../db/client';
import { actionTokens, organisations, refreshTokens, users } from '../db/schema';
import { DomainError, unauthenticated } from '../http/errors';
import type { Mailer } from '../mail/mailer';
import { resetMail } from '../mail/templates';
import { signAccessToken } from './access-tokens';
import type { Logger } from 'pino';
import { assertLoginAllowed, recordLoginAttempt, type ThrottleLimits } from './login-throttle';
import { DEFAULT_RESET_LIMITS, takeResetSlot, type ResetLimits } from './reset-throttle';
import { DUMMY_HASH, checkPassword, hashPassword, hashToken, newOpaqueToken } from './secrets';

export interface AuthSettings {
  jwtSecret: string;
  accessTokenSeconds: number;
  refreshTokenDays: number;
  resetMinutes: number;
  /**
   * How long a just-rotated refresh token may be presented again and still be honoured (tabs and
   * devices that refreshed at the same moment); REFRESH_GRACE_SECONDS (30) otherwise.
   */
  refreshGraceSeconds?: number;
  throttle: ThrottleLimits;
  /** Password-reset throttle; the defaults (5 an hour per account, 20 per 15 minutes per client) otherwise. */
  resetThrottle?: ResetLimits;
  publicUrl: (path: string) => string;
}

export interface IssuedTokens {
  response: TokenResponse;
  refreshToken: string;
  refreshExpiresAt: Date;
}

async function sessionUser(db: Db, userId: string): Promise<SessionUser> {
  const [row] = await db
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      roles: users.roles,
      orgId: organisations.id,
      orgName: organisations.name,
    })
    .from(users)
    .innerJoin(organisations, eq(organisations.id, users.organisationId))
    .where(eq(users.id, userId));
  if (!row) throw unauthenticated();
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    roles: row.roles,
    organisation: { id: row.orgId, name: row.orgName },
  };
}

async function issue(db: Db, s: AuthSettings, userId: string, familyId: string, now: Date): Promise<IssuedTokens> {
  const user = await sessionUser(db, userId);
  const { token, hash } = newOpaqueToken();
  const refreshExpiresAt = new Date(now.getTime() + s.refreshTokenDays * 86_400_000);
  await db.insert(refreshTokens).values({ userId, familyId, tokenHash: hash, expiresAt: refreshExpiresAt });
  const accessToken = signAccessToken(
    s.jwtSecret,
    s.accessTokenSeconds,
    { id: user.id, organisationId: user.organisation.id },
    now,
  );
  return {
    response: { accessToken, expiresInSeconds: s.accessTokenSeconds, user },
    refreshToken: token,
    refreshExpiresAt,
  };
}

const WRONG_CREDENTIALS = 'E-mail or password is not right';

export async function login(
  db: Db,
  s: AuthSettings,
  email: string,
  password: string,
  ip: string,
  now: Date,
): Promise<IssuedTokens> {
  await assertLoginAllowed(db, s.throttle, email, ip, now);
  const [user] = await db.select().from(users).where(eq(users.email, email));
  const ok = await checkPassword(password, user?.passwordHash ?? DUMMY_HASH);
  if (!user || !ok || !user.passwordHash) {
    await recordLoginAttempt(db, email, ip, false, now);
    throw new DomainError('unauthenticated', WRONG_CREDENTIALS);
  }
  if (user.status !== 'active') {
    await recordLoginAttempt(db, email, ip, false, now);
    throw new DomainError('unauthenticated', 'This account is deactivated: ask your administrator');
  }
  await recordLoginAttempt(db, email, ip, true, now);
  await db.update(users).set({ lastSignInAt: now }).where(eq(users.id, user.id));
  return issue(db, s, user.id, randomUUID(), now);
}

/** Seconds after a rotation during which the rotated token still refreshes the same session. */
export const REFRESH_GRACE_SECONDS = 30;

/**
 * Swaps a refresh token for a new pair. A token used twice means it was copied: the whole family
 * (every token descended from that sign-in) is revoked, signing out the thief and the owner.
 * Except within the grace window just after its rotation: several tabs (or a retried request)
 * that refresh at once all present the same cookie, and each then joins the one session (a new
 * token of the same family) instead of ending it. Replay after the window still ends the family.
 */
export async function refresh(db: Db, s: AuthSettings, token: string | undefined, now: Date): Promise<IssuedTokens> {
  if (!token) throw unauthenticated('No session: sign in');
  const outcome = await db.transaction(async (tx) => {
    const [row] = await tx
      .select()
      .from(refreshTokens)
      .where(eq(refreshTokens.tokenHash, hashToken(token)))
      .for('update');
    if (!row || row.revokedAt || row.expiresAt < now) return 'ended' as const;
    const graceMs = (s.refreshGraceSeconds ?? REFRESH_GRACE_SECONDS) * 1000;
    const sinceUse = row.usedAt ? now.getTime() - row.usedAt.getTime() : null;
    if (sinceUse !== null && !(sinceUse >= 0 && sinceUse <= graceMs)) {
      // Committed before the caller is refused: a rollback would leave the copied session alive.
      await tx.update(refreshTokens).set({ revokedAt: now }).where(eq(refreshTokens.familyId, row.familyId));
      return 'replayed' as const;
    }
    const [user] = await tx.select({ status: users.status }).from(users).where(eq(users.id, row.userId));
    if (user?.status !== 'active') return 'inactive' as const;
    // Within the grace window the token stays marked with its first use: the window never stretches.
    if (sinceUse === null) await tx.update(refreshTokens).set({ usedAt: now }).where(eq(refreshTokens.id, row.id));
    return issue(tx as unknown as Db, s, row.userId, row.familyId, now);
  });
  if (outcome === 'ended') throw unauthenticated('Your session has ended: sign in again');
  if (outcome === 'replayed')
    throw unauthenticated('This session was used elsewhere and has been ended: sign in again');
  if (outcome === 'inactive') throw unauthenticated('This account is deactivated');
  return outcome;
}

export async function logout(db: Db, token: string | undefined, now: Date): Promise<void> {
  if (!token) return;
  const [row] = await db
    .select()
    .from(refreshTokens)
    .where(eq(refreshTokens.tokenHash, hashToken(token)));
  if (row) await db.update(refreshTokens).set({ revokedAt: now }).where(eq(refreshTokens.familyId, row.familyId));
}

export async function me(db: Db, userId: string): Promise<SessionUser> {
  return sessionUser(db, userId);
}

/** Creates a single-use link token for the user; returns the raw token to put in the link. */
export async function createActionToken(
  db: Db,
  userId: string,
  purpose: 'invite' | 'reset',
  validMs: number,
  now: Date,
): Promise<string> {
  const { token, hash } = newOpaqueToken();
  await db
    .update(actionTokens)
    .set({ usedAt: now })
    .where(and(eq(actionTokens.userId, userId), eq(actionTokens.purpose, purpose), isNull(actionTokens.usedAt)));
  await db
    .insert(actionTokens)
    .values({ userId, purpose, tokenHash: hash, expiresAt: new Date(now.getTime() + validMs) });
  return token;
}

/**
 * Always answers the same way, in about the same time, so the form cannot be used to learn who
 * has an account: the same reads and the same token work happen for every address, and the
 * token is stored and the e-mail sent after the answer, off the request path. Beyond the
 * throttle (per account and per client address) nothing is sent, and the answer is unchanged.
 */
export async function forgotPassword(
  db: Db,
  s: AuthSettings,
  mailer: Mailer,
  log: Logger,
  email: string,
  ip: string,
  now: Date,
): Promise<void> {
  const allowed = await takeResetSlot(db, s.resetThrottle ?? DEFAULT_RESET_LIMITS, email, ip, now);
  const [user] = await db.select().from(users).where(eq(users.email, email));
  const { token, hash } = newOpaqueToken();
  if (!allowed || !user || user.status !== 'active') return;
  void deliverReset(db, s, mailer, user, token, hash, now).catch((err: unknown) =>
    log.error({ err, userId: user.id }, 'password reset e-mail not sent'),
  );
}

async function deliverReset(
  db: Db,
  s: AuthSettings,
  mailer: Mailer,
  user: { id: string; email: string; name: string },
  token: string,
  hash: string,
  now: Date,
) {
  await db
    .update(actionTokens)
    .set({ usedAt: now })
    .where(and(eq(actionTokens.userId, user.id), eq(actionTokens.purpose, 'reset'), isNull(actionTokens.usedAt)));
  await db.insert(actionTokens).values({
    userId: user.id,
    purpose: 'reset',
    tokenHash: hash,
    expiresAt: new Date(now.getTime() + s.resetMinutes * 60_000),
  });
  await mailer.send(
    resetMail({
      to: user.email,
      name: user.name,
      link: s.publicUrl(`/set-password?token=${token}`),
      minutes: s.resetMinutes,
    }),
  );
}

async function findActionToken(db: Db, token: string, now: Date) {
  const [row] = await db
    .select({ token: actionTokens, user: users })
    .from(actionTokens)
    .innerJoin(users, eq(users.id, actionTokens.userId))
    .where(eq(actionTokens.tokenHash, hashToken(token)));
  if (row && !row.token.usedAt && row.user.status === 'deactivated') {
    throw new DomainError(
      'forbidden',
      'This account has been deactivated, so its link no longer works: ask your administrator',
    );
  }
  if (!row || row.token.usedAt) {
    throw new DomainError('not_found', 'This link is not valid or was already used: ask for a new one');
  }
  if (row.token.expiresAt < now) {
    throw new DomainError('token_expired', 'This link has expired: ask for a new one');
  }
  return row;
}

export async function actionTokenInfo(db: Db, token: string, now: Date): Promise<ActionTokenInfo> {
  const { token: t, user } = await findActionToken(db, token, now);
  return { email: user.email, name: user.name, purpose: t.purpose, expiresAt: t.expiresAt.toISOString() };
}

/** Sets the password from an invitation or reset link; activates an invited account. */
export async function setPassword(db: Db, token: string, password: string, now: Date): Promise<void> {
  const { token: t, user } = await findActionToken(db, token, now);
  const passwordHash = await hashPassword(password);
  await db.transaction(async (tx) => {
    const used = await tx
      .update(actionTokens)
      .set({ usedAt: now })
      .where(and(eq(actionTokens.id, t.id), isNull(actionTokens.usedAt)))
      .returning({ id: actionTokens.id });
    if (used.length === 0) throw new DomainError('not_found', 'This link was already used: ask for a new one');
    await tx.update(users).set({ passwordHash, status: 'active' }).where(eq(users.id, user.id));
    // A new password ends every existing session of the account.
    await tx
      .update(refreshTokens)
      .set({ revokedAt: now })
      .where(and(eq(refreshTokens.userId, user.id), isNull(refreshTokens.revokedAt)));
  });
}
