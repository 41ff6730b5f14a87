import { and, count, eq, gt, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { passwordResetRequests } from '../db/schema';

export interface ResetLimits {
  /** Reset e-mails one address may be sent per `accountWindowMinutes`. */
  perAccount: number;
  accountWindowMinutes: number;
  /** Reset requests one client address may make per `addressWindowMinutes`. */
  perAddress: number;
  addressWindowMinutes: number;
}

export const DEFAULT_RESET_LIMITS: ResetLimits = {
  perAccount: 5,
  accountWindowMinutes: 60,
  perAddress: 20,
  addressWindowMinutes: 15,
};

/**
 * Takes one password-reset slot for the e-mail address and the client address, or answers false
 * when either has had its share. Counted in PostgreSQL so every API process sees the same
 * requests; only granted requests count, so a flood does not keep the owner locked out after it
 * stops. Known and unknown addresses are counted alike (the answer must not tell them apart).
 */
export async function takeResetSlot(
  db: Db,
  limits: ResetLimits,
  email: string,
  ip: string,
  now: Date,
): Promise<boolean> {
  return db.transaction(async (tx) => {
    // One decision at a time per e-mail address: two requests at once cannot both take the last slot.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`password-reset:${email}`}))`);
    const recent = (where: ReturnType<typeof and>) =>
      tx
        .select({ n: count() })
        .from(passwordResetRequests)
        .where(where)
        .then(([r]) => r?.n ?? 0);
    const [byAccount, byAddress] = await Promise.all([
      recent(
        and(
          eq(passwordResetRequests.email, email),
          gt(passwordResetRequests.at, new Date(now.getTime() - limits.accountWindowMinutes * 60_000)),
        ),
      ),
      recent(
        and(
          eq(passwordResetRequests.ip, ip),
          gt(passwordResetRequests.at, new Date(now.getTime() - limits.addressWindowMinutes * 60_000)),
        ),
      ),
    ]);
    if (byAccount >= limits.perAccount || byAddress >= limits.perAddress) return false;
    await tx.insert(passwordResetRequests).values({ email, ip, at: now });
    return true;
  });
}
