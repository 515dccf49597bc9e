import type { Me, TokenInfo } from '../../shared/api-types.js';
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import { newToken, sha256 } from '../core/tokens.js';
import { recordAudit } from '../audit/audit-repository.js';
import {
  claimToken,
  deleteSessionsOf,
  deleteToken,
  findMeRow,
  findTokenByHash,
  findUserByEmailIgnoringCase,
  findUserForSignIn,
  insertToken,
  markSignedIn,
  retireTokensExcept,
  setFailedSignIns,
  setPasswordSignedIn,
} from './auth-repository.js';
import { dummyPasswordHash, hashPassword, verifyPassword } from './passwords.js';

/** After this many wrong passwords in a row the account is locked for LOCK_MINUTES. */
export const MAX_FAILED_SIGN_INS = 10;
export const LOCK_MINUTES = 15;
export const INVITE_DAYS = 7;
export const RESET_HOURS = 2;

export async function meOf(db: Db, userId: number): Promise<Me> {
  const row = await findMeRow(db, userId);
  if (!row) throw AppError.notFound('The account');
  return { ...row, farmId: row.farmId ?? null };
}

const WRONG = 'The e-mail address or the password is wrong';

/** Checks a password; counts failures and locks the account after too many in a row. */
export async function checkCredentials(db: Db, email: string, password: string): Promise<number> {
  const user = await findUserForSignIn(db, email);
  if (!user) {
    await verifyPassword(await dummyPasswordHash(), password);
    throw new AppError(401, 'invalid_credentials', WRONG);
  }
  if (user.lockedUntil && user.lockedUntil.getTime() > Date.now()) {
    throw new AppError(429, 'locked', `Too many wrong passwords: the account is locked until ${user.lockedUntil.toISOString().slice(11, 16)} UTC`);
  }
  const ok = await verifyPassword(user.passwordHash, password);
  if (!ok || !user.active) {
    if (!ok) {
      const failed = user.failedSignIns + 1;
      await setFailedSignIns(
        db,
        user.id,
        failed >= MAX_FAILED_SIGN_INS ? 0 : failed,
        failed >= MAX_FAILED_SIGN_INS ? new Date(Date.now() + LOCK_MINUTES * 60_000) : null,
      );
    }
    throw new AppError(401, 'invalid_credentials', ok ? 'This account has been deactivated; ask your co-op administrator' : WRONG);
  }
  await markSignedIn(db, user.id);
  return user.id;
}

/**
 * Stores a new one-time link token. Earlier unused tokens of the same purpose keep working until
 * `retireOtherTokens`, which the caller runs once the new link has been handed to the mail service,
 * so a message that could not be sent takes no working link away.
 */
export async function createToken(db: Db, userId: number, purpose: 'invite' | 'reset'): Promise<{ id: number; token: string }> {
  const token = newToken();
  const ms = purpose === 'invite' ? INVITE_DAYS * 86400_000 : RESET_HOURS * 3600_000;
  const id = await insertToken(db, sha256(token), userId, purpose, new Date(Date.now() + ms));
  return { id, token };
}

/** Ends every unused token of the account and purpose except `keepId`. */
export async function retireOtherTokens(db: Db, userId: number, purpose: 'invite' | 'reset', keepId: number) {
  await retireTokensExcept(db, userId, purpose, keepId);
}

/** Removes a token whose message was never sent. */
export async function dropToken(db: Db, id: number) {
  await deleteToken(db, id);
}

async function findToken(db: Db, token: string) {
  const row = await findTokenByHash(db, sha256(token));
  if (!row) throw AppError.notFound('This link');
  if (row.usedAt) throw AppError.gone('This link has already been used; ask for a new one');
  if (row.expiresAt.getTime() < Date.now()) throw AppError.gone('This link has expired; ask for a new one');
  if (!row.active) throw AppError.gone('This account has been deactivated');
  return row;
}

export async function tokenInfo(db: Db, token: string): Promise<TokenInfo> {
  const row = await findToken(db, token);
  return { purpose: row.purpose, email: row.email, name: row.name, expiresAt: row.expiresAt.toISOString() };
}

/** Sets the password from a one-time link, in one transaction; every other session of the account ends. */
export async function redeemToken(db: Db, token: string, password: string): Promise<number> {
  const hash = await hashPassword(password);
  return db.transaction(async (tx) => {
    const row = await findToken(tx, token);
    if (!(await claimToken(tx, row.id))) throw AppError.gone('This link has already been used; ask for a new one');
    await setPasswordSignedIn(tx, row.userId, hash);
    await deleteSessionsOf(tx, row.userId);
    await recordAudit(tx, {
      actorUserId: row.userId,
      action: row.purpose === 'invite' ? 'user.accept-invitation' : 'user.reset-password',
      entity: 'user',
      entityId: row.userId,
    });
    return row.userId;
  });
}

export async function findUserByEmail(db: Db, email: string) {
  return findUserByEmailIgnoringCase(db, email);
}
