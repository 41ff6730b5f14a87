import { z } from 'zod';
import { roleSchema } from './role-schema';
import { text } from './text';

export const PASSWORD_MIN_LENGTH = 12;

export const emailSchema = text('The e-mail address')
  .trim()
  .toLowerCase()
  .max(254, 'An e-mail address has at most 254 characters')
  .pipe(z.email('Enter an e-mail address such as name@example.org'));

export const passwordSchema = text('The password')
  .min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters`)
  .max(200, 'Use at most 200 characters');

export const loginRequestSchema = z.strictObject({
  email: emailSchema,
  password: text('The password').min(1, 'Enter your password').max(200),
});
export type LoginRequest = z.infer<typeof loginRequestSchema>;

export const organisationSchema = z.object({ id: z.uuid(), name: z.string() });

export const userStatusSchema = z.enum(['active', 'invited', 'deactivated']);
export type UserStatus = z.infer<typeof userStatusSchema>;

export const sessionUserSchema = z.object({
  id: z.uuid(),
  email: z.string(),
  name: z.string(),
  roles: z.array(roleSchema),
  organisation: organisationSchema,
});
export type SessionUser = z.infer<typeof sessionUserSchema>;

export const tokenResponseSchema = z.object({
  accessToken: z.string(),
  expiresInSeconds: z.number().int(),
  user: sessionUserSchema,
});
export type TokenResponse = z.infer<typeof tokenResponseSchema>;

export const meResponseSchema = z.object({ user: sessionUserSchema });

export const forgotPasswordRequestSchema = z.strictObject({ email: emailSchema });

export const setPasswordRequestSchema = z.strictObject({
  token: text('The link').min(20, 'The link is incomplete').max(200),
  password: passwordSchema,
});
export type SetPasswordRequest = z.infer<typeof setPasswordRequestSchema>;

export const actionTokenInfoSchema = z.object({
  email: z.string(),
  name: z.string(),
  purpose: z.enum(['invite', 'reset']),
  expiresAt: z.iso.datetime({ offset: true }),
});
export type ActionTokenInfo = z.infer<typeof actionTokenInfoSchema>;
