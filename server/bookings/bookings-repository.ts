/**
 * Queries of member bookings. Every member-facing read and write names the farm it is held to
 * (the member's own, from the session), so a member can neither see nor touch another farm's booking.
 */
import { and, asc, desc, eq, inArray, ne } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { bookingPayments, bookingRounds, bookings, budgets, farms, seasons } from '../db/schema/index.js';

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
