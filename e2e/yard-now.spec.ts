import { type Page } from '@playwright/test';
import {
  AT,
  apiNow,
  districtAt,
  expectAccessible,
  latestMailTo,
  pageAtApiTime,
  signInAs,
  expect,
  test,
  API,
} from './support';

// The early-morning crew on a phone, not having confirmed its first steps (the demo depot has
// nobody in the yard from 23:30 to 04:30, and the district's evening steps are confirmed): the cards lead with what to do now,
// the overdue steps wait apart (confirmed with the time they happened, or said not to have
// happened), the next hour across chargers, and a charger reported out in the middle of a slot.

test.use({ viewport: { width: 390, height: 844 } });

async function apiClockAt(at: string): Promise<void> {
  const res = await fetch(`${API}/api/testing/clock`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ at }),
  });
  expect(res.ok, `the API's clock at ${at}`).toBe(true);
}

const card = (page: Page, charger: string) => page.locator(`ny-charger-card[data-charger="${charger}"]`);

test('the yard card shows the step due now, overdue steps apart, the next hour, and an unplug-now step after a charger is reported out', async ({
  page,
}) => {
  // Two re-plans of the demo district and two accessibility checks of a long page.
  test.setTimeout(120_000);
  const district = await districtAt(AT.wednesdayAfterMidnight);
  // Nobody confirmed anything since the crew came in at 04:30: the steps to 04:57 are overdue at 05:07.
  await apiClockAt('2026-12-09T05:07:00-06:00');
  await pageAtApiTime(page);
  await signInAs(page, district.emails.yard);
  await page.getByRole('button', { name: 'I have read the cautions: start my shift' }).click();
  await expect(page.getByRole('region', { name: 'Plan status' })).toContainText(/Now 05:0\d/);

  // The next hour across all chargers, in time order, due now to an hour ahead, with the cautions.
  const nextHour = page.getByRole('region', { name: 'Next hour, all chargers' });
  await expect(nextHour).toBeVisible();
  const times = (await nextHour.locator('li .time').allTextContents()).map((t) => t.trim());
  expect(times.length).toBeGreaterThan(0);
  expect([...times].sort()).toEqual(times);
  // Due now: a step becomes overdue ten minutes after its time.
  for (const t of times) expect(t >= '04:57' && t <= '06:07').toBe(true);
  await expect(nextHour.getByText(/High voltage: trained and authorised staff only/).first()).toBeVisible();

  // Overdue steps wait apart; the card still leads with the step due now or next.
  const overdue = page.locator('ny-overdue-step');
  await expect(overdue.first()).toBeVisible();
  const first = overdue.first();
  const key = (await first.getAttribute('data-step'))!;
  const charger = key.split('|')[2]!;
  const next = card(page, charger).locator('.next .when');
  if (await next.count()) await expect(next).toHaveText(/^\S+\s*(Due now|Next, in)/);
  const due = /Due (\d\d):(\d\d)/.exec((await first.locator('.due').textContent())!)!;
  const real = `${due[1]}:${String(Number(due[2]) + 2).padStart(2, '0')}`.replace(/:6\d$/, ':59');
  await expect(first.getByText(/High voltage: trained and authorised staff only/)).toBeVisible();
  await expectAccessible(page);

  // A time that is not HH:mm is refused in place; then it is confirmed at the time it happened.
  const time = first.getByLabel('Done at (depot time)');
  await time.fill('7pm');
  await first.getByRole('button', { name: /^Confirm done at this time/ }).click();
  await expect(first.locator('mat-error')).toContainText('HH:mm');
  await time.fill(real);
  await first.getByRole('button', { name: /^Confirm done at this time/ }).click();
  const done = card(page, charger).locator(`li[data-step="${key}"]`);
  await expect(done).toHaveAttribute('data-state', 'done');
  await expect(done).toContainText(`Done ${real}`);
  await expect(page.locator(`ny-overdue-step[data-step="${key}"]`)).toHaveCount(0);

  // A plug-in that did not happen: asked once more, then the night is re-planned and published.
  const missed = page.locator('ny-overdue-step[data-step^="connect|"]').first();
  const missedKey = (await missed.getAttribute('data-step'))!;
  const bus = missedKey.split('|')[1]!;
  await missed.getByRole('button', { name: /^Did not happen/ }).click();
  await expect(
    missed.getByText(`Bus ${bus} is taken as not plugged in, and the rest of the night is re-planned.`),
  ).toBeVisible();
  await missed.getByRole('button', { name: 'Yes, it did not happen' }).click();
  await expect(page.locator('.notice')).toContainText(/version 2/, { timeout: 20_000 });
  await expect(page.getByRole('region', { name: 'Plan status' })).toContainText('Plan version 2 (revised)');
  await expect(page.locator(`ny-overdue-step[data-step="${missedKey}"]`)).toHaveCount(0);
  await expect(page.locator('.reports')).toContainText(`Plug in bus ${bus}`);
  await page.locator('.notice').getByRole('button', { name: 'Got it' }).click();

  // A charger with a bus on it now is reported out in the middle of a slot.
  const now = (await apiNow()).getTime();
  const spans = await page.locator('ny-charger-card:not(.out) .bar[data-start][data-end]').evaluateAll((bars) =>
    bars.map((b) => ({
      charger: b.closest('ny-charger-card')!.getAttribute('data-charger')!,
      bus: b.getAttribute('data-session')!,
      start: Date.parse(b.getAttribute('data-start')!),
      end: Date.parse(b.getAttribute('data-end')!),
    })),
  );
  const on = spans.find((s) => s.start < now && s.end > now + 5 * 60_000);
  expect(on, 'a bus on a charger now').toBeDefined();
  await page.getByRole('button', { name: 'Report a problem', exact: true }).click();
  const dialog = page.getByRole('dialog', { name: 'Report a problem' });
  await dialog.getByRole('radio', { name: 'Charger out of service' }).check();
  await dialog.getByRole('combobox', { name: 'Charger' }).click();
  await page.getByRole('option', { name: on!.charger, exact: true }).click();
  await dialog.getByLabel('What is wrong with the charger').fill('Cable cut (e2e)');
  await dialog.getByRole('button', { name: 'Send report' }).click();
  await expect(dialog.getByText(/^Version \d+ is published$/)).toBeVisible({ timeout: 20_000 });
  await dialog.getByRole('button', { name: 'See the new timeline' }).click();
  await expect(dialog).toBeHidden();

  // The card: out of service, and the bus on it is to be unplugged now; nothing else after now.
  const out = card(page, on!.charger);
  const reportedAt = (await apiNow()).getTime();
  await expect(out).toContainText(
    'Out of service: Cable cut (e2e). Unplug the bus on it (below); nothing else is planned on it.',
  );
  const step = out.getByRole('region', { name: `Step due now or next on charger ${on!.charger}` });
  await expect(step.locator('.when')).toContainText('Due now');
  await expect(step.locator('.reason')).toHaveText(`Charger ${on!.charger} out of service (Cable cut (e2e))`);
  const sentence = (await step.locator('.sentence').textContent())!.trim();
  expect(sentence).toMatch(
    new RegExp(
      `^Unplug bus ${on!.bus} from charger ${on!.charger} now \\(out of service\\), then (move it to charger \\S+ for \\d\\d:\\d\\d|wait|leave it unplugged)`,
    ),
  );
  await expect(step.getByText(/High voltage: trained and authorised staff only/)).toBeVisible();
  await expect(out.locator('li[data-step^="connect|"][data-state="upcoming"]')).toHaveCount(0);
  const ends = await out
    .locator('.bar[data-end]')
    .evaluateAll((bars) => bars.map((b) => Date.parse(b.getAttribute('data-end')!)));
  for (const end of ends) expect(end).toBeLessThanOrEqual(reportedAt);

  // The next hour and the e-mail say the same words.
  const [, words, at] = /^(.*) \(reported (\d\d:\d\d)\)$/.exec(sentence)!;
  await expect(nextHour).toContainText(words!);
  const mail = await latestMailTo(district.emails.yard);
  expect(mail.text).toContain(`Steps in the next hour:\n`);
  expect(mail.text).toContain(`- ${at} ${words}`);

  await expectAccessible(page);
});
