import { randomBytes } from 'node:crypto';
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { settings } from '../db/schema/index.js';

/**
 * A server-side secret of 256 bits kept in the settings table under `key`, made on first use; every
 * instance on the same database reads the same one. Two first uses at once: one insert wins, both
 * read the winner.
 */
export async function storedSecret(db: Db, key: string): Promise<Buffer> {
  const read = async () => {
    const [row] = await db.select().from(settings).where(eq(settings.key, key));
    const v = row?.value as { secret?: unknown } | undefined;
    return typeof v?.secret === 'string' ? Buffer.from(v.secret, 'base64url') : null;
  };
  const existing = await read();
  if (existing) return existing;
  await db
    .insert(settings)
    .values({ key, value: { secret: randomBytes(32).toString('base64url'), createdAt: new Date().toISOString() } })
    .onConflictDoNothing({ target: settings.key });
  return (await read())!;
}
