import { z } from 'zod';

/** Every API error has this body; `fields` maps a field path to what is wrong with it. */
export const errorBodySchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    fields: z.record(z.string(), z.string()).optional(),
  }),
});
export type ErrorBody = z.infer<typeof errorBodySchema>;

export const ERROR_CODES = [
  'bad_request',
  'validation_failed',
  'unauthenticated',
  'forbidden',
  'not_found',
  'conflict',
  /** Publishing refused because the night's published plan changed while the caller reviewed (409). */
  'published_meanwhile',
  'too_many_requests',
  'payload_too_large',
  'token_expired',
  'idempotency_key_reused',
  'internal',
  'unavailable',
] as const;
export type ErrorCode = (typeof ERROR_CODES)[number];
