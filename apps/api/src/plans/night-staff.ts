import { and, eq, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { userDepots, users } from '../db/schema';

/**
 * Who is told when a night's plan is published or revised: the active yard staff and supervisors
 * who can see the depot (the access rule of depot-access.ts, in SQL: administrators see every
 * depot of their organisation, everyone else the depots assigned to them).
 */
export function nightStaff(db: Db, organisationId: string, depotId: string) {
  return db
    .select({ email: users.email, name: users.name, roles: users.roles })
    .from(users)
    .where(
      and(
        eq(users.organisationId, organisationId),
        eq(users.status, 'active'),
        sql`${users.roles} && array['yard','supervisor']::text[]`,
        sql`('admin' = any(${users.roles}) or exists (select 1 from ${userDepots} where ${userDepots.userId} = "users"."id" and ${userDepots.depotId} = ${depotId}))`,
      ),
    );
}
