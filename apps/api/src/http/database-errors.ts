/**
 * The PostgreSQL SQLSTATE of a failed query (e.g. 23505 unique violation), whether pg's error
 * arrives as is or wrapped by Drizzle (as its `cause`); undefined for any other error.
 */
export function databaseErrorCode(err: unknown): string | undefined {
  for (let e = err, depth = 0; e && typeof e === 'object' && depth < 4; e = (e as { cause?: unknown }).cause, depth++) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === 'string' && /^[0-9A-Z]{5}$/.test(code)) return code;
  }
  return undefined;
}

export const isUniqueViolation = (err: unknown) => databaseErrorCode(err) === '23505';
