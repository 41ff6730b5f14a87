import path from 'node:path';
import pg from 'pg';
import { createDb } from '../db/client';
import { applyMigrations } from '../db/migrate';
import { TEST_DATABASE_URL } from './test-env';

/** Each run starts from an empty, freshly migrated database. */
export default async function setup(): Promise<void> {
  const pool = new pg.Pool({ connectionString: TEST_DATABASE_URL, max: 2 });
  try {
    await pool.query('drop schema if exists public cascade; drop schema if exists drizzle cascade; create schema public;');
    await applyMigrations(createDb(pool), path.resolve('drizzle'));
  } finally {
    await pool.end();
  }
}
