import type pg from 'pg';
import type { Db } from '../db/client';

const LOCK_SPACE = 'nightyard-plan-job';

/**
 * Runs `fn` while holding a session-level advisory lock on the plan, on a connection kept for
 * the run. PostgreSQL drops the lock the moment that connection ends, so a process killed in
 * the middle of a run leaves no lock behind: "nobody holds the lock" means "nobody is working
 * this plan", whatever pg-boss still believes about the job. Answers 'busy' when another
 * process holds it.
 */
export async function withPlanLock<T>(db: Db, planId: string, fn: () => Promise<T>): Promise<T | 'busy'> {
  const pool = (db as Db & { $client: pg.Pool }).$client;
  const client = await pool.connect();
  let broken: Error | undefined;
  try {
    const { rows } = await client.query<{ ok: boolean }>(
      'select pg_try_advisory_lock(hashtext($1), hashtext($2)) as ok',
      [LOCK_SPACE, planId],
    );
    if (!rows[0]?.ok) return 'busy';
    try {
      return await fn();
    } finally {
      const unlocked = await client
        .query<{ ok: boolean }>('select pg_advisory_unlock(hashtext($1), hashtext($2)) as ok', [LOCK_SPACE, planId])
        .then(
          (r) => r.rows[0]?.ok === true,
          () => false,
        );
      // A connection that could not give the lock back must not return to the pool holding it.
      if (!unlocked) broken = new Error('plan lock not released');
    }
  } catch (err) {
    broken ??= err as Error;
    throw err;
  } finally {
    client.release(broken);
  }
}
