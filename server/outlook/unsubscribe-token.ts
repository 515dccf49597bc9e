/**
 * One-click unsubscribe links: `<user id>.<HMAC-SHA256(secret, "netput-unsubscribe:<user id>")>`,
 * base64url. The secret is generated on first use and kept in the settings table; a link stays
 * valid until the secret is replaced, so a link in an old e-mail still works (RFC 8058 asks that the
 * one-click address keeps working). Anyone holding the link can only turn that member's outlook
 * e-mails off.
 */
import { createHmac, timingSafeEqual } from 'node:crypto';
import type { Db } from '../db/client.js';
import { storedSecret } from '../core/secrets.js';

export const UNSUBSCRIBE_SECRET_KEY = 'mail.unsubscribe-secret';

export function unsubscribeSecret(db: Db): Promise<Buffer> {
  return storedSecret(db, UNSUBSCRIBE_SECRET_KEY);
}

function mac(secret: Buffer, userId: number): Buffer {
  return createHmac('sha256', secret).update(`netput-unsubscribe:${userId}`).digest();
}

export function signUnsubscribe(secret: Buffer, userId: number): string {
  return `${userId}.${mac(secret, userId).toString('base64url')}`;
}

/** The user id the token was made for, or null when it is malformed or not ours. */
export function verifyUnsubscribe(secret: Buffer, token: string): number | null {
  const m = /^(\d{1,10})\.([A-Za-z0-9_-]{43})$/.exec(token);
  if (!m) return null;
  const userId = Number(m[1]);
  const given = Buffer.from(m[2]!, 'base64url');
  const expected = mac(secret, userId);
  return given.length === expected.length && timingSafeEqual(given, expected) ? userId : null;
}
