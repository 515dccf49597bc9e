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
  static gone(message: string) {
    return new AppError(410, 'gone', message);
  }
  static unprocessable(message: string, details?: { path: string; message: string }[]) {
    return new AppError(422, 'unprocessable', message, details);
  }
}
