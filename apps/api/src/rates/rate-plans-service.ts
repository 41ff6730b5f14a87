import { and, asc, eq } from 'drizzle-orm';
import { ratePlanDefinitionSchema, type RatePlan, type SaveRatePlan } from '@nightyard/contracts';
import type { Db } from '../db/client';
import { depotRatePlans, ratePlans } from '../db/schema';
import { DomainError, notFound } from '../http/errors';
import type { AuthUser } from '../auth/auth-user';
import { depotOf } from '../depots/depot-access';

type Row = typeof ratePlans.$inferSelect;

const toPlan = (r: Row): RatePlan => ({
  id: r.id,
  name: r.name,
  definition: ratePlanDefinitionSchema.parse(r.definition),
  createdAt: r.createdAt.toISOString(),
});

export async function listRatePlans(db: Db, caller: AuthUser): Promise<RatePlan[]> {
  const rows = await db
    .select()
    .from(ratePlans)
    .where(eq(ratePlans.organisationId, caller.organisationId))
    .orderBy(asc(ratePlans.name));
  return rows.map(toPlan);
}

export async function getRatePlan(db: Db, caller: AuthUser, id: string): Promise<RatePlan> {
  const [row] = await db
    .select()
    .from(ratePlans)
    .where(and(eq(ratePlans.id, id), eq(ratePlans.organisationId, caller.organisationId)));
  if (!row) throw notFound('That rate plan');
  return toPlan(row);
}

export async function createRatePlan(db: Db, caller: AuthUser, input: SaveRatePlan, now: Date): Promise<RatePlan> {
  const [row] = await db
    .insert(ratePlans)
    .values({
      organisationId: caller.organisationId,
      name: input.name,
      currency: input.definition.currency,
      definition: input.definition,
      // Dated by the app's clock, as everything it says.
      createdAt: now,
    })
    .returning();
  return toPlan(row!);
}

export async function updateRatePlan(db: Db, caller: AuthUser, id: string, input: SaveRatePlan): Promise<RatePlan> {
  const [row] = await db
    .update(ratePlans)
    .set({ name: input.name, currency: input.definition.currency, definition: input.definition })
    .where(and(eq(ratePlans.id, id), eq(ratePlans.organisationId, caller.organisationId)))
    .returning();
  if (!row) throw notFound('That rate plan');
  return toPlan(row);
}

export async function deleteRatePlan(db: Db, caller: AuthUser, id: string): Promise<void> {
  await getRatePlan(db, caller, id);
  const [used] = await db.select().from(depotRatePlans).where(eq(depotRatePlans.ratePlanId, id)).limit(1);
  if (used) throw new DomainError('conflict', 'A depot uses this rate plan: assign another plan first');
  await db.delete(ratePlans).where(eq(ratePlans.id, id));
}

/** From `effectiveFrom` on, the depot is billed under the plan (replacing one set for that date). */
export async function assignRatePlan(
  db: Db,
  caller: AuthUser,
  depotId: string,
  ratePlanId: string,
  effectiveFrom: string,
): Promise<void> {
  await depotOf(db, caller, depotId);
  await getRatePlan(db, caller, ratePlanId).catch(() => {
    throw new DomainError('validation_failed', "That rate plan is not one of your organisation's", {
      ratePlanId: 'Choose one of your rate plans',
    });
  });
  await db
    .insert(depotRatePlans)
    .values({ organisationId: caller.organisationId, depotId, ratePlanId, effectiveFrom })
    .onConflictDoUpdate({ target: [depotRatePlans.depotId, depotRatePlans.effectiveFrom], set: { ratePlanId } });
}

export async function unassignRatePlan(
  db: Db,
  caller: AuthUser,
  depotId: string,
  effectiveFrom: string,
): Promise<void> {
  await depotOf(db, caller, depotId);
  const gone = await db
    .delete(depotRatePlans)
    .where(and(eq(depotRatePlans.depotId, depotId), eq(depotRatePlans.effectiveFrom, effectiveFrom)))
    .returning({ id: depotRatePlans.id });
  if (!gone.length) throw notFound('That rate plan assignment');
}
