// `npm run bench:api`: how the API holds up under load, on this machine. Builds the API, serves it
// from dist/ as a child process against a throwaway database (nightyard_bench on the test cluster,
// migrated and seeded with the demo district), then measures with autocannon, on 127.0.0.1 only:
//   1. requests/s and p99 latency of /api/health, tonight's plan and the costs month at 50
//      connections, ~5 s each, with the ratio of each to health measured in the same run;
//   2. /api/health's p99 while a 400-bus what-if plan solves in the engine's worker thread.
// Goals are printed beside the figures. Settings: TEST_PGPORT (5434), BENCH_PORT (3190),
// BENCH_SECONDS (5), BENCH_CONNECTIONS (50).
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { availableParallelism, loadavg } from 'node:os';
import autocannon from 'autocannon';
import pg from 'pg';
import { generateDepot } from '../../libs/scheduling/src/testing/generate-depot';
import { createDb, createPool } from '../../apps/api/src/db/client';
import { applyMigrations } from '../../apps/api/src/db/migrate';
import { clockFromEnv } from '../../apps/api/src/time/clock';
import { stopWorkPool } from '../../apps/api/src/workers/pool';
import { DEMO_PASSWORD } from '@nightyard/demo';
import { seedDemo } from '../../apps/api/src/demo/seed';

const PGPORT = Number(process.env.TEST_PGPORT ?? 5434);
const PORT = Number(process.env.BENCH_PORT ?? 3190);
const SECONDS = Number(process.env.BENCH_SECONDS ?? 5);
const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 50);
/** Other users' traffic while the what-if solves: a busy morning, not a load test. */
const SOLVE_CONNECTIONS = 10;
const DB_NAME = 'nightyard_bench';
const CLUSTER = `postgres://postgres@127.0.0.1:${PGPORT}`;
const BASE = `http://127.0.0.1:${PORT}`;
const clock = clockFromEnv();

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function clusterAnswers(): Promise<boolean> {
  const c = new pg.Client({ connectionString: `${CLUSTER}/postgres` });
  try {
    await c.connect();
    await c.end();
    return true;
  } catch {
    return false;
  }
}

/** A fresh database: dropped if an earlier run left it, migrated, seeded with the demo district. */
async function freshDatabase(): Promise<void> {
  const admin = new pg.Client({ connectionString: `${CLUSTER}/postgres` });
  await admin.connect();
  await admin.query(`drop database if exists ${DB_NAME} with (force)`);
  await admin.query(`create database ${DB_NAME}`);
  await admin.end();
  const pool = createPool(`${CLUSTER}/${DB_NAME}`);
  const db = createDb(pool);
  await applyMigrations(db, 'drizzle');
  await seedDemo(db, clock());
  await pool.end();
  await stopWorkPool();
}

async function dropDatabase(): Promise<void> {
  const admin = new pg.Client({ connectionString: `${CLUSTER}/postgres` });
  await admin.connect();
  await admin.query(`drop database if exists ${DB_NAME} with (force)`);
  await admin.end();
}

async function startApi(): Promise<ChildProcess> {
  const child = spawn(process.execPath, ['dist/api/main.mjs'], {
    env: {
      ...process.env,
      DATABASE_URL: `${CLUSTER}/${DB_NAME}`,
      PORT: String(PORT),
      SEED_DEMO: 'never',
      NODE_ENV: 'test',
    },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  const deadline = performance.now() + 60_000;
  while (performance.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`The API exited with code ${child.exitCode}`);
    try {
      if ((await fetch(`${BASE}/api/health`)).ok) return child;
    } catch {
      // not listening yet
    }
    await sleep(200);
  }
  child.kill('SIGTERM');
  throw new Error('The API did not answer /api/health within 60 s');
}

async function signIn(email: string): Promise<string> {
  const res = await fetch(`${BASE}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password: DEMO_PASSWORD }),
  });
  if (!res.ok) throw new Error(`Sign-in as ${email} failed: ${res.status} ${await res.text()}`);
  return ((await res.json()) as { accessToken: string }).accessToken;
}

async function getJson<T>(path: string, token: string): Promise<T> {
  const res = await fetch(`${BASE}${path}`, { headers: { authorization: `Bearer ${token}` } });
  if (!res.ok) throw new Error(`GET ${path}: ${res.status} ${await res.text()}`);
  return (await res.json()) as T;
}

interface Figures {
  reqPerSec: number;
  p99: number;
  p50: number;
  requests: number;
  bad: number;
}

async function load(path: string, token: string | null, connections: number, seconds: number): Promise<Figures> {
  const result = await autocannon({
    url: `${BASE}${path}`,
    connections,
    duration: seconds,
    timeout: 10,
    headers: token ? { authorization: `Bearer ${token}` } : {},
  });
  return {
    reqPerSec: result.requests.average,
    p99: result.latency.p99,
    p50: result.latency.p50,
    requests: result.requests.total,
    bad: result.non2xx + result.errors + result.timeouts,
  };
}

const fmt = (n: number, digits = 0) => n.toFixed(digits);
const mark = (ok: boolean) => (ok ? 'met' : 'MISSED');

let api: ChildProcess | undefined;
let startedCluster = false;
try {
  if (!(await clusterAnswers())) {
    spawnSync('tools/pg.sh', ['start', '.test-data/pg', String(PGPORT), 'fast'], { stdio: 'inherit' });
    startedCluster = true;
  }
  console.log(`Preparing ${DB_NAME} on 127.0.0.1:${PGPORT} (migrations, demo seed) and building the API...`);
  await freshDatabase();
  const build = spawnSync(process.execPath, ['tools/build-api.mjs'], { stdio: 'inherit' });
  if (build.status !== 0) throw new Error('The API build failed');
  api = await startApi();

  const supervisor = await signIn('supervisor@demo.nightyard.example');
  const finance = await signIn('finance@demo.nightyard.example');
  const { depots } = await getJson<{ depots: { id: string; name: string }[] }>('/api/depots', supervisor);
  const depotId = depots[0]!.id;
  const today = clock().toISOString().slice(0, 10);
  const routes = [
    { name: 'GET /api/health', path: '/api/health', token: null },
    { name: "GET tonight's plan", path: `/api/depots/${depotId}/tonight`, token: supervisor },
    { name: 'GET costs month', path: `/api/depots/${depotId}/costs/month?date=${today}`, token: finance },
  ] as const;
  // One request each first: the costs month's first answer is computed, the rest are remembered.
  for (const r of routes) await getJson(r.path, r.token ?? supervisor);

  // The routes take turns in rounds, so a change in the machine's other load shows in every route
  // alike; each ratio to health is taken within its round, and the median round is reported.
  const rounds = Math.max(1, Math.round(SECONDS / 2));
  const roundSeconds = Math.max(1, Math.round(SECONDS / rounds));
  console.log(
    `\nAPI bench on ${BASE}: ${CONNECTIONS} connections, ${rounds} rounds of ${roundSeconds} s per route (node ${process.version})`,
  );
  const byRound: Figures[][] = [];
  for (let k = 0; k < rounds; k++) {
    const round: Figures[] = [];
    for (const r of routes) round.push(await load(r.path, r.token, CONNECTIONS, roundSeconds));
    byRound.push(round);
  }
  const median = (xs: number[]) => xs.slice().sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
  const goals = [null, { share: 0.5, p99: 100 }, { share: 0.25, p99: 100 }];
  console.log('route                   req/s   p50 ms   p99 ms   of health   non-2xx/errors   goal');
  routes.forEach((r, i) => {
    const of = (pick: (f: Figures) => number) => median(byRound.map((round) => pick(round[i]!)));
    const share = median(byRound.map((round) => round[i]!.reqPerSec / round[0]!.reqPerSec));
    const p99 = of((f) => f.p99);
    const bad = byRound.reduce((a, round) => a + round[i]!.bad, 0);
    const goal = goals[i];
    const verdict = goal
      ? `>= ${Math.round(goal.share * 100)}% of health: ${mark(share >= goal.share)}; p99 <= ${goal.p99} ms: ${mark(p99 <= goal.p99)}`
      : '';
    console.log(
      `${r.name.padEnd(22)} ${fmt(of((f) => f.reqPerSec)).padStart(6)} ${fmt(of((f) => f.p50)).padStart(8)} ${fmt(p99).padStart(8)} ${`${fmt(share * 100)}%`.padStart(11)} ${String(bad).padStart(16)}   ${verdict}`,
    );
  });
  console.log(
    `(median of ${rounds} rounds; the machine's 1-minute load average: ${loadavg()[0]!.toFixed(1)} on ${availableParallelism()} cores)`,
  );

  // Health with other users' traffic, before and while a 400-bus what-if solves.
  const quiet = await load('/api/health', null, SOLVE_CONNECTIONS, SECONDS);
  const res = await fetch(`${BASE}/api/depots/${depotId}/plans/what-if`, {
    method: 'POST',
    headers: { authorization: `Bearer ${supervisor}`, 'content-type': 'application/json' },
    body: JSON.stringify(generateDepot({ buses: 400, seed: 11 })),
  });
  if (res.status !== 202) throw new Error(`The what-if was refused: ${res.status} ${await res.text()}`);
  const planId = ((await res.json()) as { plan: { id: string } }).plan.id;
  const status = async () =>
    (await getJson<{ plan: { status: string } }>(`/api/plans/${planId}`, supervisor)).plan.status;
  const queuedAt = performance.now();
  while ((await status()) === 'queued' && performance.now() - queuedAt < 30_000) await sleep(50);
  const solveStart = performance.now();
  const during = await load('/api/health', null, SOLVE_CONNECTIONS, SECONDS);
  const stillSolving = (await status()) === 'running';
  let final = await status();
  while ((final === 'running' || final === 'queued') && performance.now() - solveStart < 180_000) {
    await sleep(250);
    final = await status();
  }
  const solveSeconds = (performance.now() - solveStart) / 1000;
  console.log(`\n/api/health at ${SOLVE_CONNECTIONS} connections, ${SECONDS} s`);
  console.log(`  quiet:                          ${fmt(quiet.reqPerSec).padStart(6)} req/s, p99 ${fmt(quiet.p99)} ms`);
  console.log(
    `  while a 400-bus what-if solves: ${fmt(during.reqPerSec).padStart(6)} req/s, p99 ${fmt(during.p99)} ms, non-2xx/errors ${during.bad}` +
      `   goal p99 <= 50 ms: ${mark(during.p99 <= 50)}`,
  );
  console.log(`  (load average ${loadavg()[0]!.toFixed(1)})`);
  console.log(
    `  the what-if ${final} after ${fmt(solveSeconds, 1)} s of solving${stillSolving ? ' (it solved through the whole measurement)' : ' (it finished before the measurement ended: the figure is partly a quiet one)'}`,
  );
} finally {
  if (api && api.exitCode === null) {
    api.kill('SIGTERM');
    await new Promise((r) => api!.once('exit', r));
  }
  await dropDatabase().catch(() => undefined);
  if (startedCluster) spawnSync('tools/pg.sh', ['stop', '.test-data/pg'], { stdio: 'inherit' });
}
