import path from 'node:path';
import { type Page } from '@playwright/test';
import { AT, districtAt, expectAccessible, pageAtApiTime, signInAs, expect, test } from './support';

// Depot and Rates: a facilities manager sets the depot up, a finance user reads it, in a district of
// the test's own on a weekday afternoon.
const URDB_FILE = path.resolve('apps/api/src/rates/fixtures/urdb-summer-winter-evening-peak.json');

async function openSection(page: Page, name: string): Promise<void> {
  await page.getByRole('navigation', { name: 'Sections' }).getByRole('link', { name }).click();
  await expect(page.getByRole('heading', { level: 1, name })).toBeVisible();
}

/** The hourly table's row for a clock hour such as "16:00–17:00". */
function hourRow(page: Page, hour: string) {
  const table = page.getByRole('table', { name: /Price of each hour/ });
  return table.getByRole('row').filter({ has: page.getByRole('rowheader', { name: hour, exact: true }) });
}

async function previewSummerWeekday(page: Page): Promise<void> {
  await page.getByLabel('Day to preview').fill('2027-07-14');
  await expect(
    page.getByRole('table', { name: /(July 14, 2027|14 July 2027): a weekday in the season "Jun-Sep"/ }),
  ).toBeVisible();
  await expect(hourRow(page, '15:00–16:00')).toContainText('off-peak');
  await expect(hourRow(page, '15:00–16:00')).toContainText('0.0912');
  for (const hour of ['16:00–17:00', '20:00–21:00']) {
    await expect(hourRow(page, hour)).toContainText('on-peak');
    await expect(hourRow(page, hour)).toContainText('0.2854');
  }
  await expect(hourRow(page, '21:00–22:00')).toContainText('0.0912');
  // The facility demand charge applies at every hour, on-peak as off-peak (this rate has no period demand charge).
  for (const hour of ['03:00–04:00', '16:00–17:00']) await expect(hourRow(page, hour)).toContainText('$14.25 facility');
  await expect(page.getByRole('table', { name: /Price of each hour/ }).getByRole('row')).toHaveCount(25); // header + 24 hours
  await expect(page.getByRole('img', { name: /price per kWh for each hour/ })).toBeVisible();
}

test('facilities adds a charger to a cabinet and imports a URDB rate; finance reads both', async ({ page }) => {
  test.setTimeout(120_000);
  const district = await districtAt(AT.weekdayAfternoon);
  await pageAtApiTime(page);
  const charger = 'D3';
  const planName = 'Prairie Wind evening peak';

  await test.step('facilities adds a charger to Cabinet A', async () => {
    await signInAs(page, district.emails.facilities);
    await openSection(page, 'Depot');
    await expect(page.getByText('Orchard Lane Depot').first()).toBeVisible();
    await expect(page.getByRole('cell', { name: 'D1', exact: true })).toBeVisible();
    await expectAccessible(page);

    await page.getByRole('button', { name: 'Add charger' }).click();
    const dialog = page.getByRole('dialog', { name: 'Add a charger' });
    // The dialog puts focus in its first field once it has opened; type after that.
    await expect(dialog.getByLabel('Label')).toBeFocused();
    await dialog.getByLabel('Label').fill(charger);
    await dialog.getByLabel('Maximum power').fill('120');
    await dialog.getByRole('combobox', { name: 'Connector standard' }).click();
    await page.getByRole('option', { name: 'SAE J1772 CCS1' }).click();
    await dialog.getByRole('combobox', { name: 'Power cabinet' }).click();
    await page.getByRole('option', { name: /^Cabinet A/ }).click();
    await expect(dialog.getByText(/Shares 150 kW with D1, D2/)).toBeVisible();
    await expectAccessible(page);
    await dialog.getByRole('button', { name: 'Save charger' }).click();
    await expect(dialog).toHaveCount(0);

    const row = page.getByRole('row').filter({ has: page.getByRole('cell', { name: charger, exact: true }) });
    await expect(row).toContainText('120 kW');
    await expect(row).toContainText('SAE J1772 CCS1');
    await expect(row).toContainText('Cabinet A');
    await expect(page.getByRole('region', { name: 'Power cabinets', exact: true })).toContainText(charger);
  });

  await test.step('facilities imports a URDB file, reviews it, saves it and previews a summer weekday', async () => {
    await openSection(page, 'Rates');
    await expectAccessible(page);
    await page.getByLabel('Import URDB file').setInputFiles(URDB_FILE);

    await expect(page.getByRole('heading', { level: 1, name: 'Check the imported rate plan' })).toBeVisible();
    await expect(page.getByText('URDB has no holiday schedule: holidays use the weekend hours')).toBeVisible();
    const name = page.getByLabel('Rate plan name');
    await expect(name).toHaveValue(/Prairie Wind Electric Cooperative/);
    const summerPeak = page.getByRole('group', { name: 'Season 1, period 1, window 1' });
    await expect(summerPeak.getByLabel('From')).toHaveValue('16:00');
    await expect(summerPeak.getByLabel('To')).toHaveValue('21:00');
    await expectAccessible(page);

    // Tiered energy, a demand ratchet and a minimum bill, entered through labelled controls.
    await page.getByRole('button', { name: 'Add energy block to season 1' }).click();
    await page.getByRole('group', { name: 'Season 1, energy block 1' }).getByLabel('Block 1 ends at').fill('20000');
    await page
      .getByRole('group', { name: 'Season 1, energy block 2' })
      .getByLabel('Block 2 price change')
      .fill('-0.01');
    await page.getByLabel('Ratchet percentage').fill('80');
    await page.getByRole('group', { name: 'Minimum bill' }).getByLabel('Minimum bill', { exact: true }).fill('250');
    await expectAccessible(page);

    await name.fill(planName);
    await page.getByRole('button', { name: 'Save rate plan' }).click();
    await expect(page.getByRole('heading', { level: 1, name: planName })).toBeVisible();
    await previewSummerWeekday(page);
    await expectAccessible(page);
  });

  await test.step('finance sees the depot and the rates, with no edit controls', async () => {
    await page.getByRole('button', { name: 'Account menu' }).click();
    await page.getByRole('menuitem', { name: 'Sign out' }).click();
    await expect(page).toHaveURL(/\/sign-in/);
    await signInAs(page, district.emails.finance);

    await openSection(page, 'Depot');
    await expect(page.getByRole('cell', { name: charger, exact: true })).toBeVisible();
    await expect(page.getByText("You can read the depot's set-up.")).toBeVisible();
    await expect(page.getByRole('button', { name: 'Add charger' })).toHaveCount(0);
    await expect(page.getByRole('button', { name: /^Edit charger/ })).toHaveCount(0);
    await expect(page.getByRole('button', { name: 'Edit site' })).toHaveCount(0);
    await expect(page.getByRole('button', { name: 'Add power cabinet' })).toHaveCount(0);
    await expectAccessible(page);

    await openSection(page, 'Rates');
    await expect(page.getByLabel('Import URDB file')).toHaveCount(0);
    await expect(page.getByRole('link', { name: 'New rate plan' })).toHaveCount(0);
    await expect(page.getByRole('button', { name: 'Assign to depot' })).toHaveCount(0);
    await expectAccessible(page);
    await page.getByRole('link', { name: planName, exact: true }).click();
    await expect(page.getByRole('heading', { level: 1, name: planName })).toBeVisible();
    await expect(page.getByRole('link', { name: 'Edit rate plan' })).toHaveCount(0);
    await expect(page.getByRole('button', { name: 'Remove' })).toHaveCount(0);
    await expect(page.getByText(/billed at least 80 % of the highest of the previous 11 months/)).toBeVisible();
    await expect(page.getByText('above 20,000 kWh −$0.01 per kWh', { exact: false })).toBeVisible();
    await previewSummerWeekday(page);
    await expectAccessible(page);
  });
});
