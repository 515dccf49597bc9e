import type { z } from 'zod';
import { AppError } from './app-error.js';

/**
 * Parses untrusted input with a zod schema; a failure becomes a 400 that lists every
 * `{ path, message }` (the path is prefixed with where the value came from: body, query, params).
 */
export function parse<S extends z.ZodType>(schema: S, value: unknown, where: 'body' | 'query' | 'params'): z.output<S> {
  const result = schema.safeParse(value ?? {});
  if (result.success) return result.data;
  const details = result.error.issues.map((issue) => ({
    path: [where, ...issue.path.map(String)].join('.'),
    message: issue.message,
  }));
  throw AppError.invalid(`The request's ${where} is not valid: ${details.map((d) => `${d.path}: ${d.message}`).join('; ')}`, details);
}
