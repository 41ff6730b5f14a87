import { type Page } from '@playwright/test';
import {
  AT,
  DEMO_PASSWORD,
  districtAt,
  expectAccessible,
  pageAtApiTime,
  signInAs,
  signInByApi,
  type District,
  expect,
  test,
} from './support';

// Several depots per organisation: the depot switcher in the top bar (remembered per person), every
// section on the chosen depot, and the District overview for administrators and finance. Each test
// seeds a district of its own with all three demo depots (`depots: 'district'`): the original one
// (chargers C1..., service limit 450 kW) and Kestrel Hollow (chargers K1-K6, F1, F2; 280 kW).

function depotNamed(district: District, key: string): { id: string; name: string } {
  const d = district.depots.find((x) => x.key === key);
  if (!d) throw new Error(`The seed has no ${key} depot: ${district.depots.map((x) => x.key).join(', ')}`);
  return d;
}

const switcher = (page: Page) => page.getByRole('button', { name: /^Depot: .*\. Switch depot$/ });

async function openSection(page: Page, name: string): Promise<void> {
  await page.getByRole('navigation', { name: 'Sections' }).getByRole('link', { name, exact: true }).click();
  await expect(page.getByRole('heading', { level: 1, name })).toBeVisible();
}

async function switchTo(page: Page, name: string): Promise<void> {
  await switcher(page).click();
  await page.getByRole('menuitemradio', { name }).click();
  await expect(switcher(page)).toHaveAccessibleName(`Depot: ${name}. Switch depot`);
}

test('a supervisor switches depot: Tonight and Plans show that depot, and the choice stays after a reload', async ({
  page,
}) => {
  test.setTimeout(120_000);
  const district = await districtAt(AT.weekdayAfternoon, { depots: 'district' });
  const main = depotNamed(district, 'main');
  const kestrel = depotNamed(district, 'kestrel');
  await pageAtApiTime(page);
  await signInAs(page, district.emails.supervisor);

  // The demo's office people start on the original depot (the README's), not the list's first.
  await expect(switcher(page)).toHaveAccessibleName(`Depot: ${main.name}. Switch depot`);
  await openSection(page, 'Tonight');
  const chargers = page.getByRole('list', { name: 'Each charger' });
  await expect(chargers.locator('[data-charger="C1"]')).toBeVisible();

  // Over to Kestrel Hollow: its chargers and figures, none of the original depot's.
  await switchTo(page, kestrel.name);
  await expect(chargers.locator('[data-charger="K1"]')).toBeVisible();
  await expect(chargers.locator('[data-charger="F2"]')).toBeVisible();
  await expect(chargers.locator('[data-charger="C1"]')).toHaveCount(0);
  await expect(page.getByRole('main')).toContainText(kestrel.name);
  await expectAccessible(page);

  await openSection(page, 'Plans');
  const figures = page.getByRole('list', { name: 'Plan figures' });
  await expect(figures).toContainText('Service limit 280 kW');

  // Remembered by the API: a reload (a new page) opens on the depot chosen again.
  await page.reload();
  await expect(page.getByRole('heading', { level: 1, name: 'Plans' })).toBeVisible();
  await expect(switcher(page)).toHaveAccessibleName(`Depot: ${kestrel.name}. Switch depot`);
  await expect(figures).toContainText('Service limit 280 kW');

  // And back to the original depot.
  await switchTo(page, main.name);
  await expect(figures).toContainText('Service limit 450 kW');
  await openSection(page, 'Tonight');
  await expect(chargers.locator('[data-charger="C1"]')).toBeVisible();
  await expect(chargers.locator('[data-charger="K1"]')).toHaveCount(0);
  await expect(page.getByRole('main')).toContainText(main.name);
});

test('a switch asks before it throws away unsaved runs, and stays when told to', async ({ page }) => {
  test.setTimeout(90_000);
  const district = await districtAt(AT.weekdayAfternoon, { depots: 'district' });
  const main = depotNamed(district, 'main');
  const kestrel = depotNamed(district, 'kestrel');
  await pageAtApiTime(page);
  await signInByApi(page, district.emails.supervisor);
  // On Kestrel Hollow (the demo starts the supervisor on the original depot): chosen as the switcher does.
  const { accessToken } = (await (
    await page.request.post('/api/auth/login', { data: { email: district.emails.supervisor, password: DEMO_PASSWORD } })
  ).json()) as { accessToken: string };
  const chosen = await page.request.put('/api/me/depot', {
    data: { depotId: kestrel.id },
    headers: { authorization: `Bearer ${accessToken}` },
  });
  expect(chosen.ok()).toBe(true);
  await page.goto('/fleet/service-day');
  await expect(page.getByRole('heading', { level: 1, name: 'Fleet' })).toBeVisible();
  await expect(switcher(page)).toHaveAccessibleName(`Depot: ${kestrel.name}. Switch depot`);
  // Kestrel Hollow's day: its twelve buses' runs, loaded before the edit.
  await expect(page.getByRole('table', { name: 'Runs of the day' }).locator('tbody tr')).toHaveCount(24);
  await page.getByLabel('Forecast low').fill('-4');

  await switcher(page).click();
  await page.getByRole('menuitemradio', { name: main.name }).click();
  const ask = page.getByRole('dialog', { name: 'Discard the changes?' });
  await expect(ask).toContainText(`Switching to ${main.name} throws them away.`);
  await ask.getByRole('button', { name: 'Cancel' }).click();
  await expect(switcher(page)).toHaveAccessibleName(`Depot: ${kestrel.name}. Switch depot`);
  await expect(page.getByLabel('Forecast low')).toHaveValue('-4');

  await switcher(page).click();
  await page.getByRole('menuitemradio', { name: main.name }).click();
  await ask.getByRole('button', { name: 'Discard changes' }).click();
  await expect(switcher(page)).toHaveAccessibleName(`Depot: ${main.name}. Switch depot`);
  await expect(page.getByLabel('Forecast low')).not.toHaveValue('-4');
});

test('an administrator opens the District overview at laptop and phone width, and a depot from it', async ({
  page,
}) => {
  test.setTimeout(120_000);
  const district = await districtAt(AT.weekdayAfternoon, { depots: 'district' });
  const kestrel = depotNamed(district, 'kestrel');
  await pageAtApiTime(page);
  await page.setViewportSize({ width: 1366, height: 900 });
  await signInAs(page, district.emails.admin);

  await openSection(page, 'District');
  const table = page.getByRole('region', { name: 'Depots of the district' });
  const rows = table.locator('tbody tr');
  // Each depot's month is computed on this first look: seconds of CPU, longer beside another journey.
  await expect(rows).toHaveCount(3, { timeout: 30_000 });
  for (const d of district.depots) await expect(table).toContainText(d.name);
  await expect(table.locator('tfoot')).toContainText('All 3 depots');
  await expect(table.locator('tfoot')).toContainText('$');
  await expectAccessible(page);

  await page.setViewportSize({ width: 390, height: 844 });
  const cards = page.getByRole('list', { name: 'Depots' });
  await expect(cards.getByRole('listitem')).toHaveCount(4);
  await expect(cards.getByRole('heading', { level: 2, name: kestrel.name })).toBeVisible();
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
  expect(overflow).toBeLessThanOrEqual(0);
  await expect(switcher(page)).toBeVisible();
  await expectAccessible(page);

  // From the overview to that depot's Tonight: the link switches depot.
  await page.getByRole('link', { name: `Tonight at ${kestrel.name}` }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Tonight' })).toBeVisible();
  await expect(page).toHaveURL(/\/tonight$/);
  await expect(switcher(page)).toHaveAccessibleName(`Depot: ${kestrel.name}. Switch depot`);
  await expect(page.getByRole('list', { name: 'Each charger' }).locator('[data-charger="K1"]')).toBeVisible();
});

test('yard staff see their one depot without a switcher, and no District', async ({ page }) => {
  const district = await districtAt(AT.weekdayAfternoon, { depots: 'district' });
  const kestrel = depotNamed(district, 'kestrel');
  expect(district.depotYardEmails?.yard2).toBeTruthy();
  await pageAtApiTime(page);
  await signInAs(page, district.depotYardEmails!.yard2);

  const banner = page.getByRole('banner');
  await expect(banner).toContainText(kestrel.name);
  await expect(switcher(page)).toHaveCount(0);
  await expect(page.getByRole('navigation', { name: 'Sections' }).getByRole('link', { name: 'District' })).toHaveCount(
    0,
  );
  await page.goto('/district');
  await expect(page.getByRole('heading', { level: 1, name: 'Not available for your role' })).toBeVisible();
  await expect(banner).toContainText(kestrel.name);
});
