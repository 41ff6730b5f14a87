import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { ErrorBody } from '@nightyard/contracts';
import { isDatabaseUnavailable } from '../db/unavailable';
import { scrubError } from '../logging';
import { DomainError, STATUS_BY_CODE } from './errors';
import { databaseErrorCode } from './database-errors';
import { formatBytes } from './limits';

/** Seconds a caller is asked to wait while the database is away. */
const RETRY_AFTER_SECONDS = 5;

/** Turns every failure into `{ error: { code, message, fields? } }`; never sends a stack trace. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  const body = (code: ErrorBody['error']['code'], message: string, fields?: Record<string, string>): ErrorBody => ({
    error: fields ? { code, message, fields } : { code, message },
  });
  if (err instanceof DomainError) {
    for (const [k, v] of Object.entries(err.headers ?? {})) res.setHeader(k, v);
    res.status(STATUS_BY_CODE[err.code]).json(body(err.code, err.message, err.fields));
    return;
  }
  // Errors raised by body-parser carry a `type` and a status.
  const type = (err as { type?: string }).type;
  if (type === 'entity.parse.failed') {
    res.status(400).json(body('bad_request', 'The request body is not valid JSON'));
    return;
  }
  if (type === 'entity.too.large') {
    const limit = (err as { limit?: number }).limit;
    const message = limit
      ? `The request is larger than ${formatBytes(limit)}: send at most ${formatBytes(limit)}`
      : 'The request body is too large';
    res.status(413).json(body('payload_too_large', message));
    return;
  }
  if (type === 'encoding.unsupported' || type === 'charset.unsupported') {
    res.status(415).json(body('bad_request', 'Send the body as UTF-8 JSON'));
    return;
  }
  if (isDatabaseUnavailable(err)) {
    req.log?.warn({ err: scrubError(err) }, 'database unavailable');
    res.setHeader('Retry-After', String(RETRY_AFTER_SECONDS));
    res
      .status(503)
      .json(
        body('unavailable', 'The database is not reachable just now: nothing was changed; try again in a few seconds'),
      );
    return;
  }
  // Express cannot decode a path parameter with malformed percent-encoding (%E0%A4%A, %ED%A0%80).
  if (err instanceof URIError) {
    res.status(400).json(body('bad_request', 'The address holds malformed percent-encoding: check the link'));
    return;
  }
  // A change made at the same moment took the same unique key: the request is refused whole.
  const pgCode = databaseErrorCode(err);
  if (pgCode === '23505') {
    res
      .status(409)
      .json(body('conflict', 'This conflicts with a change saved at the same moment: reload and try again'));
    return;
  }
  // Class 22 (data exception): a value the contracts should have refused reached the database,
  // e.g. a number beyond a column's range. The statement failed, so it is the caller's 400.
  if (pgCode?.startsWith('22')) {
    req.log?.warn({ err: scrubError(err) }, 'data exception: a contract let a value through');
    res
      .status(400)
      .json(
        body(
          'bad_request',
          'A value in the request cannot be stored (out of range or not valid text): check the numbers and text sent',
        ),
      );
    return;
  }
  // Scrubbed here too, whatever logger the app was given: a failed query's values may be secrets.
  req.log?.error({ err: scrubError(err) }, 'unhandled error');
  res.status(500).json(body('internal', 'Something went wrong on our side; the request was not carried out'));
};

export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json({ error: { code: 'not_found', message: `No API route ${req.method} ${req.path}` } });
};
