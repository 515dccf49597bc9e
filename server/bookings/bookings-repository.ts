/**
 * Queries of member bookings. Every member-facing read and write names the farm it is held to
 * (the member's own, from the session), so a member can neither see nor touch another farm's booking.
 */
import { and, asc, desc, eq, inArray, lte, ne, sql } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { bookingPayments, bookingRounds, bookings, budgets, farms, items, outlookVersionFarms, outlookVersions, seasons, users } from '../db/schema/index.js';

export type RoundRow = typeof bookingRounds.$inferSelect;
export type BookingRow = typeof bookings.$inferSelect;
export type PaymentRow = typeof bookingPayments.$inferSelect;

export async function roundWithNames(db: Db, roundId: number) {
  const [row] = await db
    .select({ round: bookingRounds, season: seasons.label, budgetName: budgets.name })
    .from(bookingRounds)
    .innerJoin(seasons, eq(seasons.id, bookingRounds.seasonId))
    .innerJoin(budgets, eq(budgets.id, bookingRounds.budgetId))
    .where(eq(bookingRounds.id, roundId));
  return row ?? null;
}

export async function listRounds(db: Db) {
  return db
    .select({ round: bookingRounds, season: seasons.label, budgetName: budgets.name })
    .from(bookingRounds)
    .innerJoin(seasons, eq(seasons.id, bookingRounds.seasonId))
    .innerJoin(budgets, eq(budgets.id, bookingRounds.budgetId))
    .orderBy(desc(seasons.startYear));
}

/** The farm's active (not cancelled) booking in a round. */
export async function activeBooking(db: Db, roundId: number, farmId: number) {
  const [row] = await db
    .select()
    .from(bookings)
    .where(and(eq(bookings.roundId, roundId), eq(bookings.farmId, farmId), ne(bookings.status, 'cancelled')));
  return row ?? null;
}

/** A booking of one farm (null: none, or another farm's). */
export async function farmBooking(db: Db, bookingId: number, farmId: number | null) {
  const where = farmId === null ? eq(bookings.id, bookingId) : and(eq(bookings.id, bookingId), eq(bookings.farmId, farmId));
  const [row] = await db.select().from(bookings).where(where);
  return row ?? null;
}

export async function paymentsOf(db: Db, bookingIds: number[]) {
  if (!bookingIds.length) return [];
  return db.select().from(bookingPayments).where(inArray(bookingPayments.bookingId, bookingIds)).orderBy(asc(bookingPayments.id));
}

export async function roundBookings(db: Db, roundId: number) {
  return db
    .select({ booking: bookings, farmName: farms.name, farmCode: farms.code })
    .from(bookings)
    .innerJoin(farms, eq(farms.id, bookings.farmId))
    .where(eq(bookings.roundId, roundId))
    .orderBy(asc(farms.code), asc(bookings.id));
}

export async function paymentBySession(db: Db, sessionId: string) {
  const [row] = await db.select().from(bookingPayments).where(eq(bookingPayments.checkoutSessionId, sessionId));
  return row ?? null;
}

export async function paymentByIntent(db: Db, paymentIntentId: string) {
  const [row] = await db.select().from(bookingPayments).where(eq(bookingPayments.paymentIntentId, paymentIntentId));
  return row ?? null;
}

export async function paymentById(db: Db, id: number) {
  const [row] = await db.select().from(bookingPayments).where(eq(bookingPayments.id, id));
  return row ?? null;
}

export async function pendingPayments(db: Db) {
  return db.select().from(bookingPayments).where(eq(bookingPayments.state, 'pending')).orderBy(asc(bookingPayments.id));
}

/** The lines of every booking not cancelled in the round of a season (none: no round). */
export async function seasonBookedLines(db: Db, seasonId: number) {
  return db
    .select({ farmId: bookings.farmId, lines: bookings.lines })
    .from(bookings)
    .innerJoin(bookingRounds, eq(bookingRounds.id, bookings.roundId))
    .where(and(eq(bookingRounds.seasonId, seasonId), ne(bookings.status, 'cancelled')));
}

/** Whether the co-op opened a booking round for a season. */
export async function seasonHasRound(db: Db, seasonId: number) {
  const [row] = await db.select({ id: bookingRounds.id }).from(bookingRounds).where(eq(bookingRounds.seasonId, seasonId));
  return row !== undefined;
}

export type BookingInsert = typeof bookings.$inferInsert;
export type PaymentInsert = typeof bookingPayments.$inferInsert;

/** The latest round (by season), with its season and budget names. */
export async function latestRoundWithNames(db: Db) {
  const [row] = await db
    .select({ round: bookingRounds, season: seasons.label, budgetName: budgets.name })
    .from(bookingRounds)
    .innerJoin(seasons, eq(seasons.id, bookingRounds.seasonId))
    .innerJoin(budgets, eq(budgets.id, bookingRounds.budgetId))
    .orderBy(desc(seasons.startYear))
    .limit(1);
  return row ?? null;
}

export async function budgetById(db: Db, budgetId: number) {
  const [row] = await db.select().from(budgets).where(eq(budgets.id, budgetId));
  return row ?? null;
}

export async function farmById(db: Db, farmId: number) {
  const [row] = await db.select().from(farms).where(eq(farms.id, farmId));
  return row ?? null;
}

/** Name and e-mail of a user, to address booking mail. */
export async function userRecipient(db: Db, userId: number) {
  const [row] = await db.select({ email: users.email, name: users.name }).from(users).where(eq(users.id, userId));
  return row ?? null;
}

/** The latest published outlook of a season (null: none). */
export async function latestSeasonOutlook(db: Db, seasonId: number) {
  const [row] = await db
    .select({ id: outlookVersions.id, version: outlookVersions.version, title: sql<string>`${outlookVersions.snapshot}->>'title'` })
    .from(outlookVersions)
    .where(eq(outlookVersions.seasonId, seasonId))
    .orderBy(desc(outlookVersions.publishedAt), desc(outlookVersions.id))
    .limit(1);
  return row ?? null;
}

/** The farms' parts of a published outlook; with `farmId`, only that farm's part. */
export async function outlookFarmParts(db: Db, versionId: number, farmId?: number) {
  return db
    .select({ farmId: outlookVersionFarms.farmId, data: outlookVersionFarms.data })
    .from(outlookVersionFarms)
    .where(farmId === undefined ? eq(outlookVersionFarms.versionId, versionId) : and(eq(outlookVersionFarms.versionId, versionId), eq(outlookVersionFarms.farmId, farmId)));
}

export async function fertiliserItems(db: Db) {
  return db.select().from(items).where(eq(items.category, 'fertiliser'));
}

/** A booking of one farm, locked for update inside `tx` (null: none, or another farm's). */
export async function lockFarmBooking(tx: Db, bookingId: number, farmId: number) {
  const [row] = await tx
    .select()
    .from(bookings)
    .where(and(eq(bookings.id, bookingId), eq(bookings.farmId, farmId)))
    .for('update');
  return row ?? null;
}

/** A booking by id, locked for update inside `tx`; for callers that already checked whose it is. */
export async function lockBooking(tx: Db, bookingId: number) {
  const [row] = await tx.select().from(bookings).where(eq(bookings.id, bookingId)).for('update');
  return row ?? null;
}

/** A booking by id; for callers that already checked whose it is, or system jobs. */
export async function bookingById(db: Db, bookingId: number) {
  const [row] = await db.select().from(bookings).where(eq(bookings.id, bookingId));
  return row ?? null;
}

export async function insertBooking(tx: Db, values: BookingInsert) {
  const [row] = await tx.insert(bookings).values(values).returning();
  return row!;
}

export async function updateBooking(tx: Db, bookingId: number, set: Partial<BookingInsert>) {
  const [row] = await tx.update(bookings).set(set).where(eq(bookings.id, bookingId)).returning();
  return row;
}

/** A prepaid booking goes back to placed (its prepayment was refunded at the service). */
export async function unprepayBooking(tx: Db, bookingId: number, at: Date) {
  await tx.update(bookings).set({ status: 'placed', updatedAt: at }).where(and(eq(bookings.id, bookingId), eq(bookings.status, 'prepaid')));
}

export async function pendingPaymentsOfBooking(tx: Db, bookingId: number) {
  return tx.select().from(bookingPayments).where(and(eq(bookingPayments.bookingId, bookingId), eq(bookingPayments.state, 'pending')));
}

/** A payment by id, locked for update inside `tx`. */
export async function lockPayment(tx: Db, paymentId: number) {
  const [row] = await tx.select().from(bookingPayments).where(eq(bookingPayments.id, paymentId)).for('update');
  return row ?? null;
}

export async function insertPayment(tx: Db, values: PaymentInsert) {
  const [row] = await tx.insert(bookingPayments).values(values).returning();
  return row!;
}

export async function updatePayment(tx: Db, paymentId: number, set: Partial<PaymentInsert>) {
  const [row] = await tx.update(bookingPayments).set(set).where(eq(bookingPayments.id, paymentId)).returning();
  return row;
}

/** Every booking of one farm, newest first. */
export async function farmBookings(db: Db, farmId: number) {
  return db.select().from(bookings).where(eq(bookings.farmId, farmId)).orderBy(desc(bookings.id));
}

/** The round of a season (null: none). */
export async function roundOfSeason(db: Db, seasonId: number) {
  const [row] = await db.select().from(bookingRounds).where(eq(bookingRounds.seasonId, seasonId));
  return row ?? null;
}

/** How many bookings (any status) a round has. */
export async function countRoundBookings(db: Db, roundId: number) {
  const [{ n }] = (await db.select({ n: sql<number>`count(*)`.mapWith(Number) }).from(bookings).where(eq(bookings.roundId, roundId))) as [{ n: number }];
  return n;
}

export async function insertRound(tx: Db, values: typeof bookingRounds.$inferInsert) {
  const [row] = await tx.insert(bookingRounds).values(values).returning();
  return row!;
}

export async function updateRound(tx: Db, roundId: number, set: Partial<typeof bookingRounds.$inferInsert>) {
  const [row] = await tx.update(bookingRounds).set(set).where(eq(bookingRounds.id, roundId)).returning();
  return row;
}

/** Rounds whose discount deadline is on or before `date`, with their season names. */
export async function roundsWithDeadlineBy(db: Db, date: string) {
  return db
    .select({ round: bookingRounds, season: seasons.label })
    .from(bookingRounds)
    .innerJoin(seasons, eq(seasons.id, bookingRounds.seasonId))
    .where(lte(bookingRounds.discountDeadline, date));
}

/** The farms with a booking not cancelled in a round. */
export async function bookedFarmIds(db: Db, roundId: number) {
  return db.select({ farmId: bookings.farmId }).from(bookings).where(and(eq(bookings.roundId, roundId), ne(bookings.status, 'cancelled')));
}

/** Active member accounts, with their farm and mail preference (for booking reminders). */
export async function activeMembers(db: Db) {
  return db
    .select({ userId: users.id, email: users.email, name: users.name, optOut: users.mailOptOut, farmId: users.farmId })
    .from(users)
    .where(and(eq(users.role, 'member'), eq(users.active, true)));
}

/** Every farm's id (the co-op's reports count farms that did not book). */
export async function allFarmIds(db: Db) {
  return db.select({ id: farms.id }).from(farms);
}

/** Every farm, by code (the co-op's reports list farms that did not book). */
export async function farmsByCode(db: Db) {
  return db.select().from(farms).orderBy(farms.code);
}
