import { HttpErrorResponse } from '@angular/common/http';
import type { ApiError } from '../../../shared/api-types';

export type ApiErrorBody = ApiError['error'];

/**
 * An HTTP failure normalised into the API's one error shape, so every screen reads
 * `code`, `message` and `details` the same way whatever went wrong on the way.
 */
export class ApiRequestError extends Error implements ApiError {
  override readonly name = 'ApiRequestError';

  constructor(
    readonly status: number,
    readonly error: ApiErrorBody,
    readonly url: string | null = null,
  ) {
    super(error.message);
  }

  get code(): string {
    return this.error.code;
  }

  /** The server's message for one field, if it sent one (see `fieldOfDetail` for how paths match). */
  detailFor(field: string): string | null {
    return this.error.details?.find((d) => fieldOfDetail(d.path) === field)?.message ?? null;
  }
}

/**
 * The form field a detail's `path` names. The server may prefix the part of the request it parsed
 * (`body.email`, `query.limit`); forms only know `email`.
 */
export function fieldOfDetail(path: string): string {
  return path.replace(/^(body|query|params)\./, '');
}

export function isApiErrorBody(body: unknown): body is ApiError {
  if (typeof body !== 'object' || body === null) return false;
  const error = (body as { error?: unknown }).error;
  return (
    typeof error === 'object' &&
    error !== null &&
    typeof (error as { code?: unknown }).code === 'string' &&
    typeof (error as { message?: unknown }).message === 'string'
  );
}

const FALLBACK_MESSAGES: Record<number, [code: string, message: string]> = {
  0: ['network', 'The Netput server could not be reached. Check the connection and try again.'],
  400: ['invalid', 'Some of what was sent is not valid.'],
  401: ['unauthenticated', 'Please sign in again.'],
  403: ['forbidden', 'Your role does not allow this.'],
  404: ['not_found', 'This could not be found. It may have been removed.'],
  409: ['conflict', 'This clashes with something already stored.'],
  410: ['gone', 'This link has expired or has already been used.'],
  429: ['rate_limited', 'Too many attempts. Wait a minute, then try again.'],
};

/** Turns any `HttpErrorResponse` (JSON error body, HTML proxy page, dropped connection) into an `ApiRequestError`. */
export function toApiRequestError(response: HttpErrorResponse): ApiRequestError {
  if (isApiErrorBody(response.error)) {
    return new ApiRequestError(response.status, response.error.error, response.url);
  }
  const known = FALLBACK_MESSAGES[response.status];
  if (known) {
    return new ApiRequestError(response.status, { code: known[0], message: known[1] }, response.url);
  }
  const message =
    response.status >= 500
      ? `The server had a problem (HTTP ${response.status}). Try again; if it keeps happening, tell the co-op's administrator.`
      : `The request failed (HTTP ${response.status}).`;
  return new ApiRequestError(response.status, { code: `http_${response.status}`, message }, response.url);
}

/** Words a person can act on, for any error a screen caught. */
export function errorMessage(error: unknown, fallback = 'Something went wrong. Try again.'): string {
  if (error instanceof ApiRequestError) return error.message;
  if (error instanceof HttpErrorResponse) return toApiRequestError(error).message;
  return fallback;
}

export function errorStatus(error: unknown): number | null {
  if (error instanceof ApiRequestError) return error.status;
  if (error instanceof HttpErrorResponse) return error.status;
  return null;
}
