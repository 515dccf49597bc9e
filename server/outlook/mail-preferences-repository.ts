/** A member's choice about outlook e-mails (the `mail_opt_out` flag on their account). */
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { users } from '../db/schema/index.js';

/** The account's address and whether it opted out, or undefined when there is no such account. */
export async function findMailChoice(db: Db, userId: number) {
  const [row] = await db.select({ id: users.id, email: users.email, optOut: users.mailOptOut }).from(users).where(eq(users.id, userId));
  return row;
}

export async function setMailOptOut(db: Db, userId: number, optOut: boolean): Promise<void> {
  await db.update(users).set({ mailOptOut: optOut }).where(eq(users.id, userId));
}
