import { and, asc, eq, inArray, isNull, ne, sql } from 'drizzle-orm';
import {
  depotAssignmentProblem,
  type InviteUserRequest,
  type Role,
  type UpdateUserRequest,
  type User,
} from '@nightyard/contracts';
import type { Db } from '../db/client';
import { depots, organisations, refreshTokens, userDepots, users } from '../db/schema';
import { lockTarget, type Tx } from '../db/locks';
import { DomainError, conflict, notFound } from '../http/errors';
import type { AuthUser } from '../auth/auth-user';
import { createActionToken } from '../auth/auth-service';
import { forgetUser } from '../auth/known-users';
import type { Mailer } from '../mail/mailer';
import { invitationMail } from '../mail/templates';

type UserRow = typeof users.$inferSelect;

const toUser = (u: UserRow, depotIds: readonly string[]): User => ({
  id: u.id,
  email: u.email,
  name: u.name,
  roles: u.roles,
  status: u.status,
  createdAt: u.createdAt.toISOString(),
  lastSignInAt: u.lastSignInAt?.toISOString() ?? null,
  depotIds: [...depotIds].sort(),
});

/** A person's depots, read beside the person (qualified by hand: inside the subquery a bare "id" is ambiguous). */
const depotIdsColumn = sql<
  string[]
>`coalesce((select array_agg(ud.depot_id::text order by ud.depot_id) from ${userDepots} ud where ud.user_id = "users"."id"), '{}'::text[])`;

export async function listUsers(db: Db, caller: AuthUser): Promise<User[]> {
  const rows = await db
    .select({ user: users, depotIds: depotIdsColumn })
    .from(users)
    .where(eq(users.organisationId, caller.organisationId))
    .orderBy(asc(users.name));
  return rows.map((r) => toUser(r.user, r.depotIds));
}

/**
 * Replaces a person's depots after checking them: the roles allow them (depotAssignmentProblem,
 * the rule the contracts give the web app too) and each depot is one of the organisation's.
 * Runs inside the caller's transaction, serialised per person (lockTarget), so two edits of one
 * person's depots queue instead of mixing; the depots' rows are locked (FOR SHARE) so none is
 * removed under the assignment. The user cache hears of it from the table's trigger (0016).
 */
async function replaceDepots(
  tx: Tx,
  organisationId: string,
  userId: string,
  roles: readonly Role[],
  depotIds: readonly string[],
): Promise<void> {
  await lockTarget(tx, 'user-depots', userId);
  await checkDepots(tx, organisationId, roles, depotIds);
  await tx.delete(userDepots).where(eq(userDepots.userId, userId));
  if (depotIds.length) await tx.insert(userDepots).values(depotIds.map((depotId) => ({ userId, depotId })));
}

async function checkDepots(
  tx: Tx,
  organisationId: string,
  roles: readonly Role[],
  depotIds: readonly string[],
): Promise<void> {
  const problem = depotAssignmentProblem(roles, depotIds);
  if (problem) throw new DomainError('validation_failed', problem, { depotIds: problem });
  if (!depotIds.length) return;
  const found = await tx
    .select({ id: depots.id })
    .from(depots)
    .where(and(eq(depots.organisationId, organisationId), inArray(depots.id, [...depotIds])))
    .for('share');
  const known = new Set(found.map((d) => d.id));
  const missing = depotIds.find((d) => !known.has(d));
  if (missing) {
    // Said the same way whether the depot belongs to another organisation or to none.
    const message = `Depot ${missing} is not a depot of your organisation: choose among your depots`;
    throw new DomainError('validation_failed', message, { depotIds: message });
  }
}

async function depotIdsOf(tx: Tx | Db, userId: string): Promise<string[]> {
  const rows = await tx.select({ id: userDepots.depotId }).from(userDepots).where(eq(userDepots.userId, userId));
  return rows.map((r) => r.id);
}

export interface InviteSettings {
  inviteHours: number;
  publicUrl: (path: string) => string;
}

const cannotInvite = () =>
  new DomainError('conflict', 'That e-mail address cannot be invited: use another address for this person', {
    email: 'Cannot be invited',
  });

/** Creates an invited account (or re-sends a pending invitation) and e-mails the link. */
export async function inviteUser(
  db: Db,
  mailer: Mailer,
  s: InviteSettings,
  caller: AuthUser,
  req: InviteUserRequest,
  now: Date,
): Promise<User> {
  const { user, token } = await db.transaction(async (tx) => {
    // Invitations to one address wait for each other, so the same invitation sent twice at once
    // creates one account (the second re-sends the invitation) instead of a unique violation.
    await lockTarget(tx, 'invite', req.email);
    const [existing] = await tx.select().from(users).where(eq(users.email, req.email));
    if (existing && existing.organisationId === caller.organisationId && existing.status !== 'invited') {
      throw new DomainError('conflict', 'Someone in your organisation already has an account with this e-mail', {
        email: 'Already in use',
      });
    }
    // E-mail addresses are unique across the service (they sign in without naming an organisation);
    // an address used elsewhere is refused without saying where or by whom.
    if (existing && existing.organisationId !== caller.organisationId) throw cannotInvite();
    const row = existing
      ? (
          await tx.update(users).set({ name: req.name, roles: req.roles }).where(eq(users.id, existing.id)).returning()
        )[0]!
      : (
          await tx
            .insert(users)
            .values({
              organisationId: caller.organisationId,
              email: req.email,
              name: req.name,
              roles: req.roles,
              status: 'invited',
              // Dated by the app's clock, as everything it says.
              createdAt: now,
            })
            .returning()
        )[0]!;
    await replaceDepots(tx, caller.organisationId, row.id, req.roles, req.depotIds);
    return {
      user: row,
      token: await createActionToken(tx as unknown as Db, row.id, 'invite', s.inviteHours * 3_600_000, now),
    };
  });
  const [org] = await db
    .select({ name: organisations.name })
    .from(organisations)
    .where(eq(organisations.id, caller.organisationId));
  await mailer.send(
    invitationMail({
      to: user.email,
      name: user.name,
      inviter: caller.name,
      organisation: org?.name ?? '',
      link: s.publicUrl(`/set-password?token=${token}`),
      hours: s.inviteHours,
    }),
  );
  return toUser(user, req.depotIds);
}

async function activeAdminsOtherThan(db: Db, organisationId: string, userId: string): Promise<number> {
  const [row] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(users)
    .where(
      and(
        eq(users.organisationId, organisationId),
        ne(users.id, userId),
        eq(users.status, 'active'),
        sql`'admin' = any(${users.roles})`,
      ),
    );
  return row?.n ?? 0;
}

export async function updateUser(
  db: Db,
  caller: AuthUser,
  id: string,
  req: UpdateUserRequest,
  now: Date,
): Promise<User> {
  const updated = await db.transaction(async (tx) => {
    const [user] = await tx
      .select()
      .from(users)
      .where(and(eq(users.id, id), eq(users.organisationId, caller.organisationId)))
      .for('update');
    if (!user) throw notFound('That user');
    // Serialise admin changes per organisation so two admins cannot remove each other at once.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${caller.organisationId}))`);
    const losesAdmin =
      user.roles.includes('admin') &&
      user.status === 'active' &&
      ((req.roles && !req.roles.includes('admin')) || req.active === false);
    if (losesAdmin && (await activeAdminsOtherThan(tx as unknown as Db, caller.organisationId, id)) === 0) {
      throw conflict(
        'The organisation needs at least one active administrator: give someone else the admin role first',
      );
    }
    // The roles and depots the person will have; checked together whenever either is edited.
    let depotIds = await depotIdsOf(tx, id);
    if (req.roles || req.depotIds) {
      depotIds = req.depotIds ? [...req.depotIds] : depotIds;
      if (req.depotIds) await replaceDepots(tx, caller.organisationId, id, req.roles ?? user.roles, depotIds);
      else await checkDepots(tx, caller.organisationId, req.roles!, depotIds);
    }
    const status =
      req.active === undefined ? user.status : req.active ? (user.passwordHash ? 'active' : 'invited') : 'deactivated';
    const [updated] = await tx
      .update(users)
      .set({ name: req.name ?? user.name, roles: req.roles ?? user.roles, status })
      .where(eq(users.id, id))
      .returning();
    if (status === 'deactivated') {
      await tx
        .update(refreshTokens)
        .set({ revokedAt: now })
        .where(and(eq(refreshTokens.userId, id), isNull(refreshTokens.revokedAt)));
    }
    return toUser(updated!, depotIds);
  });
  // Committed: the next request of this user must see the change (see known-users.ts).
  forgetUser(id);
  return updated;
}
