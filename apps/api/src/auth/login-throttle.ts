import { and, count, eq, gt } from 'drizzle-orm';
import type { Db } from '../db/client';
import { loginAttempts } from '../db/schema';
import { DomainError } from '../http/errors';

export interface ThrottleLimits {
  perAccount: number;
  perAddress: number;
  windowMinutes: number;
}

/**
 * Refuses sign-in after too many recent failures for one account or from one address. Counted in
 * the database so every API process sees the same attempts.
 */
export async function assertLoginAllowed(
  db: Db,
  limits: ThrottleLimits,
  email: string,
  ip: string,
  now: Date,
): Promise<void> {
  const since = new Date(now.getTime() - limits.windowMinutes * 60_000);
  const failed = (field: typeof loginAttempts.email | typeof loginAttempts.ip, value: string) =>
    db
      .select({ n: count() })
      .from(loginAttempts)
      .where(and(eq(field, value), eq(loginAttempts.succeeded, false), gt(loginAttempts.at, since)))
      .then(([r]) => r?.n ?? 0);
  const [byAccount, byAddress] = await Promise.all([failed(loginAttempts.email, email), failed(loginAttempts.ip, ip)]);
  if (byAccount >= limits.perAccount || byAddress >= limits.perAddress) {
    throw new DomainError(
      'too_many_requests',
      `Too many failed sign-in attempts. Wait ${limits.windowMinutes} minutes, or reset your password.`,
      undefined,
      { 'Retry-After': String(limits.windowMinutes * 60) },
    );
  }
}

export async function recordLoginAttempt(
  db: Db,
  email: string,
  ip: string,
  succeeded: boolean,
  now: Date,
): Promise<void> {
  // Stamped with the API's clock (not the database's now()) so the throttle window compares like with like.
  await db.insert(loginAttempts).values({ email, ip, succeeded, at: now });
}
