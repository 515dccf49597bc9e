/**
 * Settling prepayments: from the payment service's webhooks (verified by signature, each event id
 * processed once) and from the reconciliation job, which asks the service about payments still
 * pending (a webhook lost, or a crash between the service's confirmation and Netput recording it).
 *
 * Payment states only move forward — pending → paid | failed, failed → paid (money received wins),
 * paid → refunded — so a repeated, late or out-of-order event changes nothing twice. The state
 * change, its audit entry, the booking's new status and the receipt e-mail are one transaction.
 */
import type Stripe from 'stripe';
import type { Db } from '../db/client.js';
import { recordAudit } from '../audit/audit-repository.js';
import type { BookingLine } from '../../shared/booking-types.js';
import {
  activeMembers,
  bookedFarmIds,
  bookingById,
  lockBooking,
  lockPayment,
  paymentById,
  paymentByIntent,
  paymentBySession,
  pendingPayments,
  roundsWithDeadlineBy,
  roundWithNames,
  unprepayBooking,
  updateBooking,
  updatePayment,
  userRecipient,
  type PaymentRow,
} from './bookings-repository.js';
import { recordPaymentEvent, seenPaymentEvent } from './payments-repository.js';
import { paymentReceiptMail, reminderMail } from './booking-mail.js';
import { createSessionFor, isBeforeDeadline, refundPayment, type BookingDeps } from './bookings-service.js';
import { sessionView, type CheckoutView } from './payment-gateway.js';
import { DateTime } from 'luxon';

export type SettleOutcome = 'paid' | 'failed' | 'unchanged' | 'unknown-payment';

interface SettleResult {
  outcome: SettleOutcome;
  /** The payment arrived for a booking that changed or was cancelled meanwhile: refund it. */
  refund?: PaymentRow;
}

async function findPayment(db: Db, s: CheckoutView) {
  return (await paymentBySession(db, s.sessionId)) ?? (s.paymentId ? await paymentById(db, s.paymentId) : null);
}

/** Applies a session's state (as read from an event or from the service) to its payment, inside `tx`. */
async function settleInTx(d: BookingDeps, tx: Db, s: CheckoutView, source: string): Promise<SettleResult> {
  const found = await findPayment(tx, s);
  if (!found) return { outcome: 'unknown-payment' };
  const p = await lockPayment(tx, found.id);
  if (!p) return { outcome: 'unknown-payment' };
  const paid = s.paymentStatus === 'paid';
  const dead = s.status === 'expired';
  if (paid && (p.state === 'pending' || p.state === 'failed')) {
    const paidAt = new Date();
    const after = await updatePayment(tx, p.id, { state: 'paid', paidAt, paymentIntentId: s.paymentIntentId, checkoutSessionId: s.sessionId, lastSource: source, updatedAt: paidAt });
    await recordAudit(tx, { actorUserId: null, action: 'payment.state', entity: 'booking-payment', entityId: p.id, before: { state: p.state }, after: { state: 'paid', amountMinor: p.amountMinor, source } });
    const b = await lockBooking(tx, p.bookingId);
    if (b && b.status === 'placed' && b.version === p.bookingVersion) {
      await updateBooking(tx, b.id, { status: 'prepaid', updatedAt: paidAt });
      await recordAudit(tx, { actorUserId: null, action: 'booking.prepaid', entity: 'booking', entityId: b.id, before: { status: 'placed' }, after: { status: 'prepaid', paymentId: p.id } });
      const round = await roundWithNames(tx, b.roundId);
      const u = b.placedBy ? await userRecipient(tx, b.placedBy) : null;
      if (round && u) await paymentReceiptMail(tx, d.mail, u, { ...b, lines: b.lines as BookingLine[], season: round.season, deadline: round.round.discountDeadline }, { id: p.id, amountMinor: p.amountMinor, paidAt });
      return { outcome: 'paid' };
    }
    return { outcome: 'paid', refund: after! };
  }
  if (dead && p.state === 'pending') {
    await updatePayment(tx, p.id, { state: 'failed', lastSource: source, updatedAt: new Date() });
    await recordAudit(tx, { actorUserId: null, action: 'payment.state', entity: 'booking-payment', entityId: p.id, before: { state: 'pending' }, after: { state: 'failed', source } });
    return { outcome: 'failed' };
  }
  return { outcome: 'unchanged' };
}

async function afterSettle(d: BookingDeps, r: SettleResult) {
  if (!r.refund) return;
  const b = await bookingById(d.db, r.refund.bookingId);
  const u = b?.placedBy ? await userRecipient(d.db, b.placedBy) : null;
  await refundPayment(d, r.refund, null, 'paid after the booking changed or was cancelled', u ?? null);
}

/** Milliseconds a verified webhook waits before it is recorded (crash tests only: PAYMENT_WEBHOOK_DELAY_MS). */
export const webhookDelayMs = () => Number(process.env.PAYMENT_WEBHOOK_DELAY_MS ?? 0) || 0;

/** Applies one verified event once. Returns what it did (kept with the event id). */
export async function handlePaymentEvent(d: BookingDeps, event: Stripe.Event): Promise<{ duplicate: boolean; outcome: string }> {
  const delay = webhookDelayMs();
  if (delay > 0) {
    console.log(`payment webhook ${event.id} verified; recording it in ${delay} ms`);
    await new Promise((r) => setTimeout(r, delay));
  }
  let toRefund: SettleResult = { outcome: 'unchanged' };
  const result = await d.db.transaction(async (tx) => {
    const seen = await seenPaymentEvent(tx, event.id);
    if (seen) return { duplicate: true, outcome: seen.outcome };
    let outcome = 'ignored: not a type Netput uses';
    const source = `webhook ${event.id}`;
    switch (event.type) {
      case 'checkout.session.completed':
      case 'checkout.session.async_payment_succeeded':
      case 'checkout.session.expired':
      case 'checkout.session.async_payment_failed': {
        const s = sessionView(event.data.object as Stripe.Checkout.Session);
        const view = event.type === 'checkout.session.async_payment_failed' ? { ...s, status: 'expired', paymentStatus: 'unpaid' } : s;
        toRefund = await settleInTx(d, tx, view, source);
        outcome = toRefund.outcome;
        break;
      }
      case 'charge.refunded': {
        const charge = event.data.object as Stripe.Charge;
        const pi = typeof charge.payment_intent === 'string' ? charge.payment_intent : charge.payment_intent?.id;
        const p = pi ? await paymentByIntent(tx, pi) : null;
        if (!p) outcome = 'unknown-payment';
        else if (p.state === 'paid' && charge.refunded) {
          // A refund made at the service itself (not through Netput): the booking stands, unpaid.
          await updatePayment(tx, p.id, { state: 'refunded', refundedAt: new Date(), lastSource: source, updatedAt: new Date() });
          await recordAudit(tx, { actorUserId: null, action: 'payment.state', entity: 'booking-payment', entityId: p.id, before: { state: 'paid' }, after: { state: 'refunded', source } });
          await unprepayBooking(tx, p.bookingId, new Date());
          outcome = 'refunded';
        } else outcome = 'unchanged';
        break;
      }
    }
    await recordPaymentEvent(tx, { eventId: event.id, type: event.type, outcome });
    return { duplicate: false, outcome };
  });
  await afterSettle(d, toRefund);
  return result;
}

/**
 * The reconciliation pass: every payment still pending (and older than `minAgeMs`) is looked up at
 * the service; a completed one is recorded as paid (with its receipt), an expired one as failed.
 * A pending payment whose checkout session was never stored (a crash between our insert and the
 * service's answer) asks for it again under the same idempotency key, which yields the same session.
 */
export async function reconcilePayments(d: BookingDeps, minAgeMs = 60_000): Promise<{ checked: number; paid: number; failed: number; errors: number }> {
  const out = { checked: 0, paid: 0, failed: 0, errors: 0 };
  if (!d.payments) return out;
  const cutoff = Date.now() - minAgeMs;
  for (const p of await pendingPayments(d.db)) {
    if (p.createdAt.getTime() > cutoff) continue;
    out.checked++;
    try {
      let sessionId = p.checkoutSessionId;
      if (!sessionId) {
        const b = await bookingById(d.db, p.bookingId);
        const round = b ? await roundWithNames(d.db, b.roundId) : null;
        if (!b || !round) continue;
        sessionId = (await createSessionFor(d, p, b, round.season, null)).sessionId;
      }
      const s = await d.payments.retrieveCheckout(sessionId);
      const r = await d.db.transaction((tx) => settleInTx(d, tx, s, 'reconciliation'));
      if (r.outcome === 'paid') out.paid++;
      if (r.outcome === 'failed') out.failed++;
      await afterSettle(d, r);
    } catch (err) {
      out.errors++;
      console.warn(`Payment reconciliation: payment ${p.id}: ${(err as Error).message}`);
    }
  }
  return out;
}

/** Days before the discount deadline the reminder goes out (common practice, no source). */
export const REMINDER_DAYS = 7;

/**
 * Reminds members whose farm has not booked in a round whose deadline is within REMINDER_DAYS. One
 * per member and round (the outbox key); a member who opted out gets a skipped row, not a message.
 */
export async function sendBookingReminders(d: BookingDeps): Promise<number> {
  const today = DateTime.fromJSDate(d.now ? d.now() : new Date(), { zone: 'utc' });
  const horizon = today.plus({ days: REMINDER_DAYS }).toISODate()!;
  const rounds = await roundsWithDeadlineBy(d.db, horizon);
  let queued = 0;
  for (const r of rounds) {
    if (!isBeforeDeadline(r.round, today.toISODate()!)) continue;
    const booked = await bookedFarmIds(d.db, r.round.id);
    const bookedFarms = new Set(booked.map((b) => b.farmId));
    const members = await activeMembers(d.db);
    for (const m of members) {
      if (m.farmId === null || bookedFarms.has(m.farmId)) continue;
      await reminderMail(d.db, d.mail, m, { id: r.round.id, season: r.season, deadline: r.round.discountDeadline, discountBp: r.round.discountBp });
      queued++;
    }
  }
  return queued;
}

