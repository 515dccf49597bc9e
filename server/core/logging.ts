/**
 * The request log: pino through pino-http, with what must not be written down taken out (issue 15,
 * item 11). Redacted paths: the session and pre-session cookies, the CSRF header and every
 * Set-Cookie. A serializer for errors replaces e-mail addresses in messages, stacks, causes and any
 * text fields (a failed query's text lists its parameters, e.g. the address someone signed in with).
 */
import type { DestinationStream } from 'pino';
import { pino, stdSerializers } from 'pino';
import { pinoHttp } from 'pino-http';

const EMAIL = /[A-Za-z0-9._%+-]+@[A-Za-z0-9-]+(\.[A-Za-z0-9-]+)*\.[A-Za-z]{2,}/g;
export const REDACTED_EMAIL = '[e-mail]';

export function redactEmails(text: string): string {
  return text.replace(EMAIL, REDACTED_EMAIL);
}

function scrub(value: unknown, depth = 0): unknown {
  if (typeof value === 'string') return redactEmails(value);
  if (depth > 6 || value === null || typeof value !== 'object') return value;
  if (Array.isArray(value)) return value.map((v) => scrub(v, depth + 1));
  return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, scrub(v, depth + 1)]));
}

/** pino's error serializer (with the cause chain), then every string in it with e-mail addresses replaced. */
export function errSerializer(err: unknown): unknown {
  return err instanceof Error ? scrub(stdSerializers.errWithCause(err)) : scrub(err);
}

export const LOG_REDACT_PATHS = [
  'req.headers.cookie',
  'req.headers["x-xsrf-token"]',
  'res.headers["set-cookie"]',
  // Errors logged with a request attached, e.g. by a job or a custom log line.
  'headers.cookie',
  'headers["x-xsrf-token"]',
];

export function createLogger(level: string, destination?: DestinationStream) {
  return pino({ level, serializers: { err: errSerializer }, redact: { paths: LOG_REDACT_PATHS, censor: '[redacted]' } }, destination);
}

/** The request-logging middleware of the API. */
export function requestLogging(level: string, destination?: DestinationStream) {
  return pinoHttp({
    logger: createLogger(level, destination),
    autoLogging: { ignore: (req) => !req.url?.startsWith('/api') },
    serializers: { err: errSerializer },
    redact: { paths: LOG_REDACT_PATHS, censor: '[redacted]' },
  });
}
