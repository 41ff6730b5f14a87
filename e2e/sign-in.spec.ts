import { randomUUID } from 'node:crypto';
import {
  AT,
  districtAt,
  expectAccessible,
  latestMailTo,
  pageAtApiTime,
  signIn,
  signInAs,
  type District,
  expect,
  test,
} from './support';

// A weekday afternoon at a demo district of this file's own.
let district: District;
test.beforeAll(async () => {
  district = await districtAt(AT.weekdayAfternoon);
});
test.beforeEach(async ({ page }) => {
  await pageAtApiTime(page);
});

// Where each demo account starts its day (libs/contracts sections.ts: homeSection).
const HOMES: [keyof District['emails'], string, string][] = [
  ['admin', '/tonight', 'Tonight'],
  ['facilities', '/depot', 'Depot'],
  ['supervisor', '/plans', 'Plans'],
  ['yard', '/yard', 'Yard'],
  ['finance', '/costs', 'Costs'],
  ['lead', '/plans', 'Plans'],
];

test('the sign-in page is accessible', async ({ page }) => {
  await page.goto('/sign-in');
  await expect(page.getByRole('heading', { name: 'Sign in to Nightyard' })).toBeVisible();
  await expectAccessible(page);
});

for (const [role, path, heading] of HOMES) {
  test(`${role} signs in and lands on ${heading}`, async ({ page }) => {
    await signIn(page, district.emails[role]);
    await expect(page).toHaveURL(new RegExp(`${path}$`));
    await expect(page.getByRole('heading', { level: 1, name: heading })).toBeVisible();
    await expect(page.getByText('Orchard Lane Depot').first()).toBeVisible();
    await expectAccessible(page);
  });
}

test('a wrong password shows an error and stays on sign-in', async ({ page }) => {
  await signIn(page, district.emails.finance, 'not-the-password');
  await expect(page.getByText('E-mail or password is not right')).toBeVisible();
  await expect(page).toHaveURL(/\/sign-in/);
});

test('inline validation explains what to fix before sending', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('not-an-address');
  await page.getByLabel('Password', { exact: true }).focus();
  await expect(page.getByText(/Enter an e-mail address/)).toBeVisible();
});

test('a yard user does not see People and cannot open it', async ({ page }) => {
  await signIn(page, district.emails.yard);
  await expect(page).toHaveURL(/\/yard$/);
  const nav = page.getByRole('navigation', { name: 'Sections' });
  await expect(nav.getByRole('link', { name: 'Yard' })).toBeVisible();
  await expect(nav.getByRole('link', { name: 'People' })).toHaveCount(0);
  await page.goto('/people');
  await expect(page.getByRole('heading', { level: 1, name: 'People' })).toHaveCount(0);
  await expect(page.getByRole('button', { name: 'Invite someone' })).toHaveCount(0);
});

test('an invitation e-mail arrives and its link sets a password that then signs in', async ({ page }) => {
  const email = `new.yard.${randomUUID().slice(0, 8)}@${district.tag}.demo.nightyard.example`;
  await signIn(page, district.emails.admin);
  await page.getByRole('navigation', { name: 'Sections' }).getByRole('link', { name: 'People' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'People' })).toBeVisible();
  await expectAccessible(page);
  await page.getByRole('button', { name: 'Invite someone' }).click();
  await page.getByLabel('Name').fill('Kofi Brandt');
  await page.getByLabel('E-mail').fill(email);
  await page.getByRole('checkbox', { name: 'Yard staff' }).check();
  await page.getByRole('button', { name: 'Send invitation' }).click();
  await expect(page.getByRole('cell', { name: email })).toBeVisible();

  const mail = await latestMailTo(email);
  expect(mail.subject).toContain('invited to Nightyard');
  const link = /http\S+set-password\?token=[\w-]+/.exec(mail.text)![0];

  await page.getByRole('button', { name: 'Account menu' }).click();
  await page.getByRole('menuitem', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/sign-in/);

  await page.goto(link);
  await expect(page.getByText(email)).toBeVisible();
  await expectAccessible(page);
  await page.getByLabel('New password', { exact: true }).fill('yard-shift-password');
  await page.getByLabel('Repeat new password').fill('yard-shift-password');
  await page.getByRole('button', { name: 'Set password' }).click();
  await expect(page).toHaveURL(/\/sign-in/);

  await signIn(page, email, 'yard-shift-password');
  await expect(page).toHaveURL(/\/yard$/);
});

test('the outbox shows what the fake mail server caught', async ({ page }) => {
  await signInAs(page, district.emails.admin);
  await page.goto('/people/outbox');
  await expect(page.getByRole('heading', { level: 1, name: 'Outbox' })).toBeVisible();
  await expectAccessible(page);
});
