import { type Page } from '@playwright/test';
import {
  AT,
  districtAt,
  expectAccessible,
  latestMailTo,
  pageAtApiTime,
  signInAs,
  type District,
  expect,
  test,
} from './support';

// A fleet supervisor uploads a day's runs, generates the night's plan, reviews it and publishes it;
// and, just after midnight, plans a night already under way. Each test seeds a district of its own
// at a fixed instant (the demo depot, Orchard Lane, is in America/Chicago).

const COLUMNS = 'bus,pull_out,pull_in,miles,kwh,arrival_soc_pct';

/**
 * The day's runs for the 24 demo buses (201-224): a morning and an afternoon run each. Buses 203 and
 * 205 come back at dawn (a pull-in earlier than the pull-out is the next morning) nearly empty after
 * a long afternoon: they cannot take the energy of their morning runs in the half hour left.
 */
function runsCsv(): string {
  const lines = [COLUMNS];
  for (let i = 0; i < 24; i++) {
    const bus = 201 + i;
    const mm = String((i * 2) % 60).padStart(2, '0');
    lines.push(`${bus},06:${mm},08:${mm},30,,`);
    if (bus === 203) lines.push(`${bus},14:10,05:30,,150,10`);
    else if (bus === 205) lines.push(`${bus},14:20,05:45,,140,12`);
    else lines.push(`${bus},14:${mm},16:${mm},28,,${i < 6 ? 15 + i * 2 : 40 + (i % 5) * 5}`);
  }
  return `${lines.join('\n')}\n`;
}

async function uploadCsv(page: Page, name: string, csv: string): Promise<void> {
  await page.getByLabel('Runs CSV file').setInputFiles({ name, mimeType: 'text/csv', buffer: Buffer.from(csv) });
}

test('a supervisor uploads the runs, generates the night, reviews the short buses and publishes', async ({ page }) => {
  test.setTimeout(180_000);
  // Wednesday afternoon; the night planned is next Monday's (its runs end on Tuesday morning), which
  // has no plan yet: the seed published only tonight's and tomorrow night's.
  const district: District = await districtAt(AT.weekdayAfternoon);
  const night = '2026-12-14';
  await pageAtApiTime(page);

  await signInAs(page, district.emails.supervisor);
  await page.getByRole('navigation', { name: 'Sections' }).getByRole('link', { name: 'Fleet' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Fleet' })).toBeVisible();
  await expect(page.getByRole('cell', { name: '224', exact: true })).toBeVisible();
  await expectAccessible(page);

  // Fleet > Service day, on the night's date.
  await page.getByRole('tab', { name: 'Service day' }).click();
  await page.getByRole('textbox', { name: 'Service day' }).fill(night);
  await expect(page).toHaveURL(new RegExp(`date=${night}`));
  const runs = page.getByRole('table', { name: 'Runs of the day' }).locator('tbody tr');
  await expect(runs).toHaveCount(48);
  await expect(page.getByRole('cell', { name: 'Uploaded' })).toHaveCount(0);
  await expectAccessible(page);

  // A bad file: every problem is named at once, line and column, format errors and unknown buses
  // together, and nothing is saved.
  await uploadCsv(
    page,
    'bad-runs.csv',
    `${COLUMNS}\n999,14:10,16:40,30,,40\n201,14:05,16:30,30,,120\n202,14:10,25:00,30,,40\n`,
  );
  const lines = page.getByRole('list', { name: 'Lines to fix' });
  await expect(page.getByText('bad-runs.csv: 3 lines need fixing; nothing was saved')).toBeVisible();
  await expect(lines.getByRole('listitem')).toHaveText([
    /^Line 2, column bus: Bus 999 is not in this depot's fleet/,
    /^Line 3, column arrival_soc_pct: .*0 to 100 %/,
    /^Line 4, column pull_in: "25:00" is not a time of day: use HH:mm/,
  ]);
  await expect(runs).toHaveCount(48);
  await expect(page.getByRole('cell', { name: 'Uploaded' })).toHaveCount(0);
  await expectAccessible(page);
  // A spreadsheet saved with semicolons is answered with one plain sentence.
  await uploadCsv(page, 'semicolons.csv', `${COLUMNS.replaceAll(',', ';')}\n201;14:05;16:30;30;;38\n`);
  await expect(page.getByText(/separates its columns with semicolons: save it as CSV with commas/)).toBeVisible();

  // The real file: saved as a whole, the arrival states of charge marked as uploaded.
  await uploadCsv(page, 'runs.csv', runsCsv());
  await expect(page.getByText('48 runs uploaded from runs.csv')).toBeVisible();
  await expect(lines).toHaveCount(0);
  await expect(page.getByRole('cell', { name: 'Uploaded' })).toHaveCount(24);
  await expect(page.getByLabel('Pull-in, row 6', { exact: true })).toHaveValue('05:30');
  await expect(page.getByText('next day', { exact: true })).toHaveCount(2);

  // Plans for that night: generate, watch the progress, review.
  await page.getByRole('navigation', { name: 'Sections' }).getByRole('link', { name: 'Plans' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Plans' })).toBeVisible();
  await page.getByLabel('Night of').fill(night);
  await expect(page).toHaveURL(new RegExp(`date=${night}`));
  await expect(page.getByText('No plan for this night yet.')).toBeVisible();
  await expectAccessible(page);
  await page.getByRole('button', { name: 'Generate plan' }).click();
  await expect(page.getByRole('heading', { level: 2, name: /^Version 1 Draft/ })).toBeVisible();
  await expect(page.getByRole('heading', { name: 'Charger timeline' })).toBeVisible({ timeout: 90_000 });

  const timeline = page.getByRole('region', { name: 'Charger timeline' });
  await expect(timeline.getByRole('img')).toHaveAttribute('aria-label', /plug-ins on \d+ chargers/);
  await expect(timeline.locator('[data-bus="203"]').first()).toBeVisible();

  // Short buses first, with the reason in words.
  const banner = page.getByRole('note', { name: 'Short buses' });
  await expect(banner).toContainText('Bus 203');
  await expect(banner).toContainText('Bus 205');
  const rows = page.getByRole('region', { name: 'Buses in the plan' }).locator('tbody tr');
  await expect(rows).toHaveCount(24);
  const reasons = /Dwell too short|Not enough charger time|Power cabinet limit|Site service limit|Battery taper/;
  for (const i of [0, 1]) {
    await expect(rows.nth(i).getByRole('rowheader')).toHaveText(/20[35]/);
    await expect(rows.nth(i)).toContainText(reasons);
  }
  await expect(rows.nth(2)).toContainText('Leaves with its energy');
  // The Peak card: the billing period's demand target beside the service limit, and whether the
  // night stays within it or what going above costs.
  const peak = page.getByRole('list', { name: 'Plan figures' }).getByRole('listitem').filter({ hasText: 'Peak load' });
  await expect(peak).toContainText(/Service limit [\d,.]+ kW/);
  await expect(peak).toContainText(/Demand target [\d,.]+ kW/);
  await expect(peak).toContainText(
    /Within the target: this night adds no demand charge to the month|kW above the target\. Raising the target by/,
  );
  await expectAccessible(page);

  // Publish, after the dialog says what publishing means.
  await page.getByRole('button', { name: 'Publish', exact: true }).click();
  const dialog = page.getByRole('dialog', { name: 'Publish version 1?' });
  await expect(dialog).toContainText('A published plan cannot be changed');
  await expect(dialog).toContainText('yard staff and fleet supervisors');
  await expectAccessible(page);
  await dialog.getByRole('button', { name: 'Publish plan' }).click();
  await expect(page.getByRole('heading', { level: 2, name: /^Version 1 Published/ })).toBeVisible();
  await expect(page.getByRole('button', { name: 'Publish', exact: true })).toHaveCount(0);
  await expect(page.getByText('This plan is published and never changes.')).toBeVisible();

  const mail = await latestMailTo(district.emails.yard);
  expect(mail.subject).toContain('Charging plan published');
  expect(mail.subject).toContain('Orchard Lane Depot');
  expect(mail.text).toContain('203');

  // Each recipient's link opens a page of their own: the yard's the Yard at that night, the
  // supervisor's that version's review.
  expect(mail.text).toContain(`/yard?night=${night}`);
  const own = await latestMailTo(district.emails.supervisor);
  const link = new URL(/Review the plan: (http\S+)/.exec(own.text)![1]!);
  await page.goto(link.pathname + link.search);
  await expect(page).toHaveURL(new RegExp(`date=${night}`));
  await expect(page.getByRole('heading', { level: 2, name: /^Version 1 Published/ })).toBeVisible();
});

test('just after midnight the supervisor plans the night under way: it starts now and the review says so', async ({
  page,
}) => {
  test.setTimeout(120_000);
  // Wednesday 00:02: Tuesday's night is under way, published before it began and followed by the yard since.
  const district = await districtAt(AT.wednesdayAfterMidnight);
  await pageAtApiTime(page);
  await signInAs(page, district.emails.supervisor);
  await expect(page).toHaveURL(/\/plans/);
  // The default night is the one in progress, not the coming evening's.
  await expect(page.getByLabel('Night of')).toHaveValue('2026-12-08');
  await expect(page.getByRole('heading', { level: 2, name: /^Version 1 Published/ })).toBeVisible();

  await page.getByRole('button', { name: 'Generate plan' }).click();
  await expect(page.getByRole('heading', { level: 2, name: /^Version 2 Draft/ })).toBeVisible();
  await expect(page.getByRole('heading', { name: 'Charger timeline' })).toBeVisible({ timeout: 90_000 });
  const note = page.getByRole('note', { name: 'Planned from' });
  await expect(note).toContainText(/it plans from 00:\d\d on/);
  await expect(note).toContainText('nothing is placed in the past');
  await expectAccessible(page);
});
