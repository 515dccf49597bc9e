/** Accounts' sign-in state and one-time link tokens: plain queries, no use case (auth-service.ts holds those). */
import { and, eq, isNull, ne, sql } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { oneTimeTokens, sessions, users } from '../db/schema/index.js';

export type TokenPurpose = 'invite' | 'reset';

export async function findMeRow(db: Db, userId: number) {
  const [row] = await db
    .select({ id: users.id, email: users.email, name: users.name, role: users.role, farmId: users.farmId })
    .from(users)
    .where(eq(users.id, userId));
  return row;
}

/** The whole account row for a sign-in check (exact e-mail match). */
export async function findUserForSignIn(db: Db, email: string) {
  const [user] = await db.select().from(users).where(eq(users.email, email));
  return user;
}

export async function setFailedSignIns(db: Db, userId: number, failedSignIns: number, lockedUntil: Date | null) {
  await db.update(users).set({ failedSignIns, lockedUntil }).where(eq(users.id, userId));
}

export async function markSignedIn(db: Db, userId: number) {
  await db.update(users).set({ failedSignIns: 0, lockedUntil: null, lastSignInAt: new Date() }).where(eq(users.id, userId));
}

/** Sets a new password hash, clears the lock and counts it as a sign-in. */
export async function setPasswordSignedIn(db: Db, userId: number, passwordHash: string) {
  await db
    .update(users)
    .set({ passwordHash, failedSignIns: 0, lockedUntil: null, lastSignInAt: new Date() })
    .where(eq(users.id, userId));
}

export async function deleteSessionsOf(db: Db, userId: number) {
  await db.delete(sessions).where(eq(sessions.userId, userId));
}

export async function insertToken(db: Db, tokenHash: string, userId: number, purpose: TokenPurpose, expiresAt: Date): Promise<number> {
  const [row] = await db
    .insert(oneTimeTokens)
    .values({ tokenHash, userId, purpose, expiresAt })
    .returning({ id: oneTimeTokens.id });
  return row!.id;
}

/** Marks every unused token of the account and purpose used, except `keepId`. */
export async function retireTokensExcept(db: Db, userId: number, purpose: TokenPurpose, keepId: number) {
  await db
    .update(oneTimeTokens)
    .set({ usedAt: new Date() })
    .where(and(eq(oneTimeTokens.userId, userId), eq(oneTimeTokens.purpose, purpose), isNull(oneTimeTokens.usedAt), ne(oneTimeTokens.id, keepId)));
}

export async function deleteToken(db: Db, id: number) {
  await db.delete(oneTimeTokens).where(eq(oneTimeTokens.id, id));
}

/** A token by its hash, with the account it belongs to. */
export async function findTokenByHash(db: Db, tokenHash: string) {
  const [row] = await db
    .select({
      id: oneTimeTokens.id,
      purpose: oneTimeTokens.purpose,
      expiresAt: oneTimeTokens.expiresAt,
      usedAt: oneTimeTokens.usedAt,
      userId: users.id,
      email: users.email,
      name: users.name,
      active: users.active,
    })
    .from(oneTimeTokens)
    .innerJoin(users, eq(users.id, oneTimeTokens.userId))
    .where(eq(oneTimeTokens.tokenHash, tokenHash));
  return row;
}

/** Marks a token used if it still is unused; false when another request claimed it first. */
export async function claimToken(db: Db, id: number): Promise<boolean> {
  const claimed = await db
    .update(oneTimeTokens)
    .set({ usedAt: new Date() })
    .where(and(eq(oneTimeTokens.id, id), isNull(oneTimeTokens.usedAt)))
    .returning({ id: oneTimeTokens.id });
  return claimed.length > 0;
}

/** An account by e-mail address, ignoring case. */
export async function findUserByEmailIgnoringCase(db: Db, email: string) {
  const [user] = await db
    .select({ id: users.id, name: users.name, email: users.email, role: users.role, active: users.active })
    .from(users)
    .where(eq(sql`lower(${users.email})`, email.toLowerCase()));
  return user;
}
