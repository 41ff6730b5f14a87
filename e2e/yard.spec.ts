import { expect, test, type Locator, type Page } from '@playwright/test';
import { demo, expectAccessible, signInAs } from './support';

// Night yard staff on a phone: the demo depot (Orchard Lane) has a published plan for the current
// night, or (by day) for the night ahead. The e2e database is shared by the run's test files and not
// reset between them, so nothing here assumes a plan version or which steps are already done.

test.use({ viewport: { width: 390, height: 844 } });

/** Step keys are `action|bus|charger|session start (ISO)`. */
function parseKey(key: string) {
  const [action, bus, charger, start] = key.split('|') as [string, string, string, string];
  return { action, bus, charger, start: Date.parse(start) };
}

/** A charger in service with a plug-in that starts at least 20 minutes from now. */
async function chargerWithLaterSession(page: Page): Promise<{ charger: string; bus: string; start: number }> {
  const keys = await page
    .locator('ny-charger-card:not(.out) li[data-step^="connect|"]')
    .evaluateAll((items) => items.map((li) => li.getAttribute('data-step') ?? ''));
  const later = keys.map(parseKey).filter((k) => k.start > Date.now() + 20 * 60_000);
  test.skip(later.length === 0, 'No plug-in is left later tonight (the night is nearly over).');
  return later[0]!;
}

const card = (page: Page, charger: string): Locator => page.locator(`ny-charger-card[data-charger="${charger}"]`);

test('a yard user sees the next step, confirms it, reports a charger out of service and sees the revised timeline', async ({ page }) => {
  await signInAs(page, demo('yard'));
  await expect(page).toHaveURL(/\/yard$/);
  await expect(page.getByRole('heading', { level: 1, name: 'Yard' })).toBeVisible();

  // The cautions at the start of the shift (once per shift: an earlier test of the run may have
  // acknowledged them already, then they are one tap away).
  const main = page.getByRole('main');
  const start = page.getByRole('button', { name: 'I have read the cautions: start my shift' });
  const reminder = main.getByText('High-voltage cautions (acknowledged for this shift)');
  await expect(start.or(reminder)).toBeVisible();
  if (await reminder.isVisible()) await reminder.click();
  await expect(main.getByText('Only trained and authorised staff connect or disconnect chargers.')).toBeVisible();
  await expect(main.getByText(/NFPA 70 \/ NEC Article 625, NFPA 70E, OSHA/)).toBeVisible();
  await expect(main.getByText('The plan is advisory: the people on site decide.')).toBeVisible();
  await expectAccessible(page);
  if (await start.isVisible()) await start.click();

  // The next step on a charger, in words, with its caution, and a big Confirm button.
  const next = page.getByRole('region', { name: /^Next step on charger / }).first();
  await expect(next).toBeVisible();
  const sentence = (await next.locator('.sentence').textContent())!.trim();
  expect(sentence).toMatch(/^(Connect bus \S+ to|Disconnect bus \S+ from) charger \S+ at \d\d:\d\d$/);
  await expect(next.getByText(/High voltage: trained and authorised staff only/)).toBeVisible();
  const confirm = next.getByRole('button', { name: /^Confirm (connected|disconnected)/ });
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
  const done = card(page, chargerOfStep).locator('.last-done');
  await expect(done).toContainText(`${title}: Saved. Done`);
  expect(dropped).toBe(true);
  await page.unroute('**/api/yard/confirmations');
  await expect(card(page, chargerOfStep).locator('.next .sentence')).not.toHaveText(sentence);

  // By day the plan shown is the night ahead: the API re-plans only once the night has started, and
  // the yard is told so (nothing changes). At night the report re-plans the rest of the night.
  const upcoming = await page.getByText(/The night starts /).isVisible();
  if (upcoming) {
    await page.getByRole('button', { name: 'Report a problem', exact: true }).click();
    const early = page.getByRole('dialog', { name: 'Report a problem' });
    await early.getByRole('combobox', { name: 'Charger' }).click();
    await page.getByRole('option').first().click();
    await early.getByLabel('What is wrong with the charger').fill('Connector latch broken (e2e)');
    await early.getByRole('button', { name: 'Send report' }).click();
    await expect(early.getByText(/The night has not started yet/)).toBeVisible({ timeout: 15_000 });
    await expect(early.getByText('Nothing was changed.')).toBeVisible();
    test.skip(true, 'The plan shown has not started yet (daytime): the night\'s re-planning is checked at night.');
  }

  // Report a charger out of service that still has a plug-in later tonight.
  const target = await chargerWithLaterSession(page);
  const bar = card(page, target.charger).locator(`.bar[data-session="${target.bus}"]`);
  await expect(bar.first()).toBeAttached();
  await page.route('**/tonight/reports', async (route) => {
    await new Promise((r) => setTimeout(r, 800)); // long enough to see the progress
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
  expect(starts.filter((s) => s > Date.now())).toEqual([]);
  await expect(revised.locator('li[data-step^="connect|"][data-state="upcoming"]')).toHaveCount(0);
  await expect(page.getByRole('heading', { name: 'Reported tonight' })).toBeVisible();

  await expectAccessible(page);
});

test('a print of the run sheets shows only the sheets, with the cautions and an initials column', async ({ page }) => {
  await signInAs(page, demo('yard'));
  await expect(page).toHaveURL(/\/yard$/);
  const start = page.getByRole('button', { name: 'I have read the cautions: start my shift' });
  const print = page.getByRole('button', { name: 'Print run sheets' });
  await expect(start.or(print)).toBeVisible();
  if (await start.isVisible()) await start.click();
  await expect(print).toBeVisible();
  await page.emulateMedia({ media: 'print' });
  const sheets = page.locator('.ny-run-sheets');
  await expect(sheets).toBeVisible();
  await expect(sheets.getByRole('heading', { name: /^Run sheet: charger / }).first()).toBeVisible();
  await expect(sheets.getByRole('columnheader', { name: 'Initials' }).first()).toBeVisible();
  await expect(sheets.getByText('Only trained and authorised staff connect or disconnect chargers.').first()).toBeVisible();
  await expect(page.getByRole('heading', { level: 1, name: 'Yard' })).toBeHidden();
});
