import { and, eq, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { prepared } from '../db/prepared';
import { depots } from '../db/schema';
import { notFound } from '../http/errors';
import { rememberDepot } from './depot-guess';
import type { AuthUser } from '../auth/auth-user';

/** What the access rule reads of the caller (always with the organisation, which every query scopes by). */
export type DepotViewer = Pick<AuthUser, 'organisationId' | 'roles' | 'depotIds'>;

/** Administrators see every depot of their organisation, whatever they are assigned. */
export const seesEveryDepot = (caller: Pick<AuthUser, 'roles'>): boolean => caller.roles.includes('admin');

/**
 * THE access rule for depots, the only one: administrators see every depot of their organisation,
 * everyone else only the depots assigned to them. It says nothing of the organisation: every
 * query that reads a depot also filters by the caller's organisation, so a depot id of another
 * organisation answers "not found" there, and one not assigned answers the same here.
 */
export function mayOpenDepot(caller: Pick<AuthUser, 'roles' | 'depotIds'>, depotId: string): boolean {
  return seesEveryDepot(caller) || caller.depotIds.includes(depotId);
}

/**
 * Refuses a depot the caller may not see with the same 404 as a depot of another organisation
 * ("That depot", or `what` for a row reached through it, such as a plan), before any query.
 */
export function assertMayOpenDepot(
  caller: Pick<AuthUser, 'roles' | 'depotIds'>,
  depotId: string,
  what = 'That depot',
): void {
  if (!mayOpenDepot(caller, depotId)) throw notFound(what);
}

// Nearly every depot route asks this first.
const depotQuery = (db: Db, name: string) =>
  db
    .select()
    .from(depots)
    .where(and(eq(depots.id, sql.placeholder('depotId')), eq(depots.organisationId, sql.placeholder('organisationId'))))
    .prepare(name);

/**
 * The caller's depot or "not found": a depot of another organisation does not exist for them,
 * nor one they are not assigned to (mayOpenDepot).
 */
export async function depotOf(db: Db, caller: DepotViewer, depotId: string) {
  assertMayOpenDepot(caller, depotId);
  const [depot] = await prepared(db, 'depot_of', depotQuery).execute({
    depotId,
    organisationId: caller.organisationId,
  });
  if (!depot) throw notFound('That depot');
  rememberDepot(depot);
  return depot;
}
