import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { ApiError } from '../../shared/api-types.js';
import { AppError } from './app-error.js';

export const notFoundHandler: RequestHandler = (req, res) => {
  const body: ApiError = { error: { code: 'not_found', message: `No API route ${req.method} ${req.path}` } };
  res.status(404).json(body);
};

/** The one error handler: every failure answers the shared JSON shape; no stack reaches a client. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  let status = 500;
  let body: ApiError = { error: { code: 'internal', message: 'Something went wrong on the server; it has been logged.' } };
  const pgCode = postgresErrorCode(err);
  if (pgCode === '23503' || pgCode === '23001') {
    status = 409;
    body = { error: { code: 'in_use', message: 'This record is still used by other records (prices, farm records or models); remove those first' } };
  } else if (pgCode === '23505') {
    status = 409;
    body = { error: { code: 'conflict', message: 'A record with the same key already exists' } };
  } else if (err instanceof AppError) {
    status = err.status;
    const current = (err as AppError & { current?: unknown }).current;
    body = { error: { code: err.code, message: err.message, ...(err.details ? { details: err.details } : {}), ...(current !== undefined ? { current } : {}) } };
  } else if (err && typeof err === 'object' && 'type' in err && typeof err.status === 'number' && err.status < 500) {
    // body-parser errors: entity.too.large, entity.parse.failed, ...
    status = err.status;
    const code = err.type === 'entity.too.large' ? 'too_large' : 'invalid';
    const message =
      err.type === 'entity.too.large'
        ? 'The request body is larger than the server accepts'
        : err.type === 'entity.parse.failed'
          ? 'The request body is not valid JSON'
          : String(err.message ?? 'Bad request');
    body = { error: { code, message } };
  } else if (err instanceof URIError || (err && typeof err === 'object' && typeof err.status === 'number' && err.status >= 400 && err.status < 500)) {
    // The router's own refusals, e.g. a path segment whose percent-encoding is not valid UTF-8.
    status = typeof err.status === 'number' ? err.status : 400;
    const decoding = err instanceof URIError || /decode/i.test(String(err.message));
    const message = decoding ? 'The address contains characters that are not valid (broken percent-encoding); check the link' : String(err.message || 'Bad request');
    body = { error: { code: 'invalid', message } };
  }
  if (status >= 500) req.log?.error({ err }, 'request failed');
  if (res.headersSent) return;
  res.status(status).json(body);
};

/** PostgreSQL's SQLSTATE of a failed query (Drizzle wraps the driver's error in `cause`). */
export function postgresErrorCode(err: unknown): string | undefined {
  for (let e = err as { code?: unknown; cause?: unknown } | undefined, depth = 0; e && depth < 4; e = e.cause as typeof e, depth++) {
    if (typeof e.code === 'string' && /^[0-9A-Z]{5}$/.test(e.code)) return e.code;
  }
  return undefined;
}
