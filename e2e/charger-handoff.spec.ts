import { AT, districtAt, expectAccessible, pageAtApiTime, signInByApi, type District, expect, test } from './support';

// The charger simulator (see playwright.config.ts) takes this file's district's ten chargers: they
// connect over OCPP-J, set their clocks from the API's answers and report their state. Just after midnight on a Wednesday.
let district: District;
test.beforeAll(async () => {
  district = await districtAt(AT.wednesdayAfterMidnight, { stations: true });
});
test.beforeEach(async ({ page }) => {
  await pageAtApiTime(page);
});

test('the Depot shows the live state each charger reports over OCPP', async ({ page }) => {
  await signInByApi(page, district.emails.facilities);
  await page.goto('/depot');
  await expect(page.getByRole('heading', { level: 1, name: 'Depot' })).toBeVisible();
  // Every simulated charger reports; reload until all ten have been seen.
  await expect(async () => {
    await page.reload();
    // A station inside a session paused for cheaper hours says a bus is plugged in.
    await expect(page.getByText(/Reports (available|charging|faulted|a bus plugged in)/)).toHaveCount(10, {
      timeout: 2000,
    });
  }).toPass({ timeout: 30_000 });
  // 00:02 is inside Tuesday's published night: chargers draw power as the profiles say, which
  // they can only do if their clocks are the API's.
  await expect(async () => {
    await page.reload();
    await expect(page.getByText(/Reports charging/).first()).toBeVisible({ timeout: 2000 });
  }).toPass({ timeout: 40_000 });
  await expectAccessible(page);
});

test('the published plan downloads as OCPP charging profiles', async ({ page }) => {
  await signInByApi(page, district.emails.supervisor);
  // Tuesday's night, in force now.
  expect(district.publishedNights[0]).toBe('2026-12-08');
  await page.goto(`/plans?date=${district.publishedNights[0]}`);
  await expect(page.getByText(/Published/).first()).toBeVisible();
  const download = page.waitForEvent('download');
  await page
    .getByRole('button', { name: /OCPP 1\.6/ })
    .first()
    .click();
  const file = await download;
  const body = JSON.parse(
    await (await file.createReadStream()).toArray().then((c) => Buffer.concat(c).toString('utf8')),
  );
  expect(body).toHaveLength(10);
  expect(body[0].payload.csChargingProfiles.chargingSchedule.chargingRateUnit).toBe('W');
  // Bound to Tuesday's night: its id, and valid now (the night in force), not before or after it.
  const profile = body[0].payload.csChargingProfiles;
  expect(profile.chargingProfileId).toBe(20261208);
  expect(Date.parse(profile.validFrom)).toBeLessThanOrEqual(Date.parse(AT.wednesdayAfterMidnight));
  expect(Date.parse(profile.validTo)).toBeGreaterThan(Date.parse(AT.wednesdayAfterMidnight));
  expect(Date.parse(profile.validTo) - Date.parse(profile.validFrom)).toBeLessThan(24 * 3_600_000);
});
