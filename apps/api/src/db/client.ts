import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import type { Logger } from 'pino';
import * as schema from './schema';

export type Db = NodePgDatabase<typeof schema>;

/**
 * The connection pool. When PostgreSQL restarts or ends a connection, the pool reports the idle
 * connection's error here (without a listener Node would stop the process); the connection is
 * dropped and the next query opens a new one, so the API comes back by itself.
 */
export function createPool(databaseUrl: string, log?: Logger): pg.Pool {
  const pool = new pg.Pool({
    connectionString: databaseUrl,
    max: 10,
    // A request waits at most this long for a connection while the database is away (then 503).
    connectionTimeoutMillis: 5_000,
  });
  pool.on('error', (err) => log?.warn({ err }, 'database connection lost; the next query reconnects'));
  return pool;
}

export function createDb(pool: pg.Pool): Db {
  return drizzle(pool, { schema });
}
