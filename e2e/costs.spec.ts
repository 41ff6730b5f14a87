import fs from 'node:fs';
import path from 'node:path';
import { type Page } from '@playwright/test';
import { AT, districtAt, expectAccessible, pageAtApiTime, signInAs, type District, expect, test } from './support';

// Costs: a finance user opens the billing period, sees the savings against the baselines and
// the diesel and CO2 avoided, exports the nights as CSV, tries a meter file for another period,
// imports one for this period, and opens a night's cost per bus. A district of this file's own on a
// Wednesday afternoon in December 2026 (the depot bills from the 1st).

/** Invented Green Button CSV for the evening of 2026-12-02 at the demo depot: in the period, before now. */
const FIXTURE = path.resolve('apps/api/src/costs/fixtures/green-button-evening.csv');
const FIXTURE_DAY = '2026-12-02';
/** The same readings 40 days earlier: in November's billing period. */
const EARLIER_DAY = '2026-10-23';

let district: District;
test.beforeAll(async () => {
  district = await districtAt(AT.weekdayAfternoon);
});
test.beforeEach(async ({ page }) => {
  await pageAtApiTime(page);
});

function cardValue(page: Page, label: string) {
  return page
    .getByRole('list', { name: 'The billing period at a glance' })
    .getByRole('listitem')
    .filter({ hasText: label })
    .locator('.card-value');
}

/** "$1,234.56" -> 1234.56 */
const amount = (text: string | null) => Number((text ?? '').replace(/[^0-9.-]/g, ''));

test('finance opens the month, sees the savings, exports the nights and reads a night per bus', async ({ page }) => {
  test.setTimeout(120_000);
  await signInAs(page, district.emails.finance);

  await test.step('the billing period at a glance', async () => {
    await expect(page).toHaveURL(/\/costs$/);
    await expect(page.getByRole('heading', { level: 1, name: 'Costs' })).toBeVisible();
    // The first look at a fresh district's month computes it (the nights and the demand target's LP):
    // seconds of CPU, longer while other journeys run beside this one.
    await expect(cardValue(page, 'Projected bill for the period')).toHaveText(/\$[\d,]+\.\d\d/, { timeout: 30_000 });
    const savings = cardValue(page, 'Savings against the baselines');
    await expect(savings).toHaveText(/\$[\d,]+\.\d\d/);
    expect(amount(await savings.textContent())).toBeGreaterThan(0);
    await expect(cardValue(page, 'Facility peak so far')).toHaveText(/\d kW$/);
    // Where the projection comes from, and the diesel and CO2 avoided with their source named.
    await expect(page.getByText(/The projected bill takes each 15-minute interval/)).toBeVisible();
    const emissions = page.getByRole('region', { name: 'Diesel and CO2 avoided' });
    await expect(emissions.getByText('Diesel avoided', { exact: true })).toBeVisible();
    const source = emissions.locator('p').filter({ hasText: /^Source:/ });
    await expect(source).toContainText(/Diesel avoided = miles \/ \d+ mpg/);
    await expect(source).toContainText('US EPA');
    await expect(
      page.getByRole('img', { name: /charging energy cost of each night, planned and under its baseline/ }),
    ).toBeVisible();
    await expect(
      page.getByRole('table', { name: /^Projected bill/ }).getByRole('row', { name: /^Total/ }),
    ).toBeVisible();
    await expectAccessible(page);
  });

  await test.step('the demand target over the nights left, with why and what a kW either side is worth', async () => {
    const target = page.getByRole('region', { name: /^Demand target/ });
    await expect(target.getByRole('heading', { level: 2 })).toHaveText(/^Demand target [\d,.]+ kW$/);
    await expect(target.locator('p').filter({ hasText: /^Why:/ })).toContainText(
      /kWh between pull-in|No night left needs more than is billed already/,
    );
    await expect(target.getByText(/^Each kW above the target saves \$[\d,.]+ of energy this period/)).toBeVisible();
    await expect(target.getByText(/^Over \d+ nights? left in the period/)).toBeVisible();
  });

  await test.step('the nights table exports as CSV', async () => {
    const nights = page.getByRole('region', { name: 'Nights of the billing period' });
    await expect(nights.getByRole('row')).not.toHaveCount(0);
    const downloading = page.waitForEvent('download');
    await page.getByRole('button', { name: 'Export CSV of the nights', exact: true }).click();
    const download = await downloading;
    expect(download.suggestedFilename()).toMatch(/^costs-nights-\d{4}-\d{2}\.csv$/);
    const lines = fs
      .readFileSync(await download.path(), 'utf8')
      .trimEnd()
      .split('\r\n');
    expect(lines[0]).toBe(
      'Night,Plan version,"Charging energy, planned (USD)",Baseline,"Charging energy, baseline (USD)",Energy saving (USD),' +
        'Projected site energy cost (USD),Metered site energy cost (USD),Metered minus projected (USD),Projected peak (kW),' +
        'Baseline peak (kW),Metered peak (kW),Metered share of the night (%),Part of the night in this period',
    );
    expect(lines.length).toBeGreaterThan(1);
    expect(lines[1]).toMatch(
      /^\d{4}-\d{2}-\d{2},\d+,-?\d+(\.\d+)?,(Charge on arrival|Timer),-?\d+(\.\d+)?,-?\d+(\.\d+)?,/,
    );
  });

  await test.step('a meter file for another billing period is refused and nothing changes', async () => {
    const projected = await cardValue(page, 'Projected bill for the period').textContent();
    const toDate = await cardValue(page, 'Month to date').textContent();
    const csv = fs.readFileSync(FIXTURE, 'utf8').replaceAll(FIXTURE_DAY, EARLIER_DAY);
    await page.getByLabel('Meter data file (Green Button XML or CSV)').setInputFiles({
      name: 'green-button-earlier.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from(csv),
    });
    await expect(
      page.getByText(/green-button-earlier\.csv was not imported\. \d+ readings lie outside the billing period/),
    ).toBeVisible();
    await expect(page.getByText(/Nothing was imported\.$/)).toBeVisible();
    await expect(page.getByText(/imported: \d+ intervals?/)).toHaveCount(0);
    await expect(cardValue(page, 'Projected bill for the period')).toHaveText(projected ?? '');
    await expect(cardValue(page, 'Month to date')).toHaveText(toDate ?? '');
    await expectAccessible(page);
  });

  await test.step('the fixture for this billing period is imported with its gaps and duplicates reported', async () => {
    await page.getByLabel('Meter data file (Green Button XML or CSV)').setInputFiles(FIXTURE);
    await expect(
      page.getByText(/green-button-evening\.csv imported: 8 intervals of 15 minutes \(Green Button CSV\)/),
    ).toBeVisible();
    await expect(page.getByText('No duplicate readings.')).toBeVisible();
    await expect(page.getByText('No gaps in the readings.')).toBeVisible();
    await expect(page.getByText(/Peaks so far in the billing period now: facility \d/)).toBeVisible();
    await expectAccessible(page);
  });

  await test.step("a night's cost per bus and per mile", async () => {
    await page.getByRole('region', { name: 'Nights of the billing period' }).getByRole('link').first().click();
    await expect(page).toHaveURL(/\/costs\/nights\/[0-9a-f-]{36}$/);
    await expect(page.getByRole('heading', { level: 1, name: /^Night of / })).toBeVisible();
    const buses = page.getByRole('table', { name: /^Cost per bus on the night of/ });
    await expect(buses.getByRole('row').nth(1)).toBeVisible();
    expect(await buses.locator('tbody tr').count()).toBeGreaterThan(0);
    await expect(page.getByRole('list', { name: 'The night at a glance' }).getByText('Cost per mile')).toBeVisible();
    const downloading = page.waitForEvent('download');
    await page.getByRole('button', { name: 'Export CSV of the cost per bus', exact: true }).click();
    const lines = fs
      .readFileSync(await (await downloading).path(), 'utf8')
      .trimEnd()
      .split('\r\n');
    expect(lines[0]).toBe('Bus,Charging (kWh),Cost (USD),Miles next service day,Cost per mile (USD)');
    expect(lines.length).toBeGreaterThan(1);
    await expectAccessible(page);
    await page.getByRole('navigation', { name: 'Breadcrumb' }).getByRole('link', { name: 'Costs' }).click();
    await expect(page.getByRole('heading', { level: 1, name: 'Costs' })).toBeVisible();
  });
});

test('a supervisor reads the costs without the meter data upload', async ({ page }) => {
  await signInAs(page, district.emails.supervisor);
  await page.getByRole('navigation', { name: 'Sections' }).getByRole('link', { name: 'Costs' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Costs' })).toBeVisible();
  // The month is computed on the first look (see above).
  await expect(cardValue(page, 'Savings against the baselines')).toHaveText(/\$[\d,]+\.\d\d/, { timeout: 30_000 });
  await expect(
    page.getByText("You can read the costs. Finance and administrators import the utility's meter data."),
  ).toBeVisible();
  await expect(page.getByLabel('Meter data file (Green Button XML or CSV)')).toHaveCount(0);
  await expect(page.getByRole('heading', { name: 'Import meter data' })).toHaveCount(0);
  await expectAccessible(page);

  // The billing period before: its own figures, chosen by the address.
  const title = page.locator('.period-title');
  const current = await title.textContent();
  await page.getByRole('button', { name: 'Previous billing period' }).click();
  await expect(page).toHaveURL(/\/costs\?date=\d{4}-\d{2}-\d{2}$/);
  await expect(title).not.toHaveText(current ?? '');
  await expect(cardValue(page, 'Projected bill for the period')).toHaveText(/\$[\d,]+\.\d\d/);
});
