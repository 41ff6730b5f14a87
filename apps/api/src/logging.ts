import { pino, type DestinationStream, type Logger } from 'pino';

/**
 * Values a failed query was run with may be secrets (a charger's password hash, a token hash,
 * an e-mail): drizzle puts them in `params` and in its message. Logs keep the query and the
 * database's own error, never the values.
 */
export function scrubError(err: unknown, depth = 0): unknown {
  if (!err || typeof err !== 'object' || depth > 5) return err;
  const e = err as Error & Record<string, unknown>;
  const out: Record<string, unknown> = { type: e.constructor?.name ?? 'Error' };
  for (const key of Object.keys(e)) {
    if (key === 'params' || key === 'parameters' || key === 'values' || key === 'cause') continue;
    out[key] = e[key];
  }
  if (typeof e.message === 'string') out.message = e.message.replace(/\nparams: [\s\S]*$/, '\nparams: [redacted]');
  // PostgreSQL's detail repeats the offending key's value ("Key (token_hash)=(...) already exists").
  if (typeof e.detail === 'string') out.detail = e.detail.replace(/\)=\(.*\)/s, ')=([redacted])');
  if (typeof e.stack === 'string')
    out.stack = e.stack.replace(/\nparams: [\s\S]*?(\n\s+at |$)/, '\nparams: [redacted]$1');
  if (e.cause !== undefined) out.cause = scrubError(e.cause, depth + 1);
  return out;
}

/** Paths that never reach the log whatever a caller passes. */
const REDACT = [
  'req.headers.authorization',
  'req.headers.cookie',
  'password',
  '*.password',
  '*.passwordHash',
  '*.ocppPasswordHash',
  'params',
  '*.params',
  'parameters',
  '*.parameters',
];

export function createLogger(opts: { level: string; service?: string }, destination?: DestinationStream): Logger {
  return pino(
    {
      level: opts.level,
      base: opts.service ? { service: opts.service } : undefined,
      redact: { paths: REDACT, censor: '[redacted]' },
      serializers: { err: (e: unknown) => scrubError(e) },
    },
    destination as DestinationStream,
  );
}
