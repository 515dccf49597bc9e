/** An error a client can act on: it carries the HTTP status and the code of the JSON error shape. */
export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: { path: string; message: string }[],
  ) {
    super(message);
    this.name = 'AppError';
  }

  static invalid(message: string, details?: { path: string; message: string }[]) {
    return new AppError(400, 'invalid', message, details);
  }
  static unauthenticated(message = 'Sign in to continue') {
    return new AppError(401, 'unauthenticated', message);
  }
  static forbidden(message = 'Your role may not do this') {
    return new AppError(403, 'forbidden', message);
  }
  static notFound(what = 'The record') {
    return new AppError(404, 'not_found', `${what} was not found`);
  }
  static conflict(message: string) {
    return new AppError(409, 'conflict', message);
  }
  /**
   * 409 `stale`: the save named a version that is no longer the stored one; `current` is what is
   * stored now, answered with the error so the client can show it.
   */
  static stale(message: string, current: unknown) {
    return Object.assign(new AppError(409, 'stale', message), { current });
  }
  /** 422 `needs_confirmation`: values that may be slips; the same request with the confirm flag stores them. */
  static needsConfirmation(message: string, details: { path: string; message: string }[]) {
    return new AppError(422, 'needs_confirmation', message, details);
  }
  static gone(message: string) {
    return new AppError(410, 'gone', message);
  }
  static unprocessable(message: string, details?: { path: string; message: string }[]) {
    return new AppError(422, 'unprocessable', message, details);
  }
}
