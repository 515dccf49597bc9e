import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import { z } from 'zod';
import { loginSchema, passwordResetRequestSchema, setPasswordSchema } from '../../shared/schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { AppError } from '../core/app-error.js';
import type { AppContext } from '../context.js';
import { checkCredentials, findUserByEmail, meOf, redeemToken, tokenInfo } from './auth-service.js';
import { mailOneTimeLink } from './link-mail.js';
import { endSession, SESSION_COOKIE, startSession } from './session.js';
import { issuePreSessionCsrfToken } from './csrf.js';
import { DatabaseRateLimitStore } from './rate-limit-store.js';

const tokenParams = z.object({ token: z.string().min(20).max(100).regex(/^[A-Za-z0-9_-]+$/, 'Not a valid link') });

export function authRoutes(ctx: AppContext): RouteDef[] {
  // Per client address and e-mail: 10 failed attempts in 15 minutes (the account lockout covers
  // spread-out guessing). A sign-in that succeeds is not counted, so a person who signs in and out
  // often during a working day is never locked out by their own successes.
  const loginLimiter = rateLimit({
    windowMs: 15 * 60_000,
    limit: 10,
    skipSuccessfulRequests: true,
    store: new DatabaseRateLimitStore(ctx.db, 'login:'),
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${String((req.body as { email?: unknown })?.email ?? '').toLowerCase().slice(0, 254)}`,
    handler: (_req, _res, next) => next(new AppError(429, 'rate_limited', 'Too many sign-in attempts; wait 15 minutes and try again')),
  });
  const resetLimiter = rateLimit({
    windowMs: 15 * 60_000,
    limit: 5,
    store: new DatabaseRateLimitStore(ctx.db, 'reset:'),
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, _res, next) => next(new AppError(429, 'rate_limited', 'Too many requests; wait 15 minutes and try again')),
  });
  const secure = ctx.config.secureCookies;

  return [
    { method: 'get', path: '/csrf', access: 'public', handler: (_req, res) => res.status(204).end() },
    {
      method: 'post',
      path: '/login',
      access: 'public',
      handler: async (req, res, next) => {
        // Validated first, so the limiter's key (address and e-mail) is always storable text.
        const body = parse(loginSchema, req.body, 'body');
        await new Promise<void>((resolve, reject) => loginLimiter(req, res, (err?: unknown) => (err ? reject(err) : resolve())));
        if (res.headersSent) return;
        const userId = await checkCredentials(ctx.db, body.email, body.password);
        await endSession(ctx.db, req.sessionId);
        await startSession(ctx.db, res, userId, req.get('user-agent'), secure);
        res.json({ user: await meOf(ctx.db, userId) });
      },
    },
    {
      method: 'post',
      path: '/logout',
      access: 'signed-in',
      handler: async (req, res) => {
        await endSession(ctx.db, req.sessionId);
        res.clearCookie(SESSION_COOKIE, { path: '/' });
        await issuePreSessionCsrfToken(ctx.db, req, res, secure);
        res.status(204).end();
      },
    },
    { method: 'get', path: '/me', access: 'signed-in', cache: true, handler: async (req, res) => res.json(await meOf(ctx.db, req.user!.id)) },
    // The app's start-up probe: being signed out is a normal state, so it answers 200 `{ user: null }`
    // rather than the 401 of /me, which a browser would log on every signed-out page.
    { method: 'get', path: '/session', access: 'public', cache: true, handler: async (req, res) => res.json({ user: req.user ? await meOf(ctx.db, req.user.id) : null }) },
    {
      method: 'post',
      path: '/password-reset',
      access: 'public',
      handler: async (req, res) => {
        await new Promise<void>((resolve, reject) => resetLimiter(req, res, (err?: unknown) => (err ? reject(err) : resolve())));
        if (res.headersSent) return;
        const { email } = parse(passwordResetRequestSchema, req.body, 'body');
        const user = await findUserByEmail(ctx.db, email);
        // The answer is the same whether or not the account exists (or the mail went out), so it
        // tells nobody which addresses have accounts; a failed message is logged for the admin.
        if (user?.active) await mailOneTimeLink(ctx, user, 'reset').catch((err: unknown) => req.log?.error({ err }, 'reset mail failed'));
        res.status(202).json({ message: 'If an account exists for this address, a link to choose a new password is on its way.' });
      },
    },
    {
      method: 'get',
      path: '/tokens/:token',
      access: 'public',
      handler: async (req, res) => {
        const { token } = parse(tokenParams, req.params, 'params');
        res.json(await tokenInfo(ctx.db, token));
      },
    },
    {
      method: 'post',
      path: '/tokens/:token',
      access: 'public',
      handler: async (req, res) => {
        const { token } = parse(tokenParams, req.params, 'params');
        const { password } = parse(setPasswordSchema, req.body, 'body');
        const userId = await redeemToken(ctx.db, token, password);
        await endSession(ctx.db, req.sessionId);
        await startSession(ctx.db, res, userId, req.get('user-agent'), secure);
        res.json({ user: await meOf(ctx.db, userId) });
      },
    },
  ];
}
