import { defineConfig } from '@playwright/test';

// Browser tests run against the built app served by the real API on its own database.
// tools/test.sh prepares that database, the fake mail server and Debian's Chromium.
const port = Number(process.env.E2E_PORT ?? 3100);

export default defineConfig({
  testDir: 'e2e',
  fullyParallel: false,
  workers: 1,
  retries: 0,
  timeout: 45_000,
  expect: { timeout: 10_000 },
  reporter: [['list']],
  use: {
    baseURL: `http://localhost:${port}`,
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
  webServer: [
    {
      command: 'node --enable-source-maps dist/api/main.mjs',
      url: `http://localhost:${port}/api/health`,
      reuseExistingServer: false,
      timeout: 60_000,
      stdout: 'ignore',
      stderr: 'pipe',
      env: {
        PORT: String(port),
        NODE_ENV: 'test',
        LOG_LEVEL: 'warn',
        DATABASE_URL: process.env.E2E_DATABASE_URL ?? 'postgres://postgres@127.0.0.1:5434/nightyard_e2e',
        SMTP_PORT: process.env.SMTP_PORT ?? '2526',
        FAKE_MAIL_URL: process.env.FAKE_MAIL_URL ?? 'http://127.0.0.1:2581',
        PUBLIC_URL: `http://localhost:${port}`,
        // Each spec stands the clock at its own instant and seeds a district of its own (e2e/support.ts).
        NIGHTYARD_TEST_CONTROL: '1',
        SEED_DEMO: 'never',
      },
    },
    {
      // The demo depot's chargers, simulated, so the pages show live OCPP states.
      command: 'node dist/api/station-simulator.mjs',
      url: `http://127.0.0.1:${port + 1}/`,
      reuseExistingServer: false,
      timeout: 60_000,
      stdout: 'ignore',
      stderr: 'pipe',
      env: {
        NIGHTYARD_OCPP_URL: `ws://127.0.0.1:${port}/ocpp`,
        SIMULATOR_HEALTH_PORT: String(port + 1),
        SIMULATOR_STATIONS: 'none',
      },
    },
  ],
});
