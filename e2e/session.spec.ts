import {
  AT,
  DEMO_PASSWORD,
  districtAt,
  expectAccessible,
  pageAtApiTime,
  signInByApi,
  expect,
  test,
  API,
} from './support';

// A session that really ends (here: the refresh cookie's 14 days are over on the API's clock) sends
// the person to sign in and back, with what they had typed and not yet saved still in the form.
test('an expired session: sign in again and the unsaved input is still there', async ({ page }) => {
  test.setTimeout(90_000);
  const district = await districtAt(AT.weekdayAfternoon);
  await pageAtApiTime(page);
  await signInByApi(page, district.emails.facilities);
  await page.goto('/depot');
  await page.getByRole('button', { name: 'Edit site' }).click();
  const limit = page.getByLabel('Service limit');
  await limit.fill('437');

  // Fifteen days later on the API's clock: the access token and the refresh cookie have both run out.
  const later = new Date(Date.parse(AT.weekdayAfternoon) + 15 * 86_400_000).toISOString();
  const moved = await fetch(`${API}/api/testing/clock`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ at: later }),
  });
  expect(moved.ok).toBe(true);
  await page.getByRole('button', { name: 'Save site' }).click();

  await expect(page).toHaveURL(/\/sign-in\?returnUrl=%2Fdepot/);
  await expect(page.getByRole('heading', { name: /Sign in/ }).first()).toBeVisible();
  await page.getByLabel('E-mail').fill(district.emails.facilities);
  await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();

  await expect(page).toHaveURL(/\/depot$/);
  await expect(page.getByLabel('Service limit')).toHaveValue('437');
  await expectAccessible(page);
  // Saving now works, and the draft is not offered again.
  await page.getByRole('button', { name: 'Save site' }).click();
  await expect(page.getByText('Depot settings saved')).toBeVisible();
});
