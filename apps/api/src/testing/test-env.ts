/** Where the tests find their database and the fake mail server (set by tools/test.sh). */
export const TEST_BASE_DATABASE_URL = process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:5434/nightyard_test';
/**
 * API test files run two at a time, each worker on its own copy of the migrated database (made
 * by the global set-up), so no file sees another's rows or locks.
 */
export const TEST_WORKERS = 2;
export const workerDatabaseUrl = (worker: number) => `${TEST_BASE_DATABASE_URL}_w${worker}`;
const worker = Number(process.env.VITEST_POOL_ID ?? 0);
if (worker > TEST_WORKERS)
  throw new Error(`Test worker ${worker} has no database: raise TEST_WORKERS to vitest's maxWorkers`);
export const TEST_DATABASE_URL = worker >= 1 ? workerDatabaseUrl(worker) : TEST_BASE_DATABASE_URL;
export const TEST_SMTP_PORT = Number(process.env.SMTP_PORT ?? 2526);
export const TEST_FAKE_MAIL_URL = process.env.FAKE_MAIL_URL ?? 'http://127.0.0.1:2581';
