import AxeBuilder from '@axe-core/playwright';
import { expect, type Page } from '@playwright/test';

export const DEMO_PASSWORD = 'nightyard-demo';
export const demo = (role: string) => `${role}@demo.nightyard.example`;
const FAKE_MAIL_URL = process.env.FAKE_MAIL_URL ?? 'http://127.0.0.1:2581';

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

/** Fails on any serious or critical accessibility violation on the page as it is now. */
export async function expectAccessible(page: Page): Promise<void> {
  const results = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).analyze();
  const serious = results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  expect(serious.map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(' ')).join(', ')})`)).toEqual([]);
}

/** The newest message the fake SMTP server caught for an address (waits for it). */
export async function latestMailTo(address: string): Promise<{ subject: string; text: string }> {
  let found: { subject: string; text: string } | undefined;
  await expect
    .poll(async () => {
      const res = await fetch(`${FAKE_MAIL_URL}/messages?to=${encodeURIComponent(address)}`);
      found = ((await res.json()) as { messages: { subject: string; text: string }[] }).messages[0];
      return found !== undefined;
    }, { timeout: 10_000 })
    .toBe(true);
  return found!;
}
