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
});
export type User = z.infer<typeof userSchema>;

export const userListSchema = z.object({ users: z.array(userSchema) });

const rolesInput = z
  .array(roleSchema)
  .min(1, 'Choose at least one role')
  .max(5, 'Each role once')
  .refine((r) => new Set(r).size === r.length, 'Each role once');

export const inviteUserRequestSchema = z.strictObject({
  email: emailSchema,
  name: text('The name').trim().min(1, "Enter the person's name").max(120),
  roles: rolesInput,
});
export type InviteUserRequest = z.infer<typeof inviteUserRequestSchema>;

export const updateUserRequestSchema = z
  .strictObject({
    name: text('The name').trim().min(1, "Enter the person's name").max(120).optional(),
    roles: rolesInput.optional(),
    active: z.boolean().optional(),
  })
  .refine((v) => Object.keys(v).length > 0, 'Send at least one of name, roles, active');
export type UpdateUserRequest = z.infer<typeof updateUserRequestSchema>;

export const userIdParamsSchema = z.strictObject({ id: z.uuid('Not a user id') });

export const outboxMessageSchema = z.object({
  id: z.string(),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  receivedAt: z.iso.datetime({ offset: true }),
});
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;
export const outboxSchema = z.object({ messages: z.array(outboxMessageSchema) });
