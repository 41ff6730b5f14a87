import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { chargers, powerCabinets, users } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

// Nothing a caller is told may reveal that another organisation has a given person, charger or cabinet.
const app = createTestApp();
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
let mine: { admin: TestUser; fac: TestUser; organisationId: string; depotId: string; chargerIds: string[] };
let theirs: { admin: TestUser; organisationId: string; cabinetId: string; identity: string };

beforeAll(async () => {
  const a = await createOrganisation(app, { admin: ['admin'], fac: ['facilities'] });
  const b = await createOrganisation(app, { admin: ['admin'], fac: ['facilities'] });
  const depotA = await createDepot(app.db, a.organisationId);
  const depotB = await createDepot(app.db, b.organisationId);
  mine = {
    admin: a.users.admin!,
    fac: a.users.fac!,
    organisationId: a.organisationId,
    depotId: depotA.depot.id,
    chargerIds: depotA.chargers.map((c) => c.id),
  };
  const identity = `LEAK-${depotB.depot.id.slice(0, 8)}`;
  await app
    .request()
    .put(`/api/depots/${depotB.depot.id}/chargers/${depotB.chargers[0]!.id}/ocpp`)
    .set(as(b.users.fac!))
    .send({ identity, password: 'their-charger-password' })
    .expect(204);
  theirs = { admin: b.users.admin!, organisationId: b.organisationId, cabinetId: depotB.cabinet.id, identity };
});

describe('409 messages say nothing about other organisations', () => {
  it('inviting an address another organisation uses: "cannot be invited", nothing saved, nothing about an account', async () => {
    const res = await app
      .request()
      .post('/api/users/invite')
      .set(as(mine.admin))
      .send({ email: theirs.admin.email, name: 'Poacher', roles: ['yard'], depotIds: [mine.depotId] })
      .expect(409);
    expect(res.body.error).toEqual({
      code: 'conflict',
      message: 'That e-mail address cannot be invited: use another address for this person',
      fields: { email: 'Cannot be invited' },
    });
    const [row] = await app.db.select().from(users).where(eq(users.email, theirs.admin.email));
    expect(row).toMatchObject({ organisationId: theirs.organisationId, name: expect.not.stringMatching(/Poacher/) });
    // Within one's own organisation the admin may be told plainly.
    const own = await app
      .request()
      .post('/api/users/invite')
      .set(as(mine.admin))
      .send({ email: mine.fac.email, name: 'Again', roles: ['yard'], depotIds: [mine.depotId] })
      .expect(409);
    expect(own.body.error.message).toMatch(/your organisation/);
  });

  it('an OCPP identity another organisation uses: "cannot be used", not "another charger has it"', async () => {
    const res = await app
      .request()
      .put(`/api/depots/${mine.depotId}/chargers/${mine.chargerIds[0]}/ocpp`)
      .set(as(mine.fac))
      .send({ identity: theirs.identity, password: 'my-charger-password-1' })
      .expect(409);
    expect(res.body.error).toEqual({
      code: 'conflict',
      message: 'That OCPP identity cannot be used: choose another',
      fields: { identity: 'Cannot be used' },
    });
    const [row] = await app.db.select().from(chargers).where(eq(chargers.id, mine.chargerIds[0]!));
    expect(row?.ocppIdentity).toBeNull();
    // One's own duplicate names the charger that has it.
    const own = `OWN-${mine.depotId.slice(0, 8)}`;
    await app
      .request()
      .put(`/api/depots/${mine.depotId}/chargers/${mine.chargerIds[1]}/ocpp`)
      .set(as(mine.fac))
      .send({ identity: own, password: 'my-charger-password-2' })
      .expect(204);
    const dup = await app
      .request()
      .put(`/api/depots/${mine.depotId}/chargers/${mine.chargerIds[0]}/ocpp`)
      .set(as(mine.fac))
      .send({ identity: own, password: 'my-charger-password-1' })
      .expect(409);
    expect(dup.body.error.message).toBe('Charger B of your organisation already has that identity');
  });

  it('connector and EVSE ids above 2^31-1 are refused with 400, not stored or a 500', async () => {
    const res = await app
      .request()
      .put(`/api/depots/${mine.depotId}/chargers/${mine.chargerIds[2]}/ocpp`)
      .set(as(mine.fac))
      .send({
        identity: `BIG-${mine.depotId.slice(0, 8)}`,
        password: 'my-charger-password-3',
        connectorId: 2 ** 31,
        evseId: 2 ** 40,
      })
      .expect(400);
    expect(Object.keys(res.body.error.fields ?? {}).join(' ')).toMatch(/connectorId/);
  });

  it('deleting another organisation\'s cabinet through one\'s own depot is "not found", and it stays', async () => {
    const res = await app
      .request()
      .delete(`/api/depots/${mine.depotId}/cabinets/${theirs.cabinetId}`)
      .set(as(mine.fac))
      .expect(404);
    expect(res.body.error.message).not.toMatch(/chargers/);
    expect(await app.db.select().from(powerCabinets).where(eq(powerCabinets.id, theirs.cabinetId))).toHaveLength(1);
  });
});
