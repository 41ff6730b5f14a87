import { defineConfig, type PlaywrightTestConfig } from '@playwright/test';

type WebServer = Extract<NonNullable<PlaywrightTestConfig['webServer']>, unknown[]>[number];
import { E2E_WORKERS, e2eDatabaseUrl, e2eServerPorts } from './e2e/ports';

// Browser tests run against the built app served by the real API on its own database.
// tools/test.sh prepares the databases, the fake mail server and Debian's Chromium.
// Journeys run two at a time (E2E_WORKERS), each worker on servers of its own (e2e/ports.ts):
// the API's clock, which every journey moves, and the simulator's chargers are never shared.

export default defineConfig({
  testDir: 'e2e',
  // A file's journeys run in order in one worker (some share a district seeded in beforeAll).
  fullyParallel: false,
  workers: E2E_WORKERS,
  retries: 0,
  timeout: 45_000,
  expect: { timeout: 10_000 },
  reporter: [['list']],
  use: {
    // The worker's own API (e2e/support.ts `test` moves the port).
    baseURL: `http://localhost:${e2eServerPorts(0).api}`,
    browserName: 'chromium',
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
      ],
    },
    // The depot's zone, whatever the machine's: what the pages show is then the same on any machine.
    timezoneId: 'America/Chicago',
    locale: 'en-US',
    trace: 'off',
    screenshot: 'only-on-failure',
  },
  // Per worker: the API serving the built app on a database of its own, and the demo depot's
  // chargers simulated (so the pages show live OCPP states) pointed at that API.
  webServer: Array.from({ length: E2E_WORKERS }, (_, worker): WebServer[] => {
    const { api, simulator } = e2eServerPorts(worker);
    return [
      {
        command: 'node --enable-source-maps dist/api/main.mjs',
        url: `http://localhost:${api}/api/health`,
        reuseExistingServer: false,
        timeout: 60_000,
        stdout: 'ignore',
        stderr: 'pipe',
        env: {
          PORT: String(api),
          NODE_ENV: 'test',
          LOG_LEVEL: 'warn',
          DATABASE_URL: e2eDatabaseUrl(worker),
          SMTP_PORT: process.env.SMTP_PORT ?? '2526',
          FAKE_MAIL_URL: process.env.FAKE_MAIL_URL ?? 'http://127.0.0.1:2581',
          PUBLIC_URL: `http://localhost:${api}`,
          // Each spec stands the clock at its own instant and seeds a district of its own (e2e/support.ts).
          NIGHTYARD_TEST_CONTROL: '1',
          SEED_DEMO: 'never',
        },
      },
      {
        command: 'node dist/api/station-simulator.mjs',
        url: `http://127.0.0.1:${simulator}/`,
        reuseExistingServer: false,
        timeout: 60_000,
        stdout: 'ignore',
        stderr: 'pipe',
        env: {
          NIGHTYARD_OCPP_URL: `ws://127.0.0.1:${api}/ocpp`,
          SIMULATOR_HEALTH_PORT: String(simulator),
          SIMULATOR_STATIONS: 'none',
          // A charger's next report (live-faults.spec.ts waits for one) comes within seconds.
          SIMULATOR_METER_SECONDS: '3',
        },
      },
    ];
  }).flat(),
});
