import path from 'node:path';
import { sql } from 'drizzle-orm';
import { createApp } from './app';
import { KnownUsers, USER_CHANGED } from './auth/known-users';
import { NotifiedCache } from './db/notified-cache';
import { COSTS_CHANGED, RATE_PLAN_CHANGED, type CostsInputs } from './costs/costs-service';
import { YARD_CHANGED, type YardNights } from './yard/yard-service';
import { takeChargerReading } from './yard/charger-readings';
import { announcePlan, announceReport } from './live/live-feeds';
import { loadConfig, wantsDemoSeed } from './config';
import { pino } from 'pino';
import { createLogger } from './logging';
import { installProcessGuards } from './process-guards';
import { createDb, createPool } from './db/client';
import { applyMigrations } from './db/migrate';
import { smtpMailer } from './mail/mailer';
import { startPlanWork } from './plans/plan-work';
import { stopWorkPool } from './workers/pool';
import { CentralSystem } from './ocpp/central-system';
import { LiveBus } from './live/live-bus';
import { feedChargerStates } from './live/live-feeds';
import { adjustableClock, clockFromEnv } from './time/clock';
import { isEmpty, seedDemo } from './demo/seed';
import { DEMO_PASSWORD, demoDistrictDepots, demoUsers } from '@nightyard/demo';

const config = loadConfig();
// The browser tests move the clock from spec to spec; nothing else can (see dev/test-control-routes).
const testControl =
  config.NODE_ENV === 'test' && process.env.NIGHTYARD_TEST_CONTROL === '1' ? adjustableClock(clockFromEnv()) : null;
const clock = testControl?.clock ?? clockFromEnv();
// Written off the request thread (a log line per request is a write to stdout); pino flushes
// what is left when the process exits, the fatal line of an uncaught exception included.
const log = createLogger(
  { level: config.LOG_LEVEL, service: 'nightyard-api' },
  pino.destination({ dest: 1, sync: false }),
);
installProcessGuards(log);
// Paths come from the environment or the working directory, never from this file's location,
// so the same code runs from source (tsx) and from the bundle in dist/.
const migrationsDir = config.MIGRATIONS_DIR ?? path.resolve('drizzle');
const webDist = config.WEB_DIST ?? path.resolve('dist/web/browser');
const publicBase = config.PUBLIC_URL ?? `http://localhost:${config.PORT}`;

const pool = createPool(config.DATABASE_URL, log);
const db = createDb(pool);

await applyMigrations(db, migrationsDir);
log.info({ migrationsDir }, 'migrations applied');
// Production seeds nothing unless SEED_DEMO=always says so (see config.ts).
if (wantsDemoSeed(config) && (await isEmpty(db))) {
  // The whole invented district: three depots on three utilities.
  await seedDemo(db, clock(), undefined, { depots: 'district' });
  log.info('demo data seeded');
}

// The engine, file parses and password hashing run in worker threads.
const jobs = await startPlanWork(config, db, log);

const central = new CentralSystem(db, log, clock);
// Live events for the pages: charger states from the central system; publish and report add theirs.
const live = new LiveBus(log);
feedChargerStates(central, live, clock);

// Requests take their signed-in user from here while the database reports every change to users.
const knownUsers = new KnownUsers(config.DATABASE_URL, log);
await knownUsers.start();
// Tonight's reads per depot, kept while the yard's tables report their changes; a user's change
// (a name shown beside a report) forgets them all.
const yardNights: YardNights = new NotifiedCache(config.DATABASE_URL, {
  channel: YARD_CHANGED,
  forgetAllOn: [USER_CHANGED],
  log,
  maxGroups: 2_000,
});
await yardNights.start();
// The costs month's inputs per depot, kept while the tables they come from report their changes.
const costsInputs: CostsInputs = new NotifiedCache(config.DATABASE_URL, {
  channel: COSTS_CHANGED,
  forgetAllOn: [RATE_PLAN_CHANGED],
  log,
  maxGroups: 2_000,
});
await costsInputs.start();

const mailer = smtpMailer({ host: config.SMTP_HOST, port: config.SMTP_PORT, from: config.MAIL_FROM }, log, clock);
const publicUrl = (p: string) => new URL(p, publicBase).toString();
const onPlanPublished = (planId: string) =>
  void central.sendPlan(planId).catch((err: unknown) => log.error({ err }, 'profiles not sent'));

const { app } = createApp({
  db,
  knownUsers,
  yardNights,
  costsInputs,
  clock,
  live,
  ...(testControl ? { testControl: { setClock: testControl.set } } : {}),
  jobs,
  onPlanPublished,
  config: { ...config, WEB_DIST: webDist },
  log,
  mailer,
  ping: async () => {
    await db.execute(sql`select 1`);
  },
  auth: {
    jwtSecret: config.JWT_SECRET,
    accessTokenSeconds: config.ACCESS_TOKEN_SECONDS,
    refreshTokenDays: config.REFRESH_TOKEN_DAYS,
    resetMinutes: config.RESET_MINUTES,
    throttle: {
      perAccount: config.LOGIN_MAX_FAILURES_PER_ACCOUNT,
      perAddress: config.LOGIN_MAX_FAILURES_PER_ADDRESS,
      windowMinutes: config.LOGIN_WINDOW_MINUTES,
    },
    publicUrl,
  },
});

// A bus's state of charge read by its charger at plug-in: its arrival reading, and a re-plan when
// it is far from what the plan took (yard/charger-readings.ts).
central.onSocReading(async (reading) => {
  const outcome = await takeChargerReading({ db, mailer, publicUrl, onPlanPublished }, reading);
  log.info(
    {
      ...reading,
      outcome: outcome.taken ? { ...outcome, revised: outcome.revised?.revision.version ?? null } : outcome,
    },
    'state of charge read at plug-in',
  );
  if (outcome.taken && outcome.revised) {
    announceReport(
      live,
      reading.depotId,
      `charger ${reading.charger}`,
      { kind: 'soc_reading', planId: outcome.revised.revision.id, bus: outcome.bus, socPct: outcome.socPct },
      clock(),
    );
    announcePlan(live, outcome.revised.revision, 'revised', clock());
  }
});

const server = app.listen(config.PORT, '127.0.0.1', () => {
  const lines = [
    '',
    `Nightyard is running at ${publicBase}`,
    '',
    ...(wantsDemoSeed(config)
      ? [
          `Demo sign-ins (password: ${DEMO_PASSWORD}):`,
          ...demoUsers.map((u) => `  ${u.email.padEnd(36)} ${u.roles.join(' + ')}`),
          // The other depots' yard staff: each sees their own depot only.
          ...demoDistrictDepots.flatMap((d) =>
            d.yardUser ? [`  ${d.yardUser.email.padEnd(36)} yard (${d.depot.name})`] : [],
          ),
          '',
        ]
      : []),
  ];
  // eslint-disable-next-line no-console -- the start-up banner is for the person at the terminal, not for the log
  if (config.NODE_ENV !== 'test') console.log(lines.join('\n'));
  log.info({ port: config.PORT }, 'listening');
});

// Chargers connect to ws://host:PORT/ocpp/<identity> (OCPP-J); everything else is refused.
central.attachTo(server);

let stopping = false;
const shutdown = (signal: string) => {
  // Ctrl-C reaches this process and `npm start`'s clean-up alike: stop once.
  if (stopping) return;
  stopping = true;
  log.info({ signal }, 'shutting down');
  // The chargers' last live states are written before the pool ends (they logged "Cannot use a
  // pool after calling end on the pool" at every stop).
  const chargersClosed = central.close().catch((err: unknown) => log.warn({ err }, 'charger connections not closed'));
  live.endStreams();
  server.close(() =>
    jobs
      .stop()
      .then(() => chargersClosed)
      .then(() =>
        Promise.all([knownUsers.close(), yardNights.close(), costsInputs.close(), pool.end(), stopWorkPool()]),
      )
      .then(() => process.exit(0)),
  );
  setTimeout(() => process.exit(0), 5000).unref();
};
process.on('SIGTERM', () => shutdown('SIGTERM'));
process.on('SIGINT', () => shutdown('SIGINT'));
