import { beforeAll, describe, expect, it } from 'vitest';
import { userDepots } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { mailFor } from '../testing/mail';
import { publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';
import { nightStaff } from './night-staff';

// The night's e-mails go to the night staff who can see the depot, and to nobody else.
const app = createTestApp();
const NUMBERS = ['81', '82'];
let people: Record<string, TestUser>;
let organisationId: string;
let depotA: string;
let depotB: string;

beforeAll(async () => {
  const org = await createOrganisation(app, {
    supa: ['supervisor'],
    yardb: ['yard'],
    supab: ['supervisor', 'finance'],
    chief: ['admin', 'supervisor'],
    fin: ['finance'],
  });
  people = org.users;
  organisationId = org.organisationId;
  depotA = (await createDepot(app.db, organisationId, 'A', false)).depot.id;
  depotB = (await createDepot(app.db, organisationId, 'B', false)).depot.id;
  await app.db.insert(userDepots).values([
    { userId: people.supa!.id, depotId: depotA },
    { userId: people.yardb!.id, depotId: depotB },
    { userId: people.supab!.id, depotId: depotA },
    { userId: people.supab!.id, depotId: depotB },
    { userId: people.fin!.id, depotId: depotB },
  ]);
}, 30_000);

describe('night staff', () => {
  it("of a depot: its yard staff and supervisors, and the administrators' who also supervise", async () => {
    const of = async (depotId: string) =>
      (await nightStaff(app.db, organisationId, depotId)).map((r) => r.email).sort();
    expect(await of(depotA)).toEqual([people.supa!.email, people.supab!.email, people.chief!.email].sort());
    expect(await of(depotB)).toEqual([people.yardb!.email, people.supab!.email, people.chief!.email].sort());
  });

  it("a plan published at depot B is e-mailed to B's night staff only", async () => {
    await addBuses(app.db, organisationId, depotB, NUMBERS);
    for (const date of ['2026-12-02', '2026-12-03']) {
      await app
        .request()
        .put(`/api/depots/${depotB}/service-days/${date}`)
        .set({ Authorization: `Bearer ${people.supab!.token}` })
        .send({ forecastLowF: 30, runs: dayRuns(date, NUMBERS, () => 40) })
        .expect(200);
    }
    await publishedPlan(app, people.supab!, depotB, '2026-12-02');
    for (const who of ['yardb', 'supab', 'chief']) {
      const [mail] = await mailFor(people[who]!.email);
      expect(mail?.subject, who).toMatch(/published/i);
      expect(mail!.text).toContain('B');
    }
    // Those who cannot see depot B (or are not night staff) hear nothing.
    expect(await mailFor(people.supa!.email, 1, 1_500)).toEqual([]);
    expect(await mailFor(people.fin!.email, 1, 500)).toEqual([]);
  });
});
