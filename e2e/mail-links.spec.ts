import {
  AT,
  DEMO_PASSWORD,
  apiNow,
  districtAt,
  expectAccessible,
  latestMailTo,
  pageAtApiTime,
  signIn,
  expect,
  test,
  API,
} from './support';

async function apiToken(email: string): Promise<string> {
  const res = await fetch(`${API}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password: DEMO_PASSWORD }),
  });
  expect(res.status).toBe(200);
  return ((await res.json()) as { accessToken: string }).accessToken;
}

// Plan e-mails go to each person with a link their roles can open: yard staff to the Yard at
// that night, supervisors to the plan review. A link meant for another role leads home.
test('a yard user follows the link of a revised-plan e-mail and lands on the Yard at that night', async ({ page }) => {
  test.setTimeout(90_000);
  // Wednesday 00:02: Tuesday's night (2026-12-08) is under way; a report revises it and mails the staff.
  const district = await districtAt(AT.wednesdayAfterMidnight);
  const token = await apiToken(district.emails.yard);
  const auth = { authorization: `Bearer ${token}`, 'content-type': 'application/json' };
  const tonight = (await (await fetch(`${API}/api/depots/${district.depotId}/tonight`, { headers: auth })).json()) as {
    plan: { id: string; serviceDate: string };
  };
  // The whole plan, with each plug-in's power (Tonight gives the yard the plug-ins only).
  const { plan } = (await (await fetch(`${API}/api/plans/${tonight.plan.id}`, { headers: auth })).json()) as {
    plan: { result: { sessions: { charger: string; end: string; kw: number[] }[] } };
  };
  const now = (await apiNow()).getTime();
  const charger = plan.result.sessions.find(
    (s) => Date.parse(s.end) > now + 20 * 60_000 && s.kw.some((k) => k > 0),
  )!.charger;
  const report = await fetch(`${API}/api/depots/${district.depotId}/tonight/reports`, {
    method: 'POST',
    headers: auth,
    body: JSON.stringify({ planId: tonight.plan.id, kind: 'charger_out', charger, reason: 'Latch broken (e2e)' }),
  });
  expect(report.status).toBe(201);

  const yardMail = await latestMailTo(district.emails.yard);
  expect(yardMail.subject).toMatch(/^Plan revised at/);
  const link = /Open the yard view for that night: (http\S+)/.exec(yardMail.text)![1]!;
  expect(new URL(link).pathname + new URL(link).search).toBe(`/yard?night=${tonight.plan.serviceDate}`);
  const supervisorMail = await latestMailTo(district.emails.supervisor);
  const review = /Review the plan: (http\S+)/.exec(supervisorMail.text)![1]!;
  expect(review).toContain(`/plans?date=${tonight.plan.serviceDate}&plan=`);

  await pageAtApiTime(page);
  // The supervisor's link, opened by yard staff: after sign-in they land on their home, not on a
  // "not available" page with that address left in the bar.
  const reviewUrl = new URL(review);
  await page.goto(reviewUrl.pathname + reviewUrl.search);
  await expect(page).toHaveURL(/\/sign-in\?returnUrl=/);
  await page.getByLabel('E-mail').fill(district.emails.yard);
  await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page).toHaveURL(/\/yard$/);

  // Their own link: sign-in, then the Yard at that night, the revised version on screen.
  await page.context().clearCookies();
  const yardUrl = new URL(link);
  await page.goto(yardUrl.pathname + yardUrl.search);
  await expect(page).toHaveURL(/\/sign-in\?returnUrl=%2Fyard%3Fnight%3D2026-12-08/);
  await page.getByLabel('E-mail').fill(district.emails.yard);
  await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page).toHaveURL(/\/yard\?night=2026-12-08$/);
  await expect(page.getByRole('heading', { level: 1, name: 'Yard' })).toBeVisible();
  await expect(page.getByRole('region', { name: 'Plan status' })).toContainText('Plan version 2');
  await expect(page.locator('.linked-night')).toHaveCount(0);
  await expectAccessible(page);
});

test('signed in, a link to a page of another role lands on the home page', async ({ page }) => {
  const district = await districtAt(AT.weekdayAfternoon);
  await pageAtApiTime(page);
  await signIn(page, district.emails.finance);
  await expect(page).toHaveURL(/\/costs/);
  await page.goto('/sign-in?returnUrl=%2Fyard%3Fnight%3D2026-12-09');
  await expect(page).toHaveURL(/\/costs/);
});
