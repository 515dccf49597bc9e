/**
 * CSRF defence in Angular's convention: a readable `XSRF-TOKEN` cookie, echoed by the client in
 * `X-XSRF-TOKEN` on every state-changing request (sign-in included), plus a refusal of cross-site
 * `Origin`s. The token is not a bare random value that any cookie/header pair could match: it is
 * `<nonce>.<HMAC-SHA256(server secret, binding, nonce)>`, bound to the caller's session (the
 * stored hash of the session id) or, before sign-in, to a random pre-session value in the httpOnly
 * `netput_pre` cookie. A page can only send a token the server issued for that same browser and
 * session; a token chosen by someone else, or issued to another session, is refused (issue 15,
 * item 11). Each sign-in and sign-out gets a new token in the same response.
 */
import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler, Response } from 'express';
import { AppError } from '../core/app-error.js';
import { sha256 } from '../core/tokens.js';
import { storedSecret } from '../core/secrets.js';
import type { Db } from '../db/client.js';

export const XSRF_COOKIE = 'XSRF-TOKEN';
export const XSRF_HEADER = 'x-xsrf-token';
export const PRE_SESSION_COOKIE = 'netput_pre';
const CSRF_SECRET_KEY = 'security.csrf-secret';
const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);
const TOKEN = /^([A-Za-z0-9_-]{22})\.([A-Za-z0-9_-]{43})$/;

const secrets = new WeakMap<Db, Promise<Buffer>>();
function secretOf(db: Db): Promise<Buffer> {
  let s = secrets.get(db);
  if (!s) {
    s = storedSecret(db, CSRF_SECRET_KEY);
    s.catch(() => secrets.delete(db));
    secrets.set(db, s);
  }
  return s;
}

function mac(secret: Buffer, binding: string, nonce: string): Buffer {
  return createHmac('sha256', secret).update(`netput-csrf:${binding}:${nonce}`).digest();
}

export function signCsrfToken(secret: Buffer, binding: string): string {
  const nonce = randomBytes(16).toString('base64url');
  return `${nonce}.${mac(secret, binding, nonce).toString('base64url')}`;
}

export function verifyCsrfToken(secret: Buffer, binding: string, token: unknown): boolean {
  if (typeof token !== 'string') return false;
  const m = TOKEN.exec(token);
  if (!m) return false;
  const given = Buffer.from(m[2]!, 'base64url');
  const expected = mac(secret, binding, m[1]!);
  return given.length === expected.length && timingSafeEqual(given, expected);
}

/** What a token is bound to: the session when there is one, else the pre-session value. */
const sessionBinding = (sessionId: string) => `s:${sessionId}`;
const preSessionBinding = (pre: string) => `p:${sha256(pre)}`;

function setTokenCookie(res: Response, token: string, secure: boolean) {
  res.cookie(XSRF_COOKIE, token, { httpOnly: false, sameSite: 'strict', secure, path: '/' });
}

/** The caller's pre-session value, made (and its httpOnly cookie set) when it has none. */
function preSession(req: Request, res: Response, secure: boolean): string {
  const pre: unknown = req.cookies?.[PRE_SESSION_COOKIE];
  if (typeof pre === 'string' && /^[A-Za-z0-9_-]{43}$/.test(pre)) return pre;
  const fresh = randomBytes(32).toString('base64url');
  res.cookie(PRE_SESSION_COOKIE, fresh, { httpOnly: true, sameSite: 'lax', secure, path: '/' });
  if (req.cookies) req.cookies[PRE_SESSION_COOKIE] = fresh;
  return fresh;
}

/** After sign-in: a token bound to the new session, in the same response. */
export async function issueSessionCsrfToken(db: Db, res: Response, sessionId: string, secure: boolean) {
  setTokenCookie(res, signCsrfToken(await secretOf(db), sessionBinding(sessionId)), secure);
}

/** After sign-out: a token bound to the browser's pre-session value again. */
export async function issuePreSessionCsrfToken(db: Db, req: Request, res: Response, secure: boolean) {
  setTokenCookie(res, signCsrfToken(await secretOf(db), preSessionBinding(preSession(req, res, secure))), secure);
}

export function csrfProtection(db: Db, secure: boolean): RequestHandler {
  return async (req, res, next) => {
    // RFC 8058 one-click unsubscribe: mail providers POST without cookies; the signed token in the address is the authority.
    if (req.method === 'POST' && /^\/unsubscribe\/[^/]+$/.test(req.path)) return next();
    // The payment service's webhooks carry no cookies; their signature (checked by the route) is the authority.
    if (req.method === 'POST' && req.path === '/payments/webhook') return next();
    const secret = await secretOf(db);
    const binding = req.sessionId ? sessionBinding(req.sessionId) : preSessionBinding(preSession(req, res, secure));
    const cookieValid = verifyCsrfToken(secret, binding, req.cookies?.[XSRF_COOKIE]);
    // A missing, foreign or outdated cookie is replaced, so the page's next request can pass.
    if (!cookieValid) setTokenCookie(res, signCsrfToken(secret, binding), secure);
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
    if (!header) return next(new AppError(403, 'csrf', 'The security token is missing; reload the page and try again'));
    if (!verifyCsrfToken(secret, binding, header)) {
      return next(new AppError(403, 'csrf', 'The security token does not belong to this session; reload the page and try again'));
    }
    next();
  };
}
