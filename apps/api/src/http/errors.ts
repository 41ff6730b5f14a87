import type { ErrorCode } from '@nightyard/contracts';

/** A failure the caller can act on. The error handler maps it to HTTP once, by its code. */
export class DomainError extends Error {
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly fields?: Record<string, string>,
    readonly headers?: Record<string, string>,
  ) {
    super(message);
  }
}

export const STATUS_BY_CODE: Record<ErrorCode, number> = {
  bad_request: 400,
  validation_failed: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  token_expired: 410,
  conflict: 409,
  published_meanwhile: 409,
  idempotency_key_reused: 422,
  payload_too_large: 413,
  too_many_requests: 429,
  internal: 500,
  /** A service the API needs (the database) is away for a moment; the caller may retry. */
  unavailable: 503,
};

export const notFound = (what: string) => new DomainError('not_found', `${what} was not found`);
export const forbidden = (message = 'Your role does not allow this') => new DomainError('forbidden', message);
export const unauthenticated = (message = 'Sign in first') => new DomainError('unauthenticated', message);
export const conflict = (message: string) => new DomainError('conflict', message);
