import type { Logger } from 'pino';
import type { AuthSettings } from './auth/auth-service';
import type { Config } from './config';
import type { Db } from './db/client';
import type { JobQueue } from './jobs/job-queue';
import type { Mailer } from './mail/mailer';
import type { Clock } from './time/clock';
import type { LiveBus } from './live/live-bus';
import type { TestControl } from './dev/test-control-routes';
import type { KnownUsers } from './auth/known-users';
import type { YardNights } from './yard/yard-service';
import type { CostsInputs } from './costs/costs-service';

/** What route handlers are given: the database, settings and outside services. */
export interface AppDeps {
  db: Db;
  config: Config;
  auth: AuthSettings;
  mailer: Mailer;
  jobs: JobQueue;
  log: Logger;
  /** Told when a plan is published or revised (the OCPP central system sends it to chargers). */
  onPlanPublished?: (planId: string) => void;
  /** Live events by depot, streamed to the pages (fed by the OCPP central system, publish and report). */
  live: LiveBus;
  /** The only source of "now" (tests and development can stand it at a fixed instant). */
  clock: Clock;
  /** Browser tests only (NODE_ENV=test with NIGHTYARD_TEST_CONTROL=1): move the clock, seed a district. */
  testControl?: TestControl;
  /** Signed-in users kept between requests while the database reports their changes (absent: read per request). */
  knownUsers?: KnownUsers;
  /** Tonight's reads per depot, kept while the database reports the yard's changes (absent: read per request). */
  yardNights?: YardNights;
  /** The costs month's inputs per depot, kept while the database reports their changes (absent: read per request). */
  costsInputs?: CostsInputs;
  /** Runs a query against the database to prove it answers (for /api/health). */
  ping: () => Promise<void>;
}
