import type { RequestHandler } from 'express';
import { timingSafeEqual } from 'node:crypto';
import { AppError } from '../core/app-error.js';
import { newToken } from '../core/ids.js';

export const XSRF_COOKIE = 'XSRF-TOKEN';
export const XSRF_HEADER = 'x-xsrf-token';
const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

function same(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

/**
 * CSRF defence in Angular's convention (double-submit cookie): a readable `XSRF-TOKEN` cookie,
 * echoed by the client in `X-XSRF-TOKEN` on every state-changing request, login included.
 * A cross-site `Origin` is refused as well.
 */
export function csrfProtection(secure: boolean): RequestHandler {
  return (req, res, next) => {
    // RFC 8058 one-click unsubscribe: mail providers POST without cookies; the signed token is the authority.
    if (req.method === 'POST' && /^\/unsubscribe\/[^/]+$/.test(req.path)) return next();
    let cookie: unknown = req.cookies?.[XSRF_COOKIE];
    if (typeof cookie !== 'string' || cookie.length < 20) {
      cookie = newToken();
      res.cookie(XSRF_COOKIE, cookie, { httpOnly: false, sameSite: 'strict', secure, path: '/' });
      // Only a request that already carried the cookie can pass the check below.
      if (!SAFE.has(req.method)) return next(new AppError(403, 'csrf', 'The security token is missing; reload the page and try again'));
    }
    if (SAFE.has(req.method)) return next();
    const origin = req.get('origin');
    if (origin && origin !== 'null') {
      const host = req.get('host');
      let originHost: string | undefined;
      try {
        originHost = new URL(origin).host;
      } catch {
        originHost = undefined;
      }
      if (!host || originHost !== host) return next(new AppError(403, 'csrf', 'Requests from another site are refused'));
    }
    const header = req.get(XSRF_HEADER);
    if (!header || !same(header, cookie as string)) {
      return next(new AppError(403, 'csrf', 'The security token is missing or wrong; reload the page and try again'));
    }
    next();
  };
}
