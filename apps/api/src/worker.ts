import { loadConfig } from './config';
import { createLogger } from './logging';
import { installProcessGuards } from './process-guards';
import { createDb, createPool } from './db/client';
import { startPlanWork } from './plans/plan-work';
import { stopWorkPool } from './workers/pool';

// `npm run worker`: an extra process that takes plan jobs from the queue in PostgreSQL. Run as
// many as the machines allow; each job is worked once.
const config = loadConfig();
const log = createLogger({ level: config.LOG_LEVEL, service: 'nightyard-worker' });
installProcessGuards(log);
const pool = createPool(config.DATABASE_URL, log);
const db = createDb(pool);
const jobs = await startPlanWork(config, db, log);
log.info('worker waiting for plan jobs');

let stopping = false;
const stop = async () => {
  if (stopping) return;
  stopping = true;
  await jobs.stop();
  await Promise.all([pool.end(), stopWorkPool()]);
  process.exit(0);
};
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
