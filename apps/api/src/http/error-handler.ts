import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { ErrorBody } from '@nightyard/contracts';
import { DomainError, STATUS_BY_CODE } from './errors';
import { formatBytes } from './limits';

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
    const message = limit ? `The request is larger than ${formatBytes(limit)}: send at most ${formatBytes(limit)}` : 'The request body is too large';
    res.status(413).json(body('payload_too_large', message));
    return;
  }
  if (type === 'encoding.unsupported' || type === 'charset.unsupported') {
    res.status(415).json(body('bad_request', 'Send the body as UTF-8 JSON'));
    return;
  }
  req.log?.error({ err }, 'unhandled error');
  res.status(500).json(body('internal', 'Something went wrong on our side; the request was not carried out'));
};

export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json({ error: { code: 'not_found', message: `No API route ${req.method} ${req.path}` } });
};
