/**
 * One-click unsubscribe links: `<user id>.<HMAC-SHA256(secret, "netput-unsubscribe:<user id>")>`,
 * base64url. The secret is generated on first use and kept in the settings table; a link stays
 * valid until the secret is replaced, so a link in an old e-mail still works (RFC 8058 asks that the
 * one-click address keeps working). Anyone holding the link can only turn that member's outlook
 * e-mails off.
 */
import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { settings } from '../db/schema/index.js';

export const UNSUBSCRIBE_SECRET_KEY = 'mail.unsubscribe-secret';

export async function unsubscribeSecret(db: Db): Promise<Buffer> {
  const read = async () => {
    const [row] = await db.select().from(settings).where(eq(settings.key, UNSUBSCRIBE_SECRET_KEY));
    const v = row?.value as { secret?: unknown } | undefined;
    return typeof v?.secret === 'string' ? Buffer.from(v.secret, 'base64url') : null;
  };
  const existing = await read();
  if (existing) return existing;
  // Two first uses at once: one insert wins, both read the winner.
  await db
    .insert(settings)
    .values({ key: UNSUBSCRIBE_SECRET_KEY, value: { secret: randomBytes(32).toString('base64url'), createdAt: new Date().toISOString() } })
    .onConflictDoNothing({ target: settings.key });
  return (await read())!;
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
