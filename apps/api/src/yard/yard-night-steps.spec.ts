import { eq } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { beforeAll, describe, expect, it } from 'vitest';
import type { PlanResult, YardSession, YardStep } from '@nightyard/contracts';
import { plans, yardConfirmations } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { mailFor } from '../testing/mail';
import { publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, signInAgain, type TestUser } from '../testing/test-app';

// One night followed by the yard at fixed instants: a charger reported out at 23:07 (inside a
// slot), steps confirmed late with the time they happened, and steps that did not happen.

const ZONE = 'America/Chicago';
const at = (local: string) => DateTime.fromISO(local, { zone: ZONE }).toJSDate();
let clock = at('2026-12-09T13:00');
const app = createTestApp({ clock: () => clock });
let yard: TestUser;
let sup: TestUser;
let depotId: string;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
/** A plan's whole result (Tonight gives the yard its plug-ins only). */
const planResult = async (id: string): Promise<PlanResult> =>
  (await app.request().get(`/api/plans/${id}`).set(as(yard)).expect(200)).body.plan.result;
const NUMBERS = ['51', '52', '53', '54'];
const hhmm = (iso: string) => DateTime.fromISO(iso, { zone: ZONE }).toFormat('HH:mm');

async function tonight() {
  return (await app.request().get(`/api/depots/${depotId}/tonight`).set(as(yard)).expect(200)).body as {
    plan: { id: string; version: number; sessions: YardSession[] };
    steps: YardStep[];
    reports: { kind: string; reason: string | null }[];
  };
}

async function moveTo(local: string) {
  clock = at(local);
  await signInAgain(app, yard, sup);
}

const planCount = async () => (await app.db.select().from(plans).where(eq(plans.depotId, depotId))).length;

beforeAll(async () => {
  const org = await createOrganisation(app, { yard: ['yard'], sup: ['supervisor'] });
  ({ yard, sup } = org.users as Record<string, TestUser>);
  depotId = (await createDepot(app.db, org.organisationId)).depot.id;
  await addBuses(app.db, org.organisationId, depotId, NUMBERS);
  for (const date of ['2026-12-09', '2026-12-10']) {
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(sup))
      .send({ runs: dayRuns(date, NUMBERS, () => 16) })
      .expect(200);
  }
  await publishedPlan(app, sup, depotId, '2026-12-09');
});

describe('yard steps: a charger reported out inside a slot', () => {
  it('at 23:07 nothing uses the charger after 23:07; its bus gets an unplug step; the e-mail and the run sheet data say the same', async () => {
    await moveTo('2026-12-09T23:07');
    const before = await tonight();
    const cut = clock.getTime();
    const on = (await planResult(before.plan.id)).sessions.find(
      (s) => Date.parse(s.start) < cut && Date.parse(s.end) > cut,
    );
    expect(on, 'a bus charging at 23:07').toBeDefined();
    const { charger, bus } = on!;
    const slot = at('2026-12-09T23:00').getTime();
    const slotKw = on!.kw[(slot - Date.parse(on!.start)) / 900_000] ?? 0;

    const res = await app
      .request()
      .post(`/api/depots/${depotId}/tonight/reports`)
      .set(as(yard))
      .send({ planId: before.plan.id, kind: 'charger_out', charger, reason: 'Cable cut' })
      .expect(201);
    expect(res.body.revision.version).toBe(2);
    const after = await tonight();
    const result = await planResult(after.plan.id);

    // The plan: nothing on the charger after 23:07; the 23:00 slot counts 7 of its 15 minutes.
    for (const s of result.sessions.filter((x) => x.charger === charger))
      expect(Date.parse(s.end)).toBeLessThanOrEqual(cut);
    const stopped = result.sessions.find((s) => s.bus === bus && s.charger === charger && s.start === on!.start)!;
    expect(Date.parse(stopped.end)).toBe(cut);
    expect(stopped.kw.at(-1)).toBeCloseTo((slotKw * 7) / 15, 6);
    // Out of service from 23:07 (the report), not from 23:00 or 23:15 (the slots around it).
    expect(result.outOfService!.filter((o) => o.charger === charger).map((o) => Date.parse(o.from))).toEqual([cut]);

    // The steps: none on the charger after 23:07; the bus is unplugged now and told where it goes.
    expect(after.steps.filter((s) => s.charger === charger && Date.parse(s.at) > cut)).toEqual([]);
    const unplug = after.steps.find(
      (s) => s.bus === bus && s.charger === charger && s.action === 'disconnect' && Date.parse(s.at) === cut,
    )!;
    expect(unplug).toMatchObject({ status: 'upcoming', reason: 'Charger ' + charger + ' out of service (Cable cut)' });
    expect(unplug.text).toMatch(
      new RegExp(`^Unplug bus ${bus} from charger ${charger} now \\(out of service\\), then `),
    );
    const following = result.sessions
      .filter((s) => s.bus === bus && Date.parse(s.start) >= cut)
      .sort((a, b) => Date.parse(a.start) - Date.parse(b.start))[0];
    expect(unplug.moveTo).toEqual({ charger: following?.charger ?? null, at: following?.start ?? null });
    if (following) expect(following.charger).not.toBe(charger);

    // The e-mail lists the next hour's steps in the words and times of the steps (the run sheet's rows).
    const [mail] = await mailFor(yard.email);
    expect(mail!.subject).toMatch(/Plan revised at 23:07: Test depot \(version 2\)/);
    const lines = mail!.text.split('\n');
    const listed = lines
      .slice(lines.indexOf('Steps in the next hour:') + 1)
      .filter((l) => l.startsWith('- '))
      .map((l) => l.slice(2));
    const due = after.steps
      .filter((s) => s.status === 'upcoming' && Date.parse(s.at) <= cut + 3_600_000)
      .map((s) => `${hhmm(s.at)} ${s.text}`);
    expect(listed).toEqual(due);
    expect(listed).toContain(`23:07 ${unplug.text}`);
    expect(mail!.text).not.toMatch(new RegExp(`Plug in bus \\S+ at charger ${charger}\\b`));
  });

  it('a later re-plan keeps the stop at 23:07 (the bus is not put back on the charger until the slot ends)', async () => {
    await moveTo('2026-12-09T23:20');
    const before = await tonight();
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/tonight/reports`)
      .set(as(yard))
      .send({ planId: before.plan.id, kind: 'soc_reading', bus: '53', socPct: 40 })
      .expect(201);
    expect(res.body.revision.version).toBe(3);
    const after = await tonight();
    const unplugs = (t: Awaited<ReturnType<typeof tonight>>) =>
      t.steps.filter((s) => s.reason !== null).map((s) => [s.key, s.at]);
    expect(unplugs(after)).toEqual(unplugs(before));
    expect(unplugs(after).length).toBe(1);
  });
});

describe('yard steps: overdue steps confirmed with their real time, or that did not happen', () => {
  it('an overdue step is confirmed at the time it happened; bad times change nothing', async () => {
    await moveTo('2026-12-09T23:40');
    const t = await tonight();
    const step = t.steps.find((s) => s.status === 'overdue' && s.action === 'connect')!;
    expect(step, 'an overdue connect').toBeDefined();
    const count = async () =>
      (await app.db.select().from(yardConfirmations).where(eq(yardConfirmations.depotId, depotId))).length;
    const n = await count();
    const send = (body: object) =>
      app
        .request()
        .post('/api/yard/confirmations')
        .set(as(yard))
        .send({ planId: t.plan.id, stepKey: step.key, ...body });
    expect((await send({ at: '25:10' }).expect(400)).body.error.fields.at).toBe(
      'Enter the time as HH:mm (00:00 to 23:59)',
    );
    expect((await send({ at: '23:55' }).expect(400)).body.error.message).toMatch(/23:55 is later than now \(23:40\)/);
    expect((await send({ at: '09:00' }).expect(400)).body.error.message).toMatch(/before tonight's plan began/);
    expect(await count()).toBe(n);

    const real = DateTime.fromISO(step.at, { zone: ZONE }).plus({ minutes: 4 }).toFormat('HH:mm');
    const done = await send({ at: real }).expect(200);
    expect(hhmm(done.body.confirmedAt)).toBe(real);
    const again = await tonight();
    expect(again.steps.find((s) => s.key === step.key)).toMatchObject({
      status: 'done',
      confirmedAt: done.body.confirmedAt,
    });
  });

  it('a connect that did not happen re-plans: nothing delivered on it, a revision published, the step marked missed', async () => {
    await moveTo('2026-12-09T23:50');
    const t = await tonight();
    const step = t.steps.find((s) => s.status === 'overdue' && s.action === 'connect')!;
    expect(step, 'an overdue connect').toBeDefined();
    const n = await planCount();

    // Bad requests change nothing.
    const future = t.steps.find((s) => s.status === 'upcoming' && Date.parse(s.at) > clock.getTime())!;
    const post = (body: object) => app.request().post(`/api/depots/${depotId}/tonight/missed`).set(as(yard)).send(body);
    expect((await post({ planId: t.plan.id, stepKey: future.key }).expect(400)).body.error.fields.stepKey).toBe(
      'Not due yet',
    );
    await post({ planId: t.plan.id, stepKey: 'connect|0|Z|2026-12-09T00:00:00.000Z' }).expect(404);
    const confirmed = t.steps.find((s) => s.status === 'done')!;
    await post({ planId: t.plan.id, stepKey: confirmed.key }).expect(409);
    await post({ planId: t.plan.id, stepKey: step.key, extra: 1 }).expect(400);
    expect(await planCount()).toBe(n);

    const res = await post({ planId: t.plan.id, stepKey: step.key }).expect(201);
    expect(res.body.revision).toMatchObject({ kind: 'revision', state: 'published', version: t.plan.version + 1 });
    expect(await planCount()).toBe(n + 1);
    const after = await tonight();
    // The session that did not happen is gone from the plan; nothing was delivered on it.
    expect(
      after.plan.sessions.some((s) => s.bus === step.bus && s.charger === step.charger && s.start === step.at),
    ).toBe(false);
    expect(after.steps.some((s) => s.key === step.key && s.status !== 'missed')).toBe(false);
    expect(after.reports[0]).toMatchObject({ kind: 'step_missed' });
    expect(after.reports[0]!.reason).toContain(
      `Plug in bus ${step.bus} at charger ${step.charger} (due ${hhmm(step.at)}) did not happen`,
    );
    // No step is created in the past.
    for (const s of after.steps.filter((x) => !t.steps.some((y) => y.key === x.key)))
      expect(Date.parse(s.at)).toBeGreaterThanOrEqual(clock.getTime());
    // Twice: the step is no longer in the plan in force (and the old plan is superseded).
    await post({ planId: t.plan.id, stepKey: step.key }).expect(409);
    expect(await planCount()).toBe(n + 1);
  });

  it('a disconnect that did not happen keeps the bus on its charger: the re-plan may not give the charger to another bus before it', async () => {
    // The plan's first unplug of the small hours with nobody plugged in after it yet, looked at
    // once it is overdue (ten minutes after its time): the instant follows the plan, whatever it is.
    await moveTo('2026-12-10T00:10');
    const first = (await tonight()).steps.find(
      (s) => s.action === 'disconnect' && s.reason === null && Date.parse(s.at) >= clock.getTime(),
    );
    expect(first, 'an unplug after 00:10').toBeDefined();
    await moveTo(DateTime.fromISO(first!.at).setZone(ZONE).plus({ minutes: 11 }).toFormat("yyyy-MM-dd'T'HH:mm"));
    const t = await tonight();
    const step = t.steps.find(
      (s) =>
        s.status === 'overdue' &&
        s.action === 'disconnect' &&
        s.reason === null &&
        !t.steps.some(
          (o) =>
            o.charger === s.charger &&
            o.action === 'connect' &&
            o.status === 'done' &&
            Date.parse(o.at) >= Date.parse(s.at),
        ),
    );
    expect(step, 'an overdue disconnect').toBeDefined();
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/tonight/missed`)
      .set(as(yard))
      .send({ planId: t.plan.id, stepKey: step!.key })
      .expect(201);
    expect(res.body.revision.version).toBe(t.plan.version + 1);
    const after = await tonight();
    expect(after.steps.find((s) => s.key === step!.key)?.status).toBe('missed');
    // From the re-plan's first slot, nobody else is plugged into that charger while the bus is on it.
    const afterResult = await planResult(after.plan.id);
    const from = Date.parse(afterResult.replan!.from!);
    const others = afterResult.sessions.filter(
      (s) => s.charger === step!.charger && s.bus !== step!.bus && Date.parse(s.end) > from,
    );
    const mine = afterResult.sessions.filter(
      (s) => s.charger === step!.charger && s.bus === step!.bus && Date.parse(s.start) === from,
    );
    if (mine.length) {
      for (const o of others) expect(Date.parse(o.start)).toBeGreaterThanOrEqual(Date.parse(mine[0]!.end));
      expect(
        after.steps.find((s) => s.action === 'connect' && s.bus === step!.bus && Date.parse(s.at) === from)!.text,
      ).toBe(`Keep bus ${step!.bus} on charger ${step!.charger} (it was not unplugged)`);
    } else {
      // No more charging for it there: it is to come off the charger now, before any other bus goes on.
      const off = after.steps.find((s) => s.key === `${step!.key}|late`)!;
      expect(off).toMatchObject({
        action: 'disconnect',
        status: 'upcoming',
        at: clock.toISOString(),
        reason: 'Not unplugged at its time',
      });
      expect(off.text).toBe(`Unplug bus ${step!.bus} from charger ${step!.charger} (it was not unplugged at its time)`);
      for (const o of others) expect(Date.parse(o.start)).toBeGreaterThanOrEqual(clock.getTime());
      await app
        .request()
        .post(`/api/depots/${depotId}/tonight/missed`)
        .set(as(yard))
        .send({ planId: after.plan.id, stepKey: off.key })
        .expect(409);
      await app
        .request()
        .post('/api/yard/confirmations')
        .set(as(yard))
        .send({ planId: after.plan.id, stepKey: off.key })
        .expect(200);
      expect((await tonight()).steps.find((s) => s.key === off.key)!.status).toBe('done');
    }
  });
});
