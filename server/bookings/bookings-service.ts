/**
 * Member bookings: the offer a member sees (booking prices from the round's budget, the farm's
 * projected need and a suggestion), placing, changing and cancelling a booking, and its prepayment
 * through the payment service (server/bookings/payment-gateway.ts) with settlement from webhooks
 * (server/bookings/payment-events.ts) or the reconciliation job. Amounts are computed here, in
 * minor units (shared/booking-money.ts), never taken from the client.
 */
import crypto from 'node:crypto';
import { DateTime } from 'luxon';
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import { leastCostTonnes } from '../budget/product-mix.js';
import { gradeLabel, itemNutrients, NUTRIENTS, type Nutrient, type NutrientAmounts } from '../budget/nutrients.js';
import { findOrCreateSeason } from '../outlook/season-creation.js';
import { bookingAmounts, percentToBp, toMinor } from '../../shared/booking-money.js';
import {
  LARGE_BOOKING_FACTOR,
  type BookingInput,
  type BookingLine,
  type BookingOffer,
  type BookingProduct,
  type BookingRoundInput,
  type BookingRoundView,
  type BookingView,
  type CheckoutStart,
} from '../../shared/booking-types.js';
import type { BookingPlan, BudgetResult } from '../../shared/budget-types.js';
import {
  activeBooking,
  budgetById,
  countRoundBookings,
  farmBookings,
  farmBooking,
  farmById,
  fertiliserItems,
  insertBooking,
  insertPayment,
  insertRound,
  latestRoundWithNames,
  latestSeasonOutlook,
  lockBooking,
  lockFarmBooking,
  lockPayment,
  outlookFarmParts,
  paymentsOf,
  pendingPaymentsOfBooking,
  roundOfSeason,
  roundWithNames,
  updateBooking,
  updatePayment,
  updateRound,
  userRecipient,
  type BookingRow,
  type PaymentRow,
  type RoundRow,
} from './bookings-repository.js';
import { BOOKING_PATH, bookingConfirmationMail, cancellationMail, refundMail, type BookingFacts, type BookingMailContext, type Recipient } from './booking-mail.js';
import type { PaymentGateway } from './payment-gateway.js';

export interface BookingDeps {
  db: Db;
  mail: BookingMailContext;
  payments?: PaymentGateway;
  now?: () => Date;
}

export const BOOKING_CAUTIONS: readonly string[] = [
  'Suggested quantities start from your farm’s projected nutrient need. Projections are estimates, not financial advice or a recommendation to buy.',
  'Application rates follow soil tests, local agronomic guidance and nutrient-management rules, and a certified adviser has the last word.',
  'Quantities are tonnes of product; the nutrients they bring are kg N, kg P2O5 and kg K2O (oxide basis, as grades are written).',
];

/** Without a projection, nitrogen above this many kg per hectare asks for confirmation (common practice, no source: well above usual field rates). */
export const LARGE_N_PER_HA = 400;

const nowOf = (d: BookingDeps) => (d.now ? d.now() : new Date());
const todayOf = (d: BookingDeps) => DateTime.fromJSDate(nowOf(d), { zone: 'utc' }).toISODate()!;

export function isBeforeDeadline(round: Pick<RoundRow, 'discountDeadline'>, today: string) {
  return today <= round.discountDeadline;
}

export function roundView(r: { round: RoundRow; season: string; budgetName: string }, today: string): BookingRoundView {
  return {
    id: r.round.id,
    season: r.season,
    budgetId: r.round.budgetId,
    budgetName: r.budgetName,
    discountDeadline: r.round.discountDeadline,
    discountBp: r.round.discountBp,
    vatBp: r.round.vatBp,
    currency: r.round.currency,
    beforeDeadline: isBeforeDeadline(r.round, today),
  };
}

export interface BudgetFacts {
  products: BookingProduct[];
  plan: BookingPlan;
  /** Base-scenario tonnes per product. */
  budgetT: Map<number, number>;
  /** Base-scenario cash per month (minor units). */
  cash: { month: string; minor: number }[];
  currency: string;
}

export async function budgetFacts(db: Db, budgetId: number): Promise<BudgetFacts> {
  const b = await budgetById(db, budgetId);
  if (!b) throw AppError.notFound('The budget');
  const result = b.result as BudgetResult;
  const base = result.scenarios.find((s) => s.name.toLowerCase() === 'base') ?? result.scenarios[0];
  const budgetT = new Map<number, number>();
  for (const l of base?.mix.lines ?? []) budgetT.set(l.productId, l.tonnes);
  return {
    products: result.products.map((p) => ({
      productId: p.productId,
      name: p.name,
      grade: gradeLabel(p),
      nPct: p.nPct,
      p2o5Pct: p.p2o5Pct,
      k2oPct: p.k2oPct,
      pricePerTMinor: toMinor(p.pricePerT),
      lotT: p.lotT,
    })),
    plan: b.bookingPlan as BookingPlan,
    budgetT,
    cash: (base?.cash.months ?? []).map((m) => ({ month: m.month, minor: toMinor(m.cash) })),
    currency: result.currency,
  };
}

export function nutrientsOf(kg: number, p: Pick<BookingProduct, 'nPct' | 'p2o5Pct' | 'k2oPct'>): NutrientAmounts {
  return { nitrogen: (kg * p.nPct) / 100, phosphate: (kg * p.p2o5Pct) / 100, potash: (kg * p.k2oPct) / 100 };
}

export function sumNutrients(lines: { nutrients: NutrientAmounts }[]): NutrientAmounts {
  const out: NutrientAmounts = { nitrogen: 0, phosphate: 0, potash: 0 };
  for (const l of lines) for (const n of NUTRIENTS) out[n] += l.nutrients[n];
  return out;
}

// ---- projected need -------------------------------------------------------------------------

interface FarmPart {
  items?: { item: string; scenarios?: Record<string, { point?: number }> }[];
}

/**
 * Each farm's projected nutrient need for a season: the latest published outlook of that season,
 * base scenario, point projection; fertiliser items count by their grade (kg of nutrient per unit).
 */
export async function projectedNeeds(db: Db, seasonId: number, farmId?: number): Promise<{ needs: Map<number, NutrientAmounts>; source: string } | null> {
  const version = await latestSeasonOutlook(db, seasonId);
  if (!version) return null;
  const parts = await outlookFarmParts(db, version.id, farmId);
  const fert = await fertiliserItems(db);
  const byCode = new Map(fert.map((i) => [i.code, i]));
  const needs = new Map<number, NutrientAmounts>();
  for (const p of parts) {
    const need: NutrientAmounts = { nitrogen: 0, phosphate: 0, potash: 0 };
    for (const it of (p.data as FarmPart).items ?? []) {
      const row = byCode.get(it.item);
      const q = it.scenarios?.['base']?.point;
      if (!row || typeof q !== 'number' || !(q > 0)) continue;
      const kg = itemNutrients(row, q);
      if (kg) for (const n of NUTRIENTS) need[n] += kg[n];
    }
    needs.set(p.farmId, need);
  }
  return { needs, source: `Published outlook “${version.title}” (version ${version.version}), base scenario` };
}

// ---- views ----------------------------------------------------------------------------------

function paymentView(p: PaymentRow) {
  return {
    id: p.id,
    state: p.state,
    amountMinor: p.amountMinor,
    currency: p.currency,
    checkoutUrl: p.state === 'pending' ? p.checkoutUrl : null,
    createdAt: p.createdAt.toISOString(),
    paidAt: p.paidAt?.toISOString() ?? null,
    refundedAt: p.refundedAt?.toISOString() ?? null,
  };
}

export function bookingView(b: BookingRow, payments: PaymentRow[], farmName: string, round: { round: RoundRow; season: string }, today: string): BookingView {
  const lines = b.lines as BookingLine[];
  return {
    id: b.id,
    roundId: b.roundId,
    farmId: b.farmId,
    farmName,
    season: round.season,
    status: b.status,
    version: b.version,
    deliveryMonth: b.deliveryMonth,
    currency: b.currency,
    lines,
    listMinor: b.listMinor,
    discountBp: b.discountBp,
    discountMinor: b.discountMinor,
    netMinor: b.netMinor,
    vatBp: b.vatBp,
    vatMinor: b.vatMinor,
    totalMinor: b.totalMinor,
    nutrients: sumNutrients(lines),
    changeable: b.status !== 'cancelled' && isBeforeDeadline(round.round, today),
    payments: payments.filter((p) => p.bookingId === b.id).map(paymentView),
    createdAt: b.createdAt.toISOString(),
    updatedAt: b.updatedAt.toISOString(),
  };
}

/** The latest round (by season) is the one members book in. */
export async function currentRound(db: Db) {
  return latestRoundWithNames(db);
}

async function farmOf(db: Db, farmId: number | null) {
  if (farmId === null) throw new AppError(409, 'no_farm', 'Your account is not linked to a farm; ask the co-op office to link it');
  const f = await farmById(db, farmId);
  if (!f) throw AppError.notFound('Your farm');
  return f;
}

function deliveryMonthsOf(plan: BookingPlan, today: string): string[] {
  const base = DateTime.fromFormat(plan.deliveryMonth, 'yyyy-MM', { zone: 'utc' });
  const thisMonth = today.slice(0, 7);
  const out: string[] = [];
  for (let i = -2; i <= 3; i++) {
    const m = base.plus({ months: i }).toFormat('yyyy-MM');
    if (m >= thisMonth) out.push(m);
  }
  return out;
}

export async function memberOffer(d: BookingDeps, farmId: number | null): Promise<BookingOffer | null> {
  const farm = await farmOf(d.db, farmId);
  const round = await currentRound(d.db);
  if (!round) return null;
  const today = todayOf(d);
  const facts = await budgetFacts(d.db, round.round.budgetId);
  const needs = await projectedNeeds(d.db, round.round.seasonId, farm.id);
  const need = needs?.needs.get(farm.id) ?? null;
  let suggestion: { productId: number; tonnes: number }[] = [];
  if (need && NUTRIENTS.some((n) => need[n] > 0)) {
    try {
      const mix = leastCostTonnes(
        need,
        facts.products.map((p) => ({ ...p, pricePerT: p.pricePerTMinor / 100 })),
      );
      suggestion = facts.products.map((p, i) => ({ productId: p.productId, tonnes: Math.ceil((mix.tonnes[i] ?? 0) * 10) / 10 })).filter((s) => s.tonnes > 0);
    } catch {
      suggestion = [];
    }
  }
  const booking = await activeBooking(d.db, round.round.id, farm.id);
  const payments = booking ? await paymentsOf(d.db, [booking.id]) : [];
  return {
    round: roundView(round, today),
    farm: { id: farm.id, name: farm.name, landHa: farm.landHa },
    products: facts.products,
    deliveryMonths: deliveryMonthsOf(facts.plan, today),
    planDeliveryMonth: facts.plan.deliveryMonth,
    need: need && needs ? { nutrients: need, source: needs.source } : null,
    suggestion,
    cautions: [...BOOKING_CAUTIONS],
    booking: booking ? bookingView(booking, payments, farm.name, round, today) : null,
  };
}

export async function memberBookings(d: BookingDeps, farmId: number | null): Promise<BookingView[]> {
  const farm = await farmOf(d.db, farmId);
  const rows = await farmBookings(d.db, farm.id);
  const payments = await paymentsOf(
    d.db,
    rows.map((r) => r.id),
  );
  const today = todayOf(d);
  const out: BookingView[] = [];
  for (const r of rows) {
    const round = await roundWithNames(d.db, r.roundId);
    if (round) out.push(bookingView(r, payments, farm.name, round, today));
  }
  return out;
}

// ---- rounds (treasurer) -------------------------------------------------------------------------

export async function saveRound(d: BookingDeps, input: BookingRoundInput, actorUserId: number) {
  const facts = await budgetFacts(d.db, input.budgetId);
  const discountBp = percentToBp(input.discountPct ?? facts.plan.prepayDiscountPct);
  let vatBp: number;
  try {
    vatBp = percentToBp(input.vatPct);
  } catch (e) {
    throw AppError.invalid((e as Error).message, [{ path: 'body.vatPct', message: (e as Error).message }]);
  }
  return d.db.transaction(async (tx) => {
    const season = await findOrCreateSeason(tx, input.season, actorUserId);
    const before = await roundOfSeason(tx, season.id);
    if (before && before.budgetId !== input.budgetId) {
      const n = await countRoundBookings(tx, before.id);
      if (n > 0) throw AppError.conflict(`Members have already booked in the ${input.season} round at the prices of its budget; the budget can no longer change`);
    }
    const values = { seasonId: season.id, budgetId: input.budgetId, discountDeadline: input.discountDeadline, discountBp, vatBp, currency: facts.currency, updatedAt: new Date() };
    const row = before ? await updateRound(tx, before.id, values) : await insertRound(tx, { ...values, createdBy: actorUserId });
    await recordAudit(tx, { actorUserId, action: before ? 'booking_round.update' : 'booking_round.create', entity: 'booking-round', entityId: row!.id, before: before ?? null, after: row });
    return roundView({ round: row!, season: season.label, budgetName: '' }, todayOf(d));
  });
}

// ---- placing and changing -------------------------------------------------------------------------

function buildLines(input: BookingInput, products: BookingProduct[]): BookingLine[] {
  const seen = new Set<number>();
  return input.lines.map((l, i) => {
    const p = products.find((x) => x.productId === l.productId);
    if (!p) throw AppError.unprocessable(`Product ${l.productId} is not in this season's booking list`, [{ path: `lines.${i}.productId`, message: 'Not in this season’s booking list' }]);
    if (seen.has(p.productId)) throw AppError.unprocessable(`${p.name} is listed twice`, [{ path: `lines.${i}.productId`, message: `${p.name} is listed twice; give one quantity` }]);
    seen.add(p.productId);
    const kg = Math.round(l.tonnes * 1000);
    const listMinor = bookingAmounts([{ kg, pricePerTMinor: p.pricePerTMinor }], 0, 0).listMinor;
    return { productId: p.productId, name: p.name, grade: p.grade, kg, pricePerTMinor: p.pricePerTMinor, listMinor, nutrients: nutrientsOf(kg, p) };
  });
}

const NUTRIENT_WORD: Record<Nutrient, string> = { nitrogen: 'nitrogen (N)', phosphate: 'phosphate (P2O5)', potash: 'potash (K2O)' };

/** Quantities far above the farm's projected need (or, without one, a very high N per ha) ask for confirmation. */
function largeQuantityProblems(lines: BookingLine[], need: NutrientAmounts | null, landHa: number) {
  const booked = sumNutrients(lines);
  const problems: { path: string; message: string }[] = [];
  if (need) {
    for (const n of NUTRIENTS)
      if (need[n] > 0 && booked[n] > LARGE_BOOKING_FACTOR * need[n])
        problems.push({ path: `nutrients.${n}`, message: `${Math.round(booked[n]).toLocaleString('en-GB')} kg of ${NUTRIENT_WORD[n]} is ${(booked[n] / need[n]).toFixed(1)} times your farm's projected need of ${Math.round(need[n]).toLocaleString('en-GB')} kg` });
  } else if (landHa > 0 && booked.nitrogen / landHa > LARGE_N_PER_HA) {
    problems.push({ path: 'nutrients.nitrogen', message: `${Math.round(booked.nitrogen / landHa)} kg N per hectare is far above usual rates for your ${landHa} ha` });
  }
  return problems;
}

function facts(b: BookingRow, season: string, deadline: string): BookingFacts {
  return { ...b, lines: b.lines as BookingLine[], season, deadline };
}

async function recipientOf(db: Db, userId: number): Promise<Recipient> {
  const u = await userRecipient(db, userId);
  if (!u) throw AppError.notFound('Your account');
  return u;
}

/** Places the farm's booking in the current round, or changes it (unpaid, before the deadline). */
export async function placeBooking(d: BookingDeps, user: { id: number; farmId: number | null }, input: BookingInput, bookingId?: number): Promise<BookingView> {
  const farm = await farmOf(d.db, user.farmId);
  const round = bookingId ? await roundOfBooking(d.db, bookingId, farm.id) : await currentRound(d.db);
  if (!round) throw AppError.unprocessable('No booking round is open; the co-op opens one when the season’s booking prices are set');
  const today = todayOf(d);
  const before = isBeforeDeadline(round.round, today);
  if (bookingId && !before) throw AppError.conflict(`The booking became firm on ${round.round.discountDeadline}; it can no longer change`);
  const budget = await budgetFacts(d.db, round.round.budgetId);
  const lines = buildLines(input, budget.products);
  const allowed = deliveryMonthsOf(budget.plan, today);
  if (!allowed.includes(input.deliveryMonth)) throw AppError.unprocessable(`Delivery in ${input.deliveryMonth} is not offered`, [{ path: 'deliveryMonth', message: `Choose one of ${allowed.join(', ')}` }]);
  if (!input.confirmLarge) {
    const need = (await projectedNeeds(d.db, round.round.seasonId, farm.id))?.needs.get(farm.id) ?? null;
    const problems = largeQuantityProblems(lines, need, farm.landHa);
    if (problems.length) throw AppError.needsConfirmation('These quantities are far above what your farm is projected to need. Check them, and confirm if they are meant.', problems);
  }
  const amounts = bookingAmounts(lines, before ? round.round.discountBp : 0, round.round.vatBp);
  const recipient = await recipientOf(d.db, user.id);
  const row = await d.db.transaction(async (tx) => {
    let saved: BookingRow;
    const values = {
      lines,
      deliveryMonth: input.deliveryMonth,
      currency: round.round.currency,
      listMinor: amounts.listMinor,
      discountBp: amounts.discountBp,
      discountMinor: amounts.discountMinor,
      netMinor: amounts.netMinor,
      vatBp: amounts.vatBp,
      vatMinor: amounts.vatMinor,
      totalMinor: amounts.totalMinor,
      updatedAt: new Date(),
    };
    if (bookingId) {
      const old = await lockFarmBooking(tx, bookingId, farm.id);
      if (!old) throw AppError.notFound('The booking');
      if (old.status !== 'placed') throw AppError.conflict(old.status === 'prepaid' ? 'The booking is prepaid; to change it, cancel it (the prepayment is refunded in full) and book again' : 'The booking is cancelled');
      if (input.version !== undefined && input.version !== old.version) throw AppError.stale('The booking was changed meanwhile; here is the stored one', old);
      saved = (await updateBooking(tx, old.id, { ...values, version: old.version + 1 }))!;
      // An unfinished payment of the old version is withdrawn; if it is still paid, it is refunded (payment-events.ts).
      const open = await pendingPaymentsOfBooking(tx, old.id);
      for (const p of open) {
        await updatePayment(tx, p.id, { state: 'failed', lastSource: 'booking changed', updatedAt: new Date() });
        await recordAudit(tx, { actorUserId: user.id, action: 'payment.state', entity: 'booking-payment', entityId: p.id, before: { state: 'pending' }, after: { state: 'failed', source: 'booking changed' } });
      }
      await recordAudit(tx, { actorUserId: user.id, action: 'booking.update', entity: 'booking', entityId: old.id, before: old, after: saved });
    } else {
      const existing = await activeBooking(tx, round.round.id, farm.id);
      if (existing) throw AppError.conflict(`Your farm already has booking ${existing.id} in ${round.season}; change that one`);
      saved = await insertBooking(tx, { ...values, roundId: round.round.id, farmId: farm.id, seasonId: round.round.seasonId, budgetId: round.round.budgetId, placedBy: user.id });
      await recordAudit(tx, { actorUserId: user.id, action: 'booking.create', entity: 'booking', entityId: saved.id, after: saved });
    }
    await bookingConfirmationMail(tx, d.mail, recipient, facts(saved, round.season, round.round.discountDeadline));
    return saved;
  });
  return bookingView(row, await paymentsOf(d.db, [row.id]), farm.name, round, today);
}

async function roundOfBooking(db: Db, bookingId: number, farmId: number | null) {
  const b = await farmBooking(db, bookingId, farmId);
  if (!b) throw AppError.notFound('The booking');
  return roundWithNames(db, b.roundId);
}

// ---- prepayment -----------------------------------------------------------------------------------

function gateway(d: BookingDeps): PaymentGateway {
  if (!d.payments) throw new AppError(503, 'payments_unavailable', 'Payments are not set up on this server (PAYMENT_SECRET_KEY)');
  return d.payments;
}

/** Starts (or resumes) the prepayment of a booking: a hosted checkout page to send the member to. */
export async function startCheckout(d: BookingDeps, user: { id: number; email: string; farmId: number | null }, bookingId: number): Promise<CheckoutStart> {
  const pay = gateway(d);
  const farm = await farmOf(d.db, user.farmId);
  let booking = await farmBooking(d.db, bookingId, farm.id);
  if (!booking) throw AppError.notFound('The booking');
  if (booking.status === 'prepaid') throw AppError.conflict('The booking is already prepaid');
  if (booking.status === 'cancelled') throw AppError.conflict('The booking is cancelled');
  const round = (await roundWithNames(d.db, booking.roundId))!;
  const today = todayOf(d);
  if (!isBeforeDeadline(round.round, today) && booking.discountMinor > 0) {
    // After the deadline the early-payment discount no longer applies: the amount is worked out again.
    const a = bookingAmounts(booking.lines as BookingLine[], 0, booking.vatBp);
    booking = await d.db.transaction(async (tx) => {
      const after = await updateBooking(tx, bookingId, { discountBp: 0, discountMinor: 0, netMinor: a.netMinor, vatMinor: a.vatMinor, totalMinor: a.totalMinor, version: booking!.version + 1, updatedAt: new Date() });
      await recordAudit(tx, { actorUserId: user.id, action: 'booking.update', entity: 'booking', entityId: bookingId, before: booking, after: { ...after, reason: 'paid after the discount deadline' } });
      return after!;
    });
  }
  const pending = (await paymentsOf(d.db, [booking.id])).filter((p) => p.state === 'pending' && p.bookingVersion === booking!.version && p.checkoutSessionId && p.checkoutUrl);
  if (pending.length) {
    const last = pending[pending.length - 1]!;
    const s = await pay.retrieveCheckout(last.checkoutSessionId!);
    if (s.status === 'open' && s.url) return { paymentId: last.id, url: s.url };
  }
  const b = booking;
  const payment = await d.db.transaction(async (tx) => {
    const p = await insertPayment(tx, { bookingId: b.id, bookingVersion: b.version, idempotencyKey: `booking-${b.id}-v${b.version}-${crypto.randomUUID()}`, amountMinor: b.totalMinor, currency: b.currency, state: 'pending', lastSource: 'member' });
    await recordAudit(tx, { actorUserId: user.id, action: 'payment.create', entity: 'booking-payment', entityId: p!.id, after: { state: 'pending', bookingId: b.id, amountMinor: b.totalMinor, currency: b.currency } });
    return p!;
  });
  const session = await createSessionFor(d, payment, b, round.season, user.email);
  return { paymentId: payment.id, url: session.url! };
}

/** Asks the service for the payment's checkout session (idempotent by the payment's key) and stores it. */
export async function createSessionFor(d: BookingDeps, payment: PaymentRow, b: BookingRow, season: string, email: string | null) {
  const pay = gateway(d);
  let session;
  try {
    session = await pay.createCheckout({
      amountMinor: payment.amountMinor,
      currency: payment.currency,
      description: `Fertiliser booking ${b.id}, ${season}, delivery ${b.deliveryMonth}`,
      bookingId: b.id,
      paymentId: payment.id,
      customerEmail: email,
      successUrl: `${d.mail.publicUrl}${BOOKING_PATH}?paid=${payment.id}`,
      cancelUrl: `${d.mail.publicUrl}${BOOKING_PATH}?cancelled=${payment.id}`,
      idempotencyKey: payment.idempotencyKey,
    });
  } catch (err) {
    throw new AppError(502, 'payment_service', `The payment service did not answer (${(err as Error).message}); nothing was charged. Try again in a moment.`);
  }
  await updatePayment(d.db, payment.id, { checkoutSessionId: session.sessionId, checkoutUrl: session.url, updatedAt: new Date() });
  return session;
}

// ---- cancelling -----------------------------------------------------------------------------------

/** Cancels a booking before the deadline; a prepaid one is refunded in full first. */
export async function cancelBooking(d: BookingDeps, user: { id: number; farmId: number | null }, bookingId: number): Promise<BookingView> {
  const farm = await farmOf(d.db, user.farmId);
  const booking = await farmBooking(d.db, bookingId, farm.id);
  if (!booking) throw AppError.notFound('The booking');
  if (booking.status === 'cancelled') throw AppError.conflict('The booking is already cancelled');
  const round = (await roundWithNames(d.db, booking.roundId))!;
  const today = todayOf(d);
  if (!isBeforeDeadline(round.round, today)) throw AppError.conflict(`The booking became firm on ${round.round.discountDeadline}; it can no longer be cancelled`);
  const recipient = await recipientOf(d.db, user.id);
  const paid = (await paymentsOf(d.db, [booking.id])).filter((p) => p.state === 'paid');
  for (const p of paid) await refundPayment(d, p, user.id, 'member cancelled', recipient);
  await d.db.transaction(async (tx) => {
    const old = await lockFarmBooking(tx, booking.id, farm.id);
    if (!old || old.status === 'cancelled') return;
    const after = await updateBooking(tx, old.id, { status: 'cancelled', version: old.version + 1, cancelledAt: new Date(), updatedAt: new Date() });
    const open = await pendingPaymentsOfBooking(tx, old.id);
    for (const p of open) {
      await updatePayment(tx, p.id, { state: 'failed', lastSource: 'booking cancelled', updatedAt: new Date() });
      await recordAudit(tx, { actorUserId: user.id, action: 'payment.state', entity: 'booking-payment', entityId: p.id, before: { state: 'pending' }, after: { state: 'failed', source: 'booking cancelled' } });
    }
    await recordAudit(tx, { actorUserId: user.id, action: 'booking.cancel', entity: 'booking', entityId: old.id, before: { status: old.status, version: old.version }, after: { status: after!.status, version: after!.version } });
    if (!paid.length) await cancellationMail(tx, d.mail, recipient, facts(after!, round.season, round.round.discountDeadline));
  });
  const row = await farmBooking(d.db, booking.id, farm.id);
  return bookingView(row!, await paymentsOf(d.db, [booking.id]), farm.name, round, today);
}

/**
 * Refunds a paid payment in full: the service is asked first (idempotent by `refund-<payment id>`,
 * so a retry after a crash gets the same refund), then the refund is recorded with its audit entry
 * and mail in one transaction. A paid booking whose payment this was goes back to `placed`.
 */
export async function refundPayment(d: BookingDeps, p: PaymentRow, actorUserId: number | null, source: string, recipient: Recipient | null) {
  if (!p.paymentIntentId) throw new AppError(409, 'conflict', `Payment ${p.id} has no payment reference to refund`);
  let refund;
  try {
    refund = await gateway(d).refund(p.paymentIntentId, p.amountMinor, `refund-${p.id}`);
  } catch (err) {
    throw new AppError(502, 'payment_service', `The payment service did not refund (${(err as Error).message}); the booking is unchanged. Try again in a moment.`);
  }
  await d.db.transaction(async (tx) => {
    const cur = await lockPayment(tx, p.id);
    if (!cur || cur.state !== 'paid') return;
    await updatePayment(tx, p.id, { state: 'refunded', refundId: refund.refundId, refundedAt: new Date(), lastSource: source, updatedAt: new Date() });
    await recordAudit(tx, { actorUserId, action: 'payment.state', entity: 'booking-payment', entityId: p.id, before: { state: 'paid' }, after: { state: 'refunded', refundId: refund.refundId, source } });
    const b = await lockBooking(tx, cur.bookingId);
    if (b && b.status === 'prepaid') await updateBooking(tx, b.id, { status: 'placed', updatedAt: new Date() });
    if (b && recipient) {
      const round = (await roundWithNames(tx, b.roundId))!;
      await refundMail(tx, d.mail, recipient, facts(b, round.season, round.round.discountDeadline), cur);
    }
  });
}
