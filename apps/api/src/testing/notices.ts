import type { SQL } from 'drizzle-orm';
import { sql } from 'drizzle-orm';
import type { Db } from '../db/client';

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * Waits (in 20 ms steps, on the machine's timers: a database notification takes real time) until
 * `check` holds, or fails naming what did not happen.
 */
export async function until(check: () => Promise<boolean>, what: string, ms = 3_000): Promise<void> {
  for (let waited = 0; !(await check()); waited += 20) {
    if (waited > ms) throw new Error(`Not within ${ms} ms: ${what}`);
    await sleep(20);
  }
}

/**
 * Runs a write with the triggers silenced, as no code of ours ever does: nobody is notified. What
 * the API answers afterwards shows whether it read the rows again or kept what it had.
 */
export async function writeQuietly(db: Db, statement: SQL): Promise<void> {
  await db.transaction(async (tx) => {
    await tx.execute(sql`set local session_replication_role = replica`);
    await tx.execute(statement);
  });
}
