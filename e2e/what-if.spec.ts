import { readFile } from 'node:fs/promises';
import { AT, DEMO_PASSWORD, districtAt, expectAccessible, pageAtApiTime, signInAs, expect, test, API } from './support';

// A fleet supervisor tries a what-if (the night on a 150 kW service limit), sees it labelled as a
// study, cannot publish it, and adopts it after a charger went out of service: the adoption lists
// what differs from the depot now and makes a normal draft. The district is the test's own, at a
// fixed instant (the demo depot, Orchard Lane, is in America/Chicago).

async function tokenOf(email: string): Promise<string> {
  const res = await fetch(`${API}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password: DEMO_PASSWORD }),
  });
  expect(res.status).toBe(200);
  return ((await res.json()) as { accessToken: string }).accessToken;
}

async function api(token: string, method: string, path: string, body?: unknown): Promise<Response> {
  return fetch(`${API}/api${path}`, {
    method,
    headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
}

test('a what-if is a study: labelled, never published; adopting it re-checks it against the depot and makes a normal draft', async ({
  page,
}) => {
  test.setTimeout(240_000);
  // Wednesday afternoon: tonight (Wednesday's night) is published in the seed.
  const district = await districtAt(AT.weekdayAfternoon);
  const night = '2026-12-09';
  await pageAtApiTime(page);
  await signInAs(page, district.emails.supervisor);
  await page.getByRole('navigation', { name: 'Sections' }).getByRole('link', { name: 'Plans' }).click();
  await expect(page.getByLabel('Night of')).toHaveValue(night);
  const published = page.getByRole('heading', { level: 2, name: /^Version (\d+) Published/ });
  await expect(published).toBeVisible();

  // The published version's scenario file, changed to a 150 kW service limit, comes back as a what-if.
  const download = page.waitForEvent('download');
  await page.getByRole('button', { name: 'Download scenario' }).click();
  const scenario = JSON.parse(await readFile((await (await download).path())!, 'utf8')) as {
    site: { limitKw: number };
  };
  const depotLimit = scenario.site.limitKw;
  expect(depotLimit).not.toBe(150);
  scenario.site.limitKw = 150;
  await page.getByLabel('Scenario file for a what-if plan').setInputFiles({
    name: 'what-if-150kw.json',
    mimeType: 'application/json',
    buffer: Buffer.from(JSON.stringify(scenario)),
  });

  // Labelled as a what-if in the versions and the review; no Publish, Adopt instead.
  const heading = page.getByRole('heading', { level: 2, name: /^Version (\d+) What-if/ });
  await expect(heading).toBeVisible();
  const version = Number(/Version (\d+)/.exec((await heading.textContent()) ?? '')![1]);
  await expect(page.getByRole('heading', { name: 'Charger timeline' })).toBeVisible({ timeout: 90_000 });
  await expect(
    page.getByRole('list').getByRole('link', { name: new RegExp(`^Version ${version} What-if`) }),
  ).toBeVisible();
  await expect(page.getByRole('note', { name: 'What-if' })).toContainText(
    'never published, e-mailed or sent to chargers',
  );
  await expect(page.getByRole('button', { name: 'Publish', exact: true })).toHaveCount(0);
  await expect(page.getByRole('button', { name: 'Adopt', exact: true })).toBeVisible();
  await expectAccessible(page);

  // Publishing it through the API directly is refused too, and nothing changes.
  const planId = new URL(page.url()).searchParams.get('plan')!;
  const supervisor = await tokenOf(district.emails.supervisor);
  const refused = await api(supervisor, 'POST', `/plans/${planId}/publish`, { expectedPublishedId: null });
  expect(refused.status).toBe(409);
  expect(((await refused.json()) as { error: { message: string } }).error.message).toContain('is a what-if');
  const still = (await (await api(supervisor, 'GET', `/plans/${planId}`)).json()) as {
    plan: { state: string; kind: string };
  };
  expect(still.plan).toMatchObject({ state: 'draft', kind: 'what-if' });

  // Meanwhile charger C3 goes out of service (facilities, through the API).
  const facilities = await tokenOf(district.emails.facilities);
  const depot = (await (await api(facilities, 'GET', `/depots/${district.depotId}`)).json()) as {
    depot: { chargers: { id: string; label: string; maxKw: number; connector: string; cabinetId: string | null }[] };
  };
  const c3 = depot.depot.chargers.find((c) => c.label === 'C3')!;
  const changed = await api(facilities, 'PUT', `/depots/${district.depotId}/chargers/${c3.id}`, {
    label: c3.label,
    maxKw: c3.maxKw,
    connector: c3.connector,
    cabinetId: c3.cabinetId,
    status: 'out_of_service',
    statusReason: 'Cable damaged',
  });
  expect(changed.status).toBe(200);

  // Adopt: the dialog lists what differs from the depot now.
  await page.getByRole('button', { name: 'Adopt', exact: true }).click();
  const dialog = page.getByRole('dialog', { name: `Adopt what-if version ${version}?` });
  const differences = dialog.getByRole('list');
  await expect(differences).toContainText(`Service limit in the study 150 kW, depot now ${depotLimit} kW`);
  await expect(differences).toContainText('Charger C3 out of service now (Cable damaged): left out');
  await expectAccessible(page);
  await dialog.getByRole('button', { name: 'Adopt as a new draft' }).click();

  // The adopted plan is a normal draft of the night, made from the depot as it is now.
  await expect(
    page.getByRole('heading', { level: 2, name: new RegExp(`^Version ${version + 1} Draft`) }),
  ).toBeVisible();
  const adopted = page.getByRole('note', { name: 'Adopted from a what-if' });
  await expect(adopted).toContainText(
    `Adopted from what-if version ${version}, re-checked against the depot as it is now`,
  );
  await expect(adopted).toContainText('Charger C3 out of service now');
  await expect(page.getByRole('heading', { name: 'Charger timeline' })).toBeVisible({ timeout: 90_000 });
  await expect(page.locator('.review-header .meta')).toContainText('Generated');
  await expect(page.getByRole('button', { name: 'Publish', exact: true })).toBeVisible();
  await expect(page.getByRole('region', { name: 'Buses in the plan' })).not.toContainText(/\bC3\b/);
  await expectAccessible(page);
  // The what-if is still a study.
  await expect(
    page.getByRole('list').getByRole('link', { name: new RegExp(`^Version ${version} What-if`) }),
  ).toBeVisible();
});
