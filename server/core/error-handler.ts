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
  if (err instanceof AppError) {
    status = err.status;
    body = { error: { code: err.code, message: err.message, ...(err.details ? { details: err.details } : {}) } };
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
  }
  if (status >= 500) req.log?.error({ err }, 'request failed');
  if (res.headersSent) return;
  res.status(status).json(body);
};
