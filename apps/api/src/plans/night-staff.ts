import { and, eq, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { users } from '../db/schema';

/** Who is told when a night's plan is published or revised: the active yard staff and supervisors. */
export function nightStaff(db: Db, organisationId: string) {
  return db
    .select({ email: users.email, name: users.name, roles: users.roles })
    .from(users)
    .where(
      and(
        eq(users.organisationId, organisationId),
        eq(users.status, 'active'),
        sql`${users.roles} && array['yard','supervisor']::text[]`,
      ),
    );
}
