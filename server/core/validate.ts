import type { z } from 'zod';
import { AppError } from './app-error.js';

type Where = 'body' | 'query' | 'params';
interface Problem {
  path: string;
  message: string;
}

const NUL = /\u0000/;
/** A UTF-16 surrogate without its partner: no Unicode character, and not storable as UTF-8. */
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

function textProblem(text: string): string | null {
  if (NUL.test(text)) return 'Remove the NUL character (U+0000): text may not contain it';
  if (LONE_SURROGATE.test(text)) return 'The text contains a broken character (a lone UTF-16 surrogate); type or paste it again';
  return null;
}

/**
 * The one rule for every piece of text a client sends, applied to every string (and object key) of a
 * body, query or params before its schema: no NUL character and no lone surrogate, which PostgreSQL
 * cannot store in text or JSON columns (issue 15, item 5). Returns one problem per offending field.
 */
export function textProblems(value: unknown, where: Where): Problem[] {
  const problems: Problem[] = [];
  const walk = (v: unknown, path: string[], depth: number) => {
    if (problems.length >= 20 || depth > 64) return;
    if (typeof v === 'string') {
      const message = textProblem(v);
      if (message) problems.push({ path: [where, ...path].join('.'), message });
    } else if (Array.isArray(v)) {
      v.forEach((x, i) => walk(x, [...path, String(i)], depth + 1));
    } else if (v && typeof v === 'object') {
      for (const [k, x] of Object.entries(v)) {
        const keyMessage = textProblem(k);
        if (keyMessage) problems.push({ path: [where, ...path, k.replace(/[\u0000\uD800-\uDFFF]/g, '\uFFFD')].join('.'), message: `Field name: ${keyMessage}` });
        else walk(x, [...path, k], depth + 1);
      }
    }
  };
  walk(value, [], 0);
  return problems;
}

function refuse(where: Where, details: Problem[]): never {
  throw AppError.invalid(`The request's ${where} is not valid: ${details.map((d) => `${d.path}: ${d.message}`).join('; ')}`, details);
}

/**
 * Parses untrusted input with a zod schema; a failure becomes a 400 that lists every
 * `{ path, message }` (the path is prefixed with where the value came from: body, query, params).
 * Text that cannot be stored (see `textProblems`) is refused first, whatever the schema.
 */
export function parse<S extends z.ZodType>(schema: S, value: unknown, where: Where): z.output<S> {
  const bad = textProblems(value, where);
  if (bad.length) refuse(where, bad);
  const result = schema.safeParse(value ?? {});
  if (result.success) return result.data;
  refuse(
    where,
    result.error.issues.map((issue) => ({ path: [where, ...issue.path.map(String)].join('.'), message: issue.message })),
  );
}
