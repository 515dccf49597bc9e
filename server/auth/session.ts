import type { CookieOptions, RequestHandler, Response } from 'express';
import { and, eq, gt, lt } from 'drizzle-orm';
import type { Role } from '../../shared/roles.js';
import type { Db } from '../db/client.js';
import { sessions, users } from '../db/schema/index.js';
import { newToken, sha256 } from '../core/tokens.js';
import type { ChangeTracker } from '../db/change-tracker.js';
import { issueSessionCsrfToken } from './csrf.js';

export const SESSION_COOKIE = 'netput_sid';
/** Sessions end after 12 hours without use, and after 7 days in any case. */
const IDLE_MS = 12 * 3600_000;
const ABSOLUTE_MS = 7 * 24 * 3600_000;

export interface SessionUser {
  id: number;
  email: string;
  name: string;
  role: Role;
  farmId: number | null;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      user?: SessionUser;
      sessionId?: string;
    }
  }
}

export function sessionCookieOptions(secure: boolean): CookieOptions {
  return { httpOnly: true, sameSite: 'lax', secure, path: '/', maxAge: ABSOLUTE_MS };
}

/**
 * Starts a fresh session (a new id every sign-in), sets its cookie and a CSRF token bound to it.
 * Returns the session's stored id.
 */
export async function startSession(db: Db, res: Response, userId: number, userAgent: string | undefined, secure: boolean): Promise<string> {
  const token = newToken();
  const id = sha256(token);
  await db.insert(sessions).values({
    id,
    userId,
    expiresAt: new Date(Date.now() + ABSOLUTE_MS),
    userAgent: userAgent?.slice(0, 300),
  });
  res.cookie(SESSION_COOKIE, token, sessionCookieOptions(secure));
  await issueSessionCsrfToken(db, res, id, secure);
  return id;
}

export async function endSession(db: Db, sessionId: string | undefined) {
  if (sessionId) await db.delete(sessions).where(eq(sessions.id, sessionId));
}

interface CachedSession {
  user: SessionUser;
  lastSeenAt: number;
  expiresAt: number;
  tables: Set<string>;
  since: number;
}
const MAX_CACHED_SESSIONS = 10_000;

/**
 * Loads `req.user` from the session cookie; an expired, idle or deactivated session is dropped.
 * With a change tracker (PGlite), a session found in the last minute is taken from memory while
 * no session, user or farm row has been written since: signing out, a role change or a
 * deactivation is a write, so it takes effect on the next request.
 */
export function loadSession(db: Db, changes: ChangeTracker | null = null): RequestHandler {
  const cache = new Map<string, CachedSession>();
  return async (req, res, next) => {
    const token: unknown = req.cookies?.[SESSION_COOKIE];
    if (typeof token !== 'string' || token.length < 20 || token.length > 100) return next();
    const id = sha256(token);
    const now = new Date();
    const hit = cache.get(id);
    if (hit && changes && now.getTime() < hit.expiresAt && now.getTime() - hit.lastSeenAt <= 60_000 && changes.unchangedSince(hit.tables, hit.since)) {
      req.user = hit.user;
      req.sessionId = id;
      return next();
    }
    if (hit) cache.delete(id);
    const since = changes?.now() ?? 0;
    // An async function, so the query runs (and is recorded) inside recordReads.
    const lookup = async () =>
      await db
        .select({
          lastSeenAt: sessions.lastSeenAt,
          expiresAt: sessions.expiresAt,
          id: users.id,
          email: users.email,
          name: users.name,
          role: users.role,
          active: users.active,
          farmId: users.farmId,
        })
        .from(sessions)
        .innerJoin(users, eq(users.id, sessions.userId))
        .where(and(eq(sessions.id, id), gt(sessions.expiresAt, now)));
    const recorded = changes ? changes.recordReads(lookup) : { tables: new Set<string>(), result: lookup() };
    const [row] = await recorded.result;
    if (!row || !row.active || now.getTime() - row.lastSeenAt.getTime() > IDLE_MS) {
      if (row) await db.delete(sessions).where(eq(sessions.id, id));
      res.clearCookie(SESSION_COOKIE, { path: '/' });
      return next();
    }
    req.user = { id: row.id, email: row.email, name: row.name, role: row.role, farmId: row.farmId ?? null };
    req.sessionId = id;
    let lastSeenAt = row.lastSeenAt.getTime();
    // Touch at most once a minute.
    if (now.getTime() - lastSeenAt > 60_000) {
      await db.update(sessions).set({ lastSeenAt: now }).where(eq(sessions.id, id));
      lastSeenAt = now.getTime();
    }
    if (changes && changes.unchangedSince(recorded.tables, since)) {
      cache.set(id, { user: req.user, lastSeenAt, expiresAt: row.expiresAt.getTime(), tables: recorded.tables, since: changes.now() });
      if (cache.size > MAX_CACHED_SESSIONS) cache.delete(cache.keys().next().value!);
    }
    next();
  };
}

export async function purgeExpiredSessions(db: Db) {
  await db.delete(sessions).where(lt(sessions.expiresAt, new Date()));
}
