import { execFile } from 'node:child_process';
import { createServer } from 'node:net';
import path from 'node:path';
import { promisify } from 'node:util';
import pg from 'pg';
import { createDb } from '../db/client';
import { applyMigrations } from '../db/migrate';

const run = promisify(execFile);

/** A port nobody listens on right now (the kernel picks it). */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as { port: number };
      server.close(() => resolve(port));
    });
  });
}

/**
 * A PostgreSQL cluster of its own (tools/pg.sh, data under .test-data/) that a test may stop and
 * start again, as a real database restart, without touching the shared test database.
 */
export class ThrowawayCluster {
  readonly dir = path.resolve('.test-data/resilience-pg');
  readonly url: string;

  constructor(
    readonly port: number,
    readonly database = 'nightyard_resilience',
  ) {
    this.url = `postgres://postgres@127.0.0.1:${port}/${database}`;
  }

  async start(): Promise<void> {
    await run('tools/pg.sh', ['start', this.dir, String(this.port), 'fast']);
  }

  async stop(): Promise<void> {
    await run('tools/pg.sh', ['stop', this.dir]);
  }

  /** Starts it fresh: stopped first (a run that died may have left it up), an empty migrated database. */
  async setUp(): Promise<void> {
    await this.stop();
    await this.start();
    await run('tools/pg.sh', ['createdb', String(this.port), this.database]);
    const pool = new pg.Pool({ connectionString: this.url, max: 1 });
    try {
      await pool.query(
        'drop schema if exists public cascade; drop schema if exists drizzle cascade; drop schema if exists pgboss cascade; create schema public;',
      );
      await applyMigrations(createDb(pool), path.resolve('drizzle'));
    } finally {
      await pool.end();
    }
  }
}
