/**
 * Queries of the payment service's events: each verified webhook event is recorded once, with what
 * it did, so a repeated delivery changes nothing twice (server/bookings/payment-events.ts).
 */
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { paymentEvents } from '../db/schema/index.js';

/** The recorded event with this id (null: not seen yet). */
export async function seenPaymentEvent(db: Db, eventId: string) {
  const [row] = await db.select().from(paymentEvents).where(eq(paymentEvents.eventId, eventId));
  return row ?? null;
}

export async function recordPaymentEvent(tx: Db, values: { eventId: string; type: string; outcome: string }) {
  await tx.insert(paymentEvents).values(values);
}
