import { randomUUID } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import AxeBuilder from '@axe-core/playwright';
import { expect, test as base, type Page } from '@playwright/test';
import { e2eServerPorts } from './ports';

export const DEMO_PASSWORD = 'nightyard-demo';
const FAKE_MAIL_URL = process.env.FAKE_MAIL_URL ?? 'http://127.0.0.1:2581';

/**
 * Each Playwright worker has an API (its own clock, database and job queue) and a charger simulator
 * of its own (playwright.config.ts): the journeys of one worker move only that API's clock and
 * swap only that simulator's chargers. Playwright numbers the workers running at once from 0.
 */
const ports = e2eServerPorts(Number(process.env.TEST_PARALLEL_INDEX ?? 0));
/** This worker's API (also what its pages are served from). */
export const API = `http://127.0.0.1:${ports.api}`;
const SIMULATOR = `http://127.0.0.1:${ports.simulator}`;

/** Playwright's `test` with the pages on this worker's API. Every journey imports it from here. */
export const test = base.extend({
  baseURL: async ({ baseURL }, use) => {
    const url = new URL(baseURL ?? 'http://localhost');
    url.port = String(ports.api);
    await use(url.origin);
  },
});
export { expect };

/**
 * The instants the browser journeys stand at (the depot is in America/Chicago). Tests never run at
 * whatever time the machine has: the API, the charger simulator and the page all follow these.
 */
export const AT = {
  /** Wednesday afternoon: the buses are out on their afternoon runs; tonight is Wednesday's. */
  weekdayAfternoon: '2026-12-09T15:00:00-06:00',
  /** Just after midnight on a Wednesday: Tuesday's night is under way. */
  wednesdayAfterMidnight: '2026-12-09T00:02:00-06:00',
  /** Friday night: the night runs to Monday's pull-outs. */
  fridayNight: '2026-12-11T22:00:00-06:00',
  /** Autumn clock change, the first 01:30 (still CDT): a 25-hour Sunday inside Friday's night. */
  autumnClockChange: '2026-11-01T01:30:00-05:00',
  /** Spring clock change, 03:30 CDT just after the missing hour. */
  springClockChange: '2027-03-14T03:30:00-05:00',
} as const;

/** A demo district of a test's own: its people's sign-ins, depot and charger identities. */
export interface District {
  tag: string;
  organisationId: string;
  /** The original demo depot. */
  depotId: string;
  /** Every depot seeded, the original first (three with `depots: 'district'`). */
  depots: { key: string; id: string; name: string }[];
  emails: Record<'admin' | 'facilities' | 'supervisor' | 'yard' | 'finance' | 'lead', string>;
  /** With `depots: 'district'`: the other depots' yard staff (yard2, yard3). */
  depotYardEmails?: Record<'yard2' | 'yard3', string>;
  chargerIdentities: Record<string, string>;
  publishedNights: string[];
  /** The API's time when the district was ready (ISO). */
  now: string;
}

async function post(url: string, body: unknown): Promise<Response> {
  const res = await fetch(url, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify(body),
  });
  if (!res.ok) throw new Error(`${url} answered ${res.status}: ${await res.text()}`);
  return res;
}

/**
 * Stands the API's clock at `at` and seeds a fresh demo district there (the night in progress and
 * the next one published): the original depot alone, or with `depots: 'district'` all three. With
 * `stations`, the charger simulator swaps to this district's chargers (the original depot's); they
 * set their clocks from the API's answers, as OCPP stations do.
 */
export async function districtAt(
  at: string,
  options: { stations?: boolean; depots?: 'main' | 'district' } = {},
): Promise<District> {
  await post(`${API}/api/testing/clock`, { at });
  const tag = `e2e-${randomUUID().slice(0, 8)}`;
  const district = (await (
    await post(`${API}/api/testing/demo`, { tag, depots: options.depots ?? 'main' })
  ).json()) as Omit<District, 'tag'>;
  const { yard2, yard3 } = district.emails as Record<string, string | undefined>;
  if (yard2 && yard3) district.depotYardEmails = { yard2, yard3 };
  if (options.stations) {
    const res = await fetch(`${SIMULATOR}/stations?tag=${tag}`, { method: 'PUT' });
    if (!res.ok) throw new Error(`The charger simulator answered ${res.status}`);
  }
  return { ...district, tag };
}

/** The API's time now (its clock runs on from the instant a test stood it at). */
export async function apiNow(): Promise<Date> {
  const res = await fetch(`${API}/api/health`);
  return new Date(Number(res.headers.get('x-server-time')));
}

/** Puts the page's clock (Playwright's) at the API's time, so page and server agree. */
export async function pageAtApiTime(page: Page): Promise<Date> {
  const now = await apiNow();
  await page.clock.install({ time: now });
  return now;
}

export async function signIn(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

/** Signs in and waits until the app has moved on to the user's home. */
export async function signInAs(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await signIn(page, email, password);
  await expect(page).not.toHaveURL(/\/sign-in/);
}

/**
 * Signs in as the sign-in page does (POST /api/auth/login) but without it: the page's browser gets
 * the refresh cookie, so the next page it opens restores the session as after a reload. For journeys
 * that are not about signing in (sign-in.spec.ts and session.spec.ts walk the sign-in page); it
 * spares loading the app twice, once for the sign-in page and once for the page wanted.
 */
export async function signInByApi(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  const res = await page.request.post('/api/auth/login', { data: { email, password } });
  if (!res.ok()) throw new Error(`Signing in as ${email} answered ${res.status()}: ${await res.text()}`);
}

/**
 * The axe-core that @axe-core/playwright runs (minified), put into a document only when it is not
 * there yet: the app is one page, so a journey's scans after the first reuse it. Sending and
 * compiling the 1.4 MB unminified source twice per scan (page, then a blank page) cost seconds.
 */
const AXE_SOURCE = (() => {
  const axePath = createRequire(createRequire(import.meta.url).resolve('@axe-core/playwright')).resolve(
    'axe-core/axe.min.js',
  );
  return `if (typeof window.axe === 'undefined') {${readFileSync(axePath, 'utf8')}}`;
})();

/**
 * Fails on any serious or critical accessibility violation on the page as it is now. Every rule of
 * the tags runs on the whole page; axe runs in the page itself (the app has no frames, so its
 * legacy mode, axe.run, sees everything the partial runs plus a blank page to join them would),
 * and only violations are turned into full reports: passes keep one node each (`resultTypes`),
 * which spares the CSS selectors of thousands of passing nodes on a table of runs.
 */
export async function expectAccessible(page: Page): Promise<void> {
  // Not while something fades in or out: a snack bar half-faded failed colour contrast on a busy
  // machine (its text at part opacity). Endless animations (progress bars) are not waited for.
  await page.waitForFunction(() =>
    document
      .getAnimations()
      .every((a) => a.playState !== 'running' || a.effect?.getComputedTiming().iterations === Infinity),
  );
  const results = await new AxeBuilder({ page, axeSource: AXE_SOURCE })
    .options({ resultTypes: ['violations'] })
    .withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'])
    .setLegacyMode()
    .analyze();
  const serious = results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  expect(serious.map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(' ')).join(', ')})`)).toEqual([]);
}

/** The newest message the fake SMTP server caught for an address (waits for it). */
export async function latestMailTo(address: string): Promise<{ subject: string; text: string }> {
  let found: { subject: string; text: string } | undefined;
  await expect
    .poll(
      async () => {
        const res = await fetch(`${FAKE_MAIL_URL}/messages?to=${encodeURIComponent(address)}`);
        found = ((await res.json()) as { messages: { subject: string; text: string }[] }).messages[0];
        return found !== undefined;
      },
      { timeout: 10_000 },
    )
    .toBe(true);
  return found!;
}

async function simulator(method: 'POST' | 'DELETE', path: string): Promise<void> {
  const res = await fetch(`${SIMULATOR}${path}`, { method });
  if (!res.ok) throw new Error(`The charger simulator answered ${res.status} to ${method} ${path}`);
}

/** The simulated charger (of the district the simulator has) reports a fault; it stays until cleared. */
export async function faultCharger(label: string): Promise<void> {
  await simulator('POST', `/fault/${encodeURIComponent(label)}`);
}

/** How many meter reports the simulated charger has sent so far. */
export async function chargerReports(label: string): Promise<number> {
  const res = await fetch(`${SIMULATOR}/reports/${encodeURIComponent(label)}`);
  if (!res.ok) throw new Error(`The charger simulator answered ${res.status} to GET /reports/${label}`);
  return ((await res.json()) as { reports: number }).reports;
}

/** The simulated charger's fault is fixed: it reports its state as its profile says again. */
export async function clearCharger(label: string): Promise<void> {
  await simulator('POST', `/clear/${encodeURIComponent(label)}`);
}
