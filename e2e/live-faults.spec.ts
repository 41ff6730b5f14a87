import { type Browser, type Page } from '@playwright/test';
import {
  AT,
  chargerReports,
  clearCharger,
  districtAt,
  expectAccessible,
  faultCharger,
  pageAtApiTime,
  signInByApi,
  type District,
  expect,
  test,
} from './support';

// Live state is pushed: a charger fault reported by the simulator over OCPP reaches Tonight, Yard
// and Depot while they are open (no reload, no waiting for a poll), stays while the charger says
// so, and goes when it is cleared. Just after midnight on a Wednesday: Tuesday's night is under way.
let district: District;
test.beforeAll(async () => {
  district = await districtAt(AT.wednesdayAfterMidnight, { stations: true });
});

/** A page of its own (own session) at the API's time. */
async function openAs(browser: Browser, email: string, path: string): Promise<Page> {
  const context = await browser.newContext();
  const page = await context.newPage();
  await pageAtApiTime(page);
  await signInByApi(page, email);
  await page.goto(path);
  return page;
}

const fault = (page: Page, label: string) => page.locator(`[data-fault="${label}"]`);

test('a fault shows on Tonight, Yard and Depot within 5 s, stays while the charger says so, and goes when cleared', async ({
  browser,
}) => {
  test.setTimeout(120_000);
  const label = 'C3';
  const tonight = await openAs(browser, district.emails.supervisor, '/tonight');
  await expect(tonight.getByRole('heading', { level: 2, name: "Tonight's plan" })).toBeVisible();
  const depot = await openAs(browser, district.emails.supervisor, '/depot');
  await expect(depot.getByRole('heading', { level: 2, name: 'Chargers' })).toBeVisible();
  const yard = await openAs(browser, district.emails.yard, '/yard');
  await yard.getByRole('button', { name: 'I have read the cautions: start my shift' }).click();
  await expect(yard.locator(`ny-charger-card[data-charger="${label}"]`)).toBeVisible();
  // Every page has its live stream open (the chargers' states have come over it).
  for (const page of [tonight, depot, yard]) await expect(fault(page, label)).toHaveCount(0);

  await faultCharger(label);
  await expect(fault(tonight, label)).toBeVisible({ timeout: 5000 });
  await expect(fault(depot, label)).toBeVisible({ timeout: 5000 });
  await expect(fault(yard, label)).toBeVisible({ timeout: 5000 });
  // The way to the re-plan: a button in Yard, a link to it elsewhere (for a supervisor).
  await expect(
    fault(yard, label).getByRole('button', { name: `Report charger ${label} out of service` }),
  ).toBeVisible();
  await expect(fault(tonight, label).getByRole('link', { name: `Re-plan without charger ${label}` })).toHaveAttribute(
    'href',
    `/yard?fault=${label}`,
  );
  await expect(fault(depot, label).getByRole('link', { name: `Re-plan without charger ${label}` })).toBeVisible();
  await expect(tonight.locator(`.charger-list li[data-charger="${label}"]`)).toContainText('Faulted');
  await expect(yard.locator(`ny-charger-card[data-charger="${label}"] .live`)).toContainText('Faulted');
  await expectAccessible(tonight);

  // The simulator keeps reporting (meter values every 3 s here, playwright.config.ts): after its next
  // report the fault still stands.
  const reported = await chargerReports(label);
  await expect.poll(() => chargerReports(label), { timeout: 15_000, intervals: [250] }).toBeGreaterThan(reported);
  for (const page of [tonight, depot, yard]) await expect(fault(page, label)).toBeVisible();

  await clearCharger(label);
  for (const page of [tonight, depot, yard]) await expect(fault(page, label)).toHaveCount(0, { timeout: 5000 });
  await expect(tonight.locator(`.charger-list li[data-charger="${label}"]`)).not.toContainText('Faulted');
  for (const page of [tonight, depot, yard]) await page.context().close();
});

test("the re-plan offered from Tonight's fault notice publishes a revision that Tonight shows without a reload", async ({
  browser,
}) => {
  test.setTimeout(90_000);
  const label = 'C4';
  const tonight = await openAs(browser, district.emails.supervisor, '/tonight');
  const version = tonight.locator('[data-fact="version"]');
  await expect(version).toBeVisible();
  const before = Number(await version.textContent());
  const yard = await openAs(browser, district.emails.supervisor, '/tonight');
  await expect(yard.getByRole('heading', { level: 2, name: "Tonight's plan" })).toBeVisible();

  await faultCharger(label);
  await fault(yard, label)
    .getByRole('link', { name: `Re-plan without charger ${label}` })
    .click();
  await expect(yard).toHaveURL(new RegExp(`/yard\\?fault=${label}$`));
  await expect(fault(yard, label)).toContainText("Acknowledge the shift's cautions below");
  await yard.getByRole('button', { name: 'I have read the cautions: start my shift' }).click();
  // The report form opens by itself, for that charger.
  const dialog = yard.getByRole('dialog', { name: 'Report a problem' });
  await expect(dialog).toBeVisible();
  await expect(dialog.getByRole('radio', { name: 'Charger out of service' })).toBeChecked();
  await expect(dialog.getByRole('combobox', { name: 'Charger' })).toContainText(label);
  await dialog.getByRole('button', { name: 'Send report' }).click();
  await expect(dialog.getByText(/^Version \d+ is published$/)).toBeVisible({ timeout: 15_000 });

  // The other page heard of the revision over its stream: the new version, no fault left to act on.
  await expect(version).toHaveText(String(before + 1), { timeout: 5000 });
  await expect(fault(tonight, label)).toHaveCount(0, { timeout: 5000 });
  await clearCharger(label);
  for (const page of [tonight, yard]) await page.context().close();
});
