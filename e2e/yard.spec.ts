import { type Locator, type Page } from '@playwright/test';
import { AT, apiNow, districtAt, expectAccessible, pageAtApiTime, signInAs, expect, test } from './support';

// Night yard staff on a phone, at fixed instants of the demo depot's week (America/Chicago): each
// test seeds a district of its own whose night in progress was published and followed by the crew
// until ten minutes before.

test.use({ viewport: { width: 390, height: 844 } });

/** Step keys are `action|bus|charger|session start (ISO)`. */
function parseKey(key: string) {
  const [action, bus, charger, start] = key.split('|') as [string, string, string, string];
  return { action, bus, charger, start: Date.parse(start) };
}

/** A charger in service with a plug-in that starts at least 20 minutes after the API's now. */
async function chargerWithLaterSession(page: Page): Promise<{ charger: string; bus: string; start: number }> {
  const keys = await page
    .locator('ny-charger-card:not(.out) li[data-step^="connect|"]')
    .evaluateAll((items) => items.map((li) => li.getAttribute('data-step') ?? ''));
  const now = (await apiNow()).getTime();
  const later = keys.map(parseKey).filter((k) => k.start > now + 20 * 60_000);
  expect(later.length, 'plug-ins later tonight').toBeGreaterThan(0);
  return later[0]!;
}

const card = (page: Page, charger: string): Locator => page.locator(`ny-charger-card[data-charger="${charger}"]`);

test('a yard user sees the next step, confirms it, reports a charger out of service and sees the revised timeline', async ({
  page,
}) => {
  // A re-plan of the demo district and two accessibility checks of a long page (the next hour, overdue lists).
  test.setTimeout(90_000);
  // Wednesday 00:02: Tuesday's night is under way, with plug-ins still to come until dawn.
  const district = await districtAt(AT.wednesdayAfterMidnight);
  await pageAtApiTime(page);
  await signInAs(page, district.emails.yard);
  await expect(page).toHaveURL(/\/yard$/);
  await expect(page.getByRole('heading', { level: 1, name: 'Yard' })).toBeVisible();

  // The cautions at the start of the shift, before any step.
  const main = page.getByRole('main');
  const start = page.getByRole('button', { name: 'I have read the cautions: start my shift' });
  await expect(start).toBeVisible();
  await expect(main.getByText('Only trained and authorised staff connect or disconnect chargers.')).toBeVisible();
  await expect(main.getByText(/NFPA 70 \/ NEC Article 625, NFPA 70E, OSHA/)).toBeVisible();
  await expect(main.getByText('The plan is advisory: the people on site decide.')).toBeVisible();
  await expectAccessible(page);
  await start.click();
  // The night in progress, live: the clock of the page is the depot's, just after midnight.
  await expect(page.getByRole('region', { name: 'Plan status' })).toContainText(/Now 00:0\d/);

  // The next step on a charger, in words, with its caution, and a big Confirm button.
  const next = page.getByRole('region', { name: /^Step due now or next on charger / }).first();
  await expect(next).toBeVisible();
  const sentence = (await next.locator('.sentence').textContent())!.trim();
  expect(sentence).toMatch(/^(Plug in bus \S+ at|Unplug bus \S+ from) charger \S+ at \d\d:\d\d$/);
  await expect(next.getByText(/High voltage: trained and authorised staff only/)).toBeVisible();
  const confirm = next.getByRole('button', { name: /^Confirm (plugged in|unplugged)/ });
  const box = await confirm.boundingBox();
  expect(box!.height).toBeGreaterThanOrEqual(48);
  const chargerOfStep = /charger (\S+) at/.exec(sentence)![1]!;
  const title = sentence.replace(/ at \d\d:\d\d$/, '');

  // The network drops mid-request: the server stores the confirmation but the answer never arrives.
  // The outbox keeps it and sends it again; the server answers with the same confirmation.
  let dropped = false;
  await page.route('**/api/yard/confirmations', async (route) => {
    if (dropped) return route.continue();
    dropped = true;
    await route.fetch();
    await route.abort('connectionreset');
  });
  await confirm.click();
  // At 00:02 every step left is at 04:30 or later, when the crew is back: a step more than an hour
  // ahead is asked about once more before it is saved.
  const ask = next.getByRole('group', {
    name: /^This step is due \d\d:\d\d, in \d+ h( \d+ min)?\. Was it really done now\?$/,
  });
  await expect(ask).toBeVisible();
  await ask.getByRole('button', { name: 'Yes, it is done' }).click();
  const done = card(page, chargerOfStep).locator('.last-done');
  await expect(done).toContainText(`${title}: Saved. Done`);
  expect(dropped).toBe(true);
  await page.unroute('**/api/yard/confirmations');
  await expect(card(page, chargerOfStep).locator('.next .sentence')).not.toHaveText(sentence);

  // Report a charger out of service that still has a plug-in later tonight.
  const target = await chargerWithLaterSession(page);
  const bar = card(page, target.charger).locator(`.bar[data-session="${target.bus}"]`);
  await expect(bar.first()).toBeAttached();
  // The report is held until the progress has been seen, then let through.
  let letThrough!: () => void;
  const seen = new Promise<void>((r) => (letThrough = r));
  await page.route('**/tonight/reports', async (route) => {
    await seen;
    await route.continue();
  });

  await page.getByRole('button', { name: 'Report a problem', exact: true }).click();
  const dialog = page.getByRole('dialog', { name: 'Report a problem' });
  await dialog.getByRole('radio', { name: 'Charger out of service' }).check();
  await dialog.getByRole('combobox', { name: 'Charger' }).click();
  await page.getByRole('option', { name: target.charger, exact: true }).click();
  await dialog.getByLabel('What is wrong with the charger').fill('Connector latch broken (e2e)');
  await dialog.getByRole('button', { name: 'Send report' }).click();

  await expect(dialog.getByText('Re-planning the rest of the night and publishing it…')).toBeVisible();
  letThrough();
  await expect(dialog.getByText(/^Version \d+ is published$/)).toBeVisible({ timeout: 15_000 });
  await expect(dialog.getByText('What moved')).toBeVisible();
  await dialog.getByRole('button', { name: 'See the new timeline' }).click();
  await expect(dialog).toBeHidden();

  // Told in the app; the charger's remaining plug-ins are gone from its timeline.
  const notice = page.locator('.notice');
  await expect(notice).toContainText(`charger ${target.charger} out of service (Connector latch broken (e2e))`);
  await expect(notice).toContainText(/Plan revised at \d\d:\d\d \(version \d+\)/);
  await expect(page.getByRole('region', { name: 'Plan status' })).toContainText('(revised)');
  const revised = card(page, target.charger);
  await expect(revised).toContainText('Out of service: Connector latch broken (e2e)');
  const starts = await revised
    .locator('.bar[data-start]')
    .evaluateAll((bars) => bars.map((b) => Date.parse(b.getAttribute('data-start') ?? '')));
  const after = (await apiNow()).getTime();
  expect(starts.filter((s) => s > after)).toEqual([]);
  await expect(revised.locator('li[data-step^="connect|"][data-state="upcoming"]')).toHaveCount(0);
  await expect(page.getByRole('heading', { name: 'Reported tonight' })).toBeVisible();

  await expectAccessible(page);
});

test('a print of the run sheets on a Friday night shows only the sheets, with the cautions and an initials column', async ({
  page,
}) => {
  const district = await districtAt(AT.fridayNight);
  await pageAtApiTime(page);
  await signInAs(page, district.emails.yard);
  await expect(page).toHaveURL(/\/yard$/);
  await page.getByRole('button', { name: 'I have read the cautions: start my shift' }).click();
  await expect(page.getByRole('button', { name: 'Print run sheets' })).toBeVisible();
  await page.emulateMedia({ media: 'print' });
  const sheets = page.locator('.ny-run-sheets');
  await expect(sheets).toBeVisible();
  await expect(sheets.getByRole('heading', { name: /^Run sheet: charger / }).first()).toBeVisible();
  await expect(sheets.getByRole('columnheader', { name: 'Initials' }).first()).toBeVisible();
  await expect(
    sheets.getByText('Only trained and authorised staff connect or disconnect chargers.').first(),
  ).toBeVisible();
  await expect(page.getByRole('heading', { level: 1, name: 'Yard' })).toBeHidden();
});

for (const [name, at, clock] of [
  ['the autumn clock change (the first 01:30)', AT.autumnClockChange, /Now 01:3\d/],
  ['the spring clock change (03:30, after the missing hour)', AT.springClockChange, /Now 03:3\d/],
] as const) {
  test(`at ${name} the yard shows Friday's night in progress, charger by charger`, async ({ page }) => {
    const district = await districtAt(at);
    expect(district.publishedNights[0]).toMatch(/^(2026-10-30|2027-03-12)$/);
    await pageAtApiTime(page);
    await signInAs(page, district.emails.yard);
    await page.getByRole('button', { name: 'I have read the cautions: start my shift' }).click();
    const status = page.getByRole('region', { name: 'Plan status' });
    await expect(status).toContainText(clock);
    await expect(status).toContainText('Plan version 1');
    await expect(page.locator('ny-charger-card')).toHaveCount(10);
    await expectAccessible(page);
  });
}
