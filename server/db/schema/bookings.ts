import { sql } from 'drizzle-orm';
import { check, date, index, integer, jsonb, pgTable, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { budgets } from './budgets.js';
import { farms } from './farms.js';
import { seasons } from './seasons.js';
import { users } from './users.js';

/**
 * Member bookings (real orders placed by members in the portal), not to be confused with a budget's
 * *booking plan* (`budgets.booking_plan`: the treasurer's planned monthly shares). A booking round
 * opens one season's booking to members at the booking prices of one budget, with the early-payment
 * discount deadline and the VAT rate that apply.
 */
export const bookingRounds = pgTable(
  'booking_rounds',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    seasonId: integer('season_id')
      .notNull()
      .unique()
      .references(() => seasons.id, { onDelete: 'restrict' }),
    budgetId: integer('budget_id')
      .notNull()
      .references(() => budgets.id, { onDelete: 'restrict' }),
    /** Last day (inclusive, co-op calendar, UTC) a prepayment earns the discount and a booking may change or be cancelled. */
    discountDeadline: date('discount_deadline').notNull(),
    /** Early-payment discount in basis points of the net value (250 = 2.5 %). */
    discountBp: integer('discount_bp').notNull(),
    /** VAT rate in basis points (2000 = 20 %). */
    vatBp: integer('vat_bp').notNull(),
    currency: text('currency').notNull(),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [check('booking_rounds_rates_check', sql`${t.discountBp} >= 0 and ${t.discountBp} <= 5000 and ${t.vatBp} >= 0 and ${t.vatBp} <= 5000`)],
);

export const BOOKING_STATUSES = ['placed', 'prepaid', 'cancelled'] as const;

/**
 * One farm's booking in a round: product lines (kg of product, price per tonne in minor units, as
 * booked), delivery month and the amounts computed on the server. `version` counts changes.
 * Life: placed → prepaid (payment settled) → cancelled (before the deadline, refunded); placed →
 * cancelled. At most one active (placed or prepaid) booking per farm and round.
 */
export const bookings = pgTable(
  'bookings',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    roundId: integer('round_id')
      .notNull()
      .references(() => bookingRounds.id, { onDelete: 'restrict' }),
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'restrict' }),
    seasonId: integer('season_id')
      .notNull()
      .references(() => seasons.id, { onDelete: 'restrict' }),
    budgetId: integer('budget_id')
      .notNull()
      .references(() => budgets.id, { onDelete: 'restrict' }),
    /** BookingLine[]: { productId, name, kg, pricePerTMinor, nPct, p2o5Pct, k2oPct, listMinor } */
    lines: jsonb('lines').notNull(),
    /** YYYY-MM */
    deliveryMonth: text('delivery_month').notNull(),
    currency: text('currency').notNull(),
    listMinor: integer('list_minor').notNull(),
    discountBp: integer('discount_bp').notNull(),
    discountMinor: integer('discount_minor').notNull(),
    netMinor: integer('net_minor').notNull(),
    vatBp: integer('vat_bp').notNull(),
    vatMinor: integer('vat_minor').notNull(),
    totalMinor: integer('total_minor').notNull(),
    status: text('status', { enum: BOOKING_STATUSES }).notNull().default('placed'),
    version: integer('version').notNull().default(1),
    placedBy: integer('placed_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
    cancelledAt: timestamp('cancelled_at', { withTimezone: true }),
  },
  (t) => [
    check('bookings_status_check', sql`${t.status} in ('placed','prepaid','cancelled')`),
    check('bookings_amounts_check', sql`${t.listMinor} >= 0 and ${t.discountMinor} >= 0 and ${t.netMinor} = ${t.listMinor} - ${t.discountMinor} and ${t.totalMinor} = ${t.netMinor} + ${t.vatMinor}`),
    uniqueIndex('bookings_one_active_per_farm').on(t.roundId, t.farmId).where(sql`${t.status} <> 'cancelled'`),
    index('bookings_farm_idx').on(t.farmId),
  ],
);

export const PAYMENT_STATES = ['pending', 'paid', 'failed', 'refunded'] as const;

/**
 * A prepayment of a booking through the payment service. Created (state pending, with its
 * idempotency key) in the same transaction as the booking or the member's "pay" request, before the
 * service is called; the checkout session id is stored as soon as the service answers.
 * States move forward only: pending → paid | failed, failed → paid (money received wins),
 * paid → refunded. Amounts in minor units of `currency`.
 */
export const bookingPayments = pgTable(
  'booking_payments',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    bookingId: integer('booking_id')
      .notNull()
      .references(() => bookings.id, { onDelete: 'restrict' }),
    /** The booking version this payment pays for. */
    bookingVersion: integer('booking_version').notNull(),
    idempotencyKey: text('idempotency_key').notNull().unique(),
    checkoutSessionId: text('checkout_session_id').unique(),
    checkoutUrl: text('checkout_url'),
    paymentIntentId: text('payment_intent_id'),
    refundId: text('refund_id'),
    amountMinor: integer('amount_minor').notNull(),
    currency: text('currency').notNull(),
    state: text('state', { enum: PAYMENT_STATES }).notNull().default('pending'),
    /** What settled the last change: webhook event id, reconciliation, member, ... */
    lastSource: text('last_source'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
    paidAt: timestamp('paid_at', { withTimezone: true }),
    refundedAt: timestamp('refunded_at', { withTimezone: true }),
  },
  (t) => [
    check('booking_payments_state_check', sql`${t.state} in ('pending','paid','failed','refunded')`),
    check('booking_payments_amount_check', sql`${t.amountMinor} > 0`),
    index('booking_payments_booking_idx').on(t.bookingId),
    index('booking_payments_state_idx').on(t.state),
  ],
);

/** Webhook events already processed: a repeated event id changes nothing. */
export const paymentEvents = pgTable('payment_events', {
  eventId: text('event_id').primaryKey(),
  type: text('type').notNull(),
  /** What the event did: applied, ignored (and why). */
  outcome: text('outcome').notNull(),
  receivedAt: timestamp('received_at', { withTimezone: true }).notNull().defaultNow(),
});
