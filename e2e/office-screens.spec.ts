import { type Page } from '@playwright/test';
import { AT, districtAt, expectAccessible, pageAtApiTime, signInAs, signInByApi, expect, test } from './support';

// The office screens at a desk (1366 px) and on a phone (390 px): the plan review, the depot and
// fleet forms, the rates breadcrumb and the sign-in page. Each test seeds a district of its own on
// a weekday afternoon (tonight's plan is published by the seed).

const PHONE = { width: 390, height: 844 };
const DESK = { width: 1366, height: 900 };

async function openSection(page: Page, name: string): Promise<void> {
  await page.getByRole('navigation', { name: 'Sections' }).getByRole('link', { name }).click();
  await expect(page.getByRole('heading', { level: 1, name })).toBeVisible();
}

test('the sign-in page loads without an error in the console', async ({ page }) => {
  const errors: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(m.text());
  });
  await page.goto('/sign-in');
  await expect(page.getByRole('button', { name: 'Sign in' })).toBeVisible();
  await page.reload();
  await expect(page.getByRole('button', { name: 'Sign in' })).toBeVisible();
  expect(errors).toEqual([]);
});

test('the plan review reads at a desk and on a phone', async ({ page }) => {
  test.setTimeout(120_000);
  const district = await districtAt(AT.weekdayAfternoon);
  await pageAtApiTime(page);
  await page.setViewportSize(DESK);
  await signInByApi(page, district.emails.supervisor);
  await page.goto('/plans');
  await expect(page.getByRole('heading', { level: 1, name: 'Plans' })).toBeVisible();
  const figures = page.getByRole('list', { name: 'Plan figures' });
  await expect(figures).toContainText('Service limit 450 kW');
  // The seed publishes a night-only plan: the midday choice follows it.
  await expect(page.getByRole('checkbox', { name: 'Include the midday layover' })).not.toBeChecked();

  const timeline = page.locator('ny-charger-timeline').getByRole('region', { name: 'Charger timeline' });
  await expect(timeline).toBeVisible();
  // Axis marks fall on whole hours and never overlap.
  const ticks = timeline.locator('.tick');
  const labels = await ticks.allTextContents();
  expect(labels.length).toBeGreaterThan(3);
  for (const l of labels) expect(l.trim()).toMatch(/^\d\d:00$/);
  const boxes = await ticks.evaluateAll((els) =>
    els.map((e) => e.getBoundingClientRect()).map((r) => [r.left, r.right]),
  );
  for (let i = 1; i < boxes.length; i++) expect(boxes[i]![0]).toBeGreaterThan(boxes[i - 1]![1]);

  // The tables beside the charts are scrollable regions a keyboard can reach.
  await page.getByText('Site load as a table').click();
  await expect(page.getByRole('region', { name: 'Site load as a table' })).toBeVisible();
  await page.getByText('Plug-ins as a table').click();
  await expectAccessible(page);

  // On a phone: a list per charger instead of the sideways picture, and the buses as cards with
  // their energy, state of charge and shortfall.
  await page.setViewportSize(PHONE);
  await expect(timeline).toBeHidden();
  const perCharger = page.getByRole('list', { name: 'Plug-ins by charger' });
  await expect(perCharger).toBeVisible();
  await expect(perCharger.getByRole('listitem').first()).toContainText('kWh');
  const cards = page.getByRole('list', { name: 'Buses in the plan, one card each' });
  await expect(cards).toBeVisible();
  await expect(cards.getByRole('listitem').first()).toContainText('Departs (SOC)');
  await expect(cards.getByRole('listitem').first()).toContainText('Short kWh');
  const overflow = await page.evaluate(
    () => document.documentElement.scrollWidth - document.documentElement.clientWidth,
  );
  expect(overflow).toBeLessThanOrEqual(0);
  await expectAccessible(page);
});

test('depot and fleet forms question unlikely figures and ask before discarding edits', async ({ page }) => {
  test.setTimeout(120_000);
  const district = await districtAt(AT.weekdayAfternoon);
  await pageAtApiTime(page);
  await page.setViewportSize(DESK);
  await signInAs(page, district.emails.admin);
  await openSection(page, 'Depot');

  // A 5,000 kW charger on a 450 kW site: said beside the field, saved only once confirmed.
  await page.getByRole('button', { name: 'Add charger' }).click();
  const dialog = page.getByRole('dialog', { name: 'Add a charger' });
  await expect(dialog.getByLabel('Label')).toBeFocused();
  await dialog.getByLabel('Label').fill('E9');
  await dialog.getByLabel('Maximum power').fill('5000');
  await expect(dialog.getByText(/above the depot's 450 kW service/)).toBeVisible();
  await dialog.getByLabel('OCPP identity').fill(`E9-${district.tag}`);
  await dialog.getByLabel('OCPP password').fill('a-long-charger-secret');
  await expectAccessible(page);
  await dialog.getByRole('button', { name: 'Save charger' }).click();
  await expect(dialog.getByText('Confirm the figure, or correct it, to save.')).toBeVisible();
  // Esc with edits asks first; keeping them leaves the dialog open.
  await page.keyboard.press('Escape');
  const ask = page.getByRole('dialog', { name: 'Discard the changes?' });
  await expect(ask).toBeVisible();
  await ask.getByRole('button', { name: 'Cancel' }).click();
  await expect(dialog).toBeVisible();
  await dialog.getByRole('checkbox', { name: 'Yes, this maximum is right' }).check();
  await dialog.getByRole('button', { name: 'Save charger' }).click();
  await expect(dialog).toHaveCount(0);
  await expect(page.getByRole('cell', { name: 'E9', exact: true })).toBeVisible();

  // A cabinet with chargers on it explains why it cannot go, and offers no Remove.
  await page.getByRole('button', { name: 'Remove power cabinet Cabinet A' }).click();
  const refuse = page.getByRole('dialog', { name: 'Power cabinet Cabinet A cannot be removed yet' });
  await expect(refuse).toContainText('Chargers D1, D2 are on Cabinet A');
  await expect(refuse.getByRole('button', { name: 'Remove' })).toHaveCount(0);
  await refuse.getByRole('button', { name: 'Close' }).click();

  // On a phone the cabinets are cards with their actions on screen.
  await page.setViewportSize(PHONE);
  const cabinets = page.getByRole('list', { name: 'Power cabinets' });
  await expect(cabinets).toBeVisible();
  // Scrolled to (the list is below the fold on a phone), its actions are inside the screen's width.
  const edit = cabinets.getByRole('button', { name: 'Edit power cabinet Cabinet A' });
  await edit.scrollIntoViewIfNeeded();
  await expect(edit).toBeInViewport();
  await expectAccessible(page);

  // Fleet: 15 kWh a mile is questioned beside the field.
  await page.setViewportSize(DESK);
  await openSection(page, 'Fleet');
  await page.getByRole('button', { name: 'Add bus' }).click();
  const bus = page.getByRole('dialog');
  // The dialog puts focus on its first field as it opens: typing before that can land there.
  await expect(bus.getByLabel('Bus number')).toBeFocused();
  await bus.getByLabel('Consumption').fill('15');
  await expect(bus.getByText(/15 kWh per mile is more than a bus uses/)).toBeVisible();
  await expectAccessible(page);
  await page.keyboard.press('Escape');
  await expect(page.getByRole('dialog', { name: 'Discard the changes?' })).toBeVisible();
  await page.getByRole('dialog', { name: 'Discard the changes?' }).getByRole('button', { name: 'Discard' }).click();
  await expect(page.getByRole('dialog')).toHaveCount(0);
});

test('the rate plan breadcrumb wraps on a phone', async ({ page }) => {
  const district = await districtAt(AT.weekdayAfternoon);
  await pageAtApiTime(page);
  await page.setViewportSize(PHONE);
  await signInByApi(page, district.emails.facilities);
  for (const open of [
    () => page.goto('/rates/new'),
    async () => {
      await page.goto('/rates');
      await page
        .getByRole('link', { name: /Tallgrass Power & Light/ })
        .first()
        .click();
    },
  ]) {
    await open();
    const crumbs = page.getByRole('navigation', { name: 'Breadcrumb' });
    await expect(crumbs).toBeVisible();
    // Every part of the trail, the current page's name too, stays on the screen.
    for (const part of await crumbs.locator('a, span').all()) {
      const box = await part.boundingBox();
      expect(box!.x + box!.width).toBeLessThanOrEqual(PHONE.width);
    }
    await expectAccessible(page);
  }
});
