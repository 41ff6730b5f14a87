import { sql } from 'drizzle-orm';
import type { Db } from './client';

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

/**
 * Serialises the writes to one target (e.g. one depot's service day) until the transaction ends:
 * a second writer waits here, then sees the first one's committed rows. Replace-all writes take
 * it first and validate what depends on the database after it. Keys are hashed to 32 bits, so two
 * targets may share a lock now and then: that only makes one wait, never mixes their rows.
 */
export async function lockTarget(tx: Tx, kind: string, ...ids: string[]): Promise<void> {
  await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${[kind, ...ids].join(':')}))`);
}

export type { Tx };
