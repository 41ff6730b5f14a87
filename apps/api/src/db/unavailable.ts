/**
 * Whether an error means "the database is away" (restarting, connection cut, refused, timed out)
 * rather than "this query is wrong". Such errors are answered 503 and pass once it is back.
 * Drizzle wraps the driver's error in `cause`, so the whole chain is looked at.
 */
const NETWORK_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  'ENOTFOUND',
  'EHOSTUNREACH',
  'EAI_AGAIN',
]);
// 57P01 admin_shutdown, 57P02 crash_shutdown, 57P03 cannot_connect_now, 53300 too_many_connections.
const SERVER_CODES = new Set(['57P01', '57P02', '57P03', '53300']);
// node-postgres raises these without a code when a connection ends or cannot be had in time.
const DRIVER_MESSAGES =
  /Connection terminated|connection timeout|timeout exceeded when trying to connect|Client has encountered a connection error|Client was closed and is not queryable|Cannot use a pool after calling end/i;

export function isDatabaseUnavailable(err: unknown): boolean {
  const seen = new Set<unknown>();
  for (let e = err; e && typeof e === 'object' && !seen.has(e); e = (e as { cause?: unknown }).cause) {
    seen.add(e);
    const code = (e as { code?: unknown }).code;
    if (typeof code === 'string' && (NETWORK_CODES.has(code) || SERVER_CODES.has(code) || /^08[0-9A-Z]{3}$/.test(code)))
      return true;
    // AggregateError (a host with several addresses, all refused).
    const inner = (e as { errors?: unknown }).errors;
    if (Array.isArray(inner) && inner.some(isDatabaseUnavailable)) return true;
    const message = (e as { message?: unknown }).message;
    if (typeof message === 'string' && DRIVER_MESSAGES.test(message) && !(e as { query?: unknown }).query) return true;
  }
  return false;
}
