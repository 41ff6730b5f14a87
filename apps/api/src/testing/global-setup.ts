import path from 'node:path';
import pg from 'pg';
import { createDb } from '../db/client';
import { applyMigrations } from '../db/migrate';
import { TEST_BASE_DATABASE_URL, TEST_WORKERS, workerDatabaseUrl } from './test-env';

/**
 * Each run starts from an empty, freshly migrated database, copied once per test worker
 * (CREATE DATABASE ... TEMPLATE copies the migrated schema in a moment).
 */
export default async function setup(): Promise<void> {
  const pool = new pg.Pool({ connectionString: TEST_BASE_DATABASE_URL, max: 2 });
  try {
    await pool.query(
      'drop schema if exists public cascade; drop schema if exists drizzle cascade; create schema public;',
    );
    await applyMigrations(createDb(pool), path.resolve('drizzle'));
  } finally {
    await pool.end();
  }
  const base = new URL(TEST_BASE_DATABASE_URL).pathname.slice(1);
  const admin = new pg.Client({ connectionString: new URL('/postgres', TEST_BASE_DATABASE_URL).toString() });
  await admin.connect();
  try {
    for (let w = 1; w <= TEST_WORKERS; w++) {
      const name = new URL(workerDatabaseUrl(w)).pathname.slice(1);
      await admin.query(`drop database if exists "${name}" with (force)`);
      await admin.query(`create database "${name}" template "${base}"`);
    }
  } finally {
    await admin.end();
  }
}
