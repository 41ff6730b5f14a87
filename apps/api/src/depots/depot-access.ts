import { and, eq, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { prepared } from '../db/prepared';
import { depots } from '../db/schema';
import { notFound } from '../http/errors';
import { rememberDepot } from './depot-guess';
import type { AuthUser } from '../auth/auth-user';

// Nearly every depot route asks this first.
const depotQuery = (db: Db, name: string) =>
  db
    .select()
    .from(depots)
    .where(and(eq(depots.id, sql.placeholder('depotId')), eq(depots.organisationId, sql.placeholder('organisationId'))))
    .prepare(name);

/** The caller's depot or "not found": a depot of another organisation does not exist for them. */
export async function depotOf(db: Db, caller: Pick<AuthUser, 'organisationId'>, depotId: string) {
  const [depot] = await prepared(db, 'depot_of', depotQuery).execute({
    depotId,
    organisationId: caller.organisationId,
  });
  if (!depot) throw notFound('That depot');
  rememberDepot(depot);
  return depot;
}
