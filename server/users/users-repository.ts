/** The accounts' queries: the list with each member's farm, invitations, edits, ending sessions. */
import { and, asc, eq, isNull } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { farms, sessions, users } from '../db/schema/index.js';

/** What the Users page shows of an account, with the member's farm (null for other roles). */
const summaryColumns = {
  id: users.id,
  email: users.email,
  name: users.name,
  role: users.role,
  active: users.active,
  passwordHash: users.passwordHash,
  createdAt: users.createdAt,
  lastSignInAt: users.lastSignInAt,
  farmId: farms.id,
  farmName: farms.name,
};

/** Every account, by name. */
export async function listUserRows(db: Db) {
  return db.select(summaryColumns).from(users).leftJoin(farms, eq(farms.id, users.farmId)).orderBy(asc(users.name));
}

export async function findUserRow(db: Db, id: number) {
  const [row] = await db.select(summaryColumns).from(users).leftJoin(farms, eq(farms.id, users.farmId)).where(eq(users.id, id));
  return row;
}

export async function farmExists(db: Db, farmId: number): Promise<boolean> {
  const [farm] = await db.select({ id: farms.id }).from(farms).where(eq(farms.id, farmId));
  return Boolean(farm);
}

export async function setUserFarm(db: Db, userId: number, farmId: number | null): Promise<void> {
  await db.update(users).set({ farmId }).where(eq(users.id, userId));
}

export async function emailTaken(db: Db, email: string): Promise<boolean> {
  const [existing] = await db.select({ id: users.id }).from(users).where(eq(users.email, email));
  return Boolean(existing);
}

/** A new account without a password (an invitation); returns its id. */
export async function insertInvitedUser(db: Db, values: { email: string; name: string; role: typeof users.$inferInsert.role }): Promise<number> {
  const [created] = await db.insert(users).values(values).returning({ id: users.id });
  return created!.id;
}

/** Removes an account only while it has never set a password. */
export async function deleteUnacceptedUser(db: Db, id: number): Promise<void> {
  await db.delete(users).where(and(eq(users.id, id), isNull(users.passwordHash)));
}

export async function updateUserFields(db: Db, id: number, set: Partial<typeof users.$inferInsert>): Promise<void> {
  await db.update(users).set(set).where(eq(users.id, id));
}

/** Signs the account out everywhere. */
export async function deleteSessionsOf(db: Db, userId: number): Promise<void> {
  await db.delete(sessions).where(eq(sessions.userId, userId));
}
