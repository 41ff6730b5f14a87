import { z } from 'zod';
import { emailSchema, userStatusSchema } from './auth';
import { roleSchema } from './role-schema';
import { text } from './text';

export const userSchema = z.object({
  id: z.uuid(),
  email: z.string(),
  name: z.string(),
  roles: z.array(roleSchema),
  status: userStatusSchema,
  createdAt: z.iso.datetime({ offset: true }),
  lastSignInAt: z.iso.datetime({ offset: true }).nullable(),
  /**
   * The depots the person is assigned to. Administrators see every depot of the organisation
   * whatever this holds; everyone else sees only these.
   */
  depotIds: z.array(z.uuid()),
});
export type User = z.infer<typeof userSchema>;

export const userListSchema = z.object({ users: z.array(userSchema) });

const rolesInput = z
  .array(roleSchema)
  .min(1, 'Choose at least one role')
  .max(5, 'Each role once')
  .refine((r) => new Set(r).size === r.length, 'Each role once');

/** At most this many depots per person (a district's worth). */
export const MAX_DEPOTS_PER_PERSON = 100;

const depotIdsInput = z
  .array(z.uuid('Not a depot id'))
  .max(MAX_DEPOTS_PER_PERSON, `Assign at most ${MAX_DEPOTS_PER_PERSON} depots`)
  .refine((d) => new Set(d).size === d.length, 'Each depot once');

/**
 * Who may hold which depots: yard staff work at one depot; administrators see them all (an empty
 * list is fine for them); everyone else needs at least one.
 */
export function depotAssignmentProblem(roles: readonly string[], depotIds: readonly string[]): string | null {
  const yardOnly = roles.length > 0 && roles.every((r) => r === 'yard');
  if (yardOnly && depotIds.length !== 1) return 'Yard staff work at one depot: choose exactly one';
  if (!roles.includes('admin') && depotIds.length === 0) return 'Choose at least one depot';
  return null;
}

export const inviteUserRequestSchema = z
  .strictObject({
    email: emailSchema,
    name: text('The name').trim().min(1, "Enter the person's name").max(120),
    roles: rolesInput,
    depotIds: depotIdsInput,
  })
  .superRefine((v, ctx) => {
    const problem = depotAssignmentProblem(v.roles, v.depotIds);
    if (problem) ctx.addIssue({ code: 'custom', path: ['depotIds'], message: problem });
  });
export type InviteUserRequest = z.infer<typeof inviteUserRequestSchema>;

export const updateUserRequestSchema = z
  .strictObject({
    name: text('The name').trim().min(1, "Enter the person's name").max(120).optional(),
    roles: rolesInput.optional(),
    active: z.boolean().optional(),
    /** Replaces the person's depots (checked against their roles, new or kept, by the API). */
    depotIds: depotIdsInput.optional(),
  })
  .refine((v) => Object.keys(v).length > 0, 'Send at least one of name, roles, active, depotIds');
export type UpdateUserRequest = z.infer<typeof updateUserRequestSchema>;

export const userIdParamsSchema = z.strictObject({ id: z.uuid('Not a user id') });

export const outboxMessageSchema = z.object({
  id: z.string(),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  /** The date the app put on the message, by its own clock (null from a sender that gave none). */
  sentAt: z.iso.datetime({ offset: true }).nullable(),
  /** When the mail server took it, by the server's clock. */
  receivedAt: z.iso.datetime({ offset: true }),
});
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;
export const outboxSchema = z.object({ messages: z.array(outboxMessageSchema) });
