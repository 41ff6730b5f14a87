import { expect, test } from '@playwright/test';
import { demo, expectAccessible, signInAs } from './support';

// The browser tests run the station simulator for the demo depot's ten chargers (see
// playwright.config.ts): they connect over OCPP-J and report their state.
test('the Depot shows the live state each charger reports over OCPP', async ({ page }) => {
  await signInAs(page, demo('facilities'));
  await page.goto('/depot');
  await expect(page.getByRole('heading', { level: 1, name: 'Depot' })).toBeVisible();
  // Every simulated charger reports; reload until all ten have been seen.
  await expect(async () => {
    await page.reload();
    await expect(page.getByText(/Reports (available|charging|faulted)/)).toHaveCount(10, { timeout: 2000 });
  }).toPass({ timeout: 30_000 });
  await expectAccessible(page);
});

test('the published plan downloads as OCPP charging profiles', async ({ page }) => {
  await signInAs(page, demo('supervisor'));
  // The demo's published night: the latest school day up to today at the depot.
  const day = new Date(new Date().toLocaleString('en-US', { timeZone: 'America/Chicago' }));
  while (day.getDay() === 0 || day.getDay() === 6) day.setDate(day.getDate() - 1);
  const iso = `${day.getFullYear()}-${String(day.getMonth() + 1).padStart(2, '0')}-${String(day.getDate()).padStart(2, '0')}`;
  await page.goto(`/plans?date=${iso}`);
  await expect(page.getByText(/Published/).first()).toBeVisible();
  const download = page.waitForEvent('download');
  await page.getByRole('button', { name: /OCPP 1\.6/ }).first().click();
  const file = await download;
  const body = JSON.parse(await (await file.createReadStream()).toArray().then((c) => Buffer.concat(c).toString('utf8')));
  expect(body).toHaveLength(10);
  expect(body[0].payload.csChargingProfiles.chargingSchedule.chargingRateUnit).toBe('W');
});
