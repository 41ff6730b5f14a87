import { and, eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { depots } from '../db/schema';
import { notFound } from '../http/errors';
import type { AuthUser } from '../auth/auth-user';

/** The caller's depot or "not found": a depot of another organisation does not exist for them. */
export async function depotOf(db: Db, caller: AuthUser, depotId: string) {
  const [depot] = await db
    .select()
    .from(depots)
    .where(and(eq(depots.id, depotId), eq(depots.organisationId, caller.organisationId)));
  if (!depot) throw notFound('That depot');
  return depot;
}
