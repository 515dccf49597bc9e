import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq, like } from 'drizzle-orm';
import supertest from 'supertest';
import { signedIn, startTestApp, type TestApp } from './test-app.js';
import { auditLog, bookingPayments, bookingRounds, bookings, farms, mailOutbox, users } from '../../server/db/schema/index.js';
import { bookingDeps } from '../../server/bookings/bookings-router.js';
import { reconcilePayments, sendBookingReminders } from '../../server/bookings/payment-events.js';
import { DateTime } from 'luxon';

/**
 * Member bookings against the local fake payment service: booking → checkout → signed webhook →
 * receipt; signature failure, replay, out-of-order and lost webhooks; cancellation with refund;
 * the deadline; scoping to the member's own farm; the treasurer's and planner's figures.
 * Money figures are worked by hand from the demo prices (Urea 475.00 per t, muriate of potash
 * 355.00 per t; invented) and the rules in docs/bookings.md.
 */
let t: TestApp;
let treasurer: Awaited<ReturnType<typeof signedIn>>;
let member: Awaited<ReturnType<typeof signedIn>>;
let planner: Awaited<ReturnType<typeof signedIn>>;
let budgetId: number;
let roundId: number;
let urea: number;
let mop: number;

const bookingPlan = {
  months: [
    { month: '2026-12', share: 0.6, prepay: true },
    { month: '2027-01', share: 0.4, prepay: true },
  ],
  prepayDiscountPct: 2.5,
  paymentTermsDays: 30,
  deliveryMonth: '2027-03',
  financingRatePct: null,
};

const outbox = (kind: string) => t.database.db.select().from(mailOutbox).where(eq(mailOutbox.kind, kind));
const paymentAudit = () => t.database.db.select().from(auditLog).where(eq(auditLog.entity, 'booking-payment'));

async function round(deadline: string) {
  const r = await treasurer.put('/api/bookings/rounds').send({ season: '2026/27', budgetId, discountDeadline: deadline, vatPct: 20 });
  expect(r.status).toBe(200);
  return r.body;
}

beforeAll(async () => {
  t = await startTestApp();
  treasurer = await signedIn(t.app, 'treasurer@example.org');
  member = await signedIn(t.app, 'member@example.org');
  planner = await signedIn(t.app, 'planner@example.org');
  const products = (await treasurer.get('/api/fertiliser-products')).body as { id: number; name: string }[];
  urea = products.find((p) => p.name === 'Urea')!.id;
  mop = products.find((p) => p.name === 'Muriate of potash')!.id;
  const budget = await treasurer.post('/api/budgets').send({ name: 'Bookings 2026/27', source: { kind: 'manual', nKg: 400_000, p2o5Kg: 100_000, k2oKg: 120_000 }, bookingPlan });
  expect(budget.status).toBe(201);
  budgetId = budget.body.id;
  roundId = (await round('2099-01-31')).id;
});
afterAll(async () => t?.close());

describe('member bookings with prepayment', () => {
  let bookingId: number;
  let paymentId: number;
  let sessionId: string;

  it('the member sees the booking prices of the round’s budget, the discount, VAT and the deadline', async () => {
    const offer = await member.get('/api/bookings/offer');
    expect(offer.status).toBe(200);
    expect(offer.body.round).toMatchObject({ id: roundId, season: '2026/27', discountBp: 250, vatBp: 2000, currency: 'EUR', discountDeadline: '2099-01-31', beforeDeadline: true });
    expect(offer.body.products.find((p: { productId: number }) => p.productId === urea)).toMatchObject({ name: 'Urea', pricePerTMinor: 47_500, nPct: 46, grade: '46-0-0' });
    expect(offer.body.deliveryMonths).toContain('2027-03');
    expect(offer.body.cautions.join(' ')).toMatch(/certified adviser/);
    expect(offer.body.booking).toBeNull();
  });

  it('a booking is priced on the server in minor units, and confirmed by one e-mail', async () => {
    const res = await member.post('/api/bookings').send({ lines: [{ productId: urea, tonnes: 10 }, { productId: mop, tonnes: 2.5 }], deliveryMonth: '2027-03', listMinor: 1 });
    expect(res.status).toBe(400); // the client does not send amounts
    const ok = await member.post('/api/bookings').send({ lines: [{ productId: urea, tonnes: 10 }, { productId: mop, tonnes: 2.5 }], deliveryMonth: '2027-03' });
    expect(ok.status).toBe(201);
    // Urea 10,000 kg × 47,500 / 1000 = 475,000; MOP 2,500 × 35,500 / 1000 = 88,750; list 563,750;
    // discount 2.5 % = 14,093.75 → 14,094; net 549,656; VAT 20 % = 109,931.2 → 109,931; total 659,587.
    expect(ok.body).toMatchObject({ status: 'placed', version: 1, listMinor: 563_750, discountMinor: 14_094, netMinor: 549_656, vatMinor: 109_931, totalMinor: 659_587, changeable: true });
    // 10 t of 46-0-0 bring 4,600 kg N; 2.5 t of 0-0-60 bring 1,500 kg K2O.
    expect(ok.body.nutrients).toEqual({ nitrogen: 4600, phosphate: 0, potash: 1500 });
    bookingId = ok.body.id;
    const again = await member.post('/api/bookings').send({ lines: [{ productId: urea, tonnes: 1 }], deliveryMonth: '2027-03' });
    expect(again.status).toBe(409);
    expect(await outbox('booking-confirmation')).toHaveLength(1);
  });

  it('a change before the deadline is priced again and confirmed again; a stale version is refused', async () => {
    const changed = await member.put(`/api/bookings/${bookingId}`).send({ lines: [{ productId: urea, tonnes: 12 }, { productId: mop, tonnes: 2.5 }], deliveryMonth: '2027-03', version: 1 });
    expect(changed.status).toBe(200);
    // Urea 570,000 + MOP 88,750 = 658,750; discount 16,468.75 → 16,469; net 642,281; VAT 128,456.2 → 128,456; total 770,737.
    expect(changed.body).toMatchObject({ version: 2, listMinor: 658_750, discountMinor: 16_469, netMinor: 642_281, vatMinor: 128_456, totalMinor: 770_737 });
    const stale = await member.put(`/api/bookings/${bookingId}`).send({ lines: [{ productId: urea, tonnes: 1 }], deliveryMonth: '2027-03', version: 1 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('stale');
    expect(await outbox('booking-confirmation')).toHaveLength(2);
  });

  it('checkout → payment on the hosted page → signed webhook → prepaid, with one receipt', async () => {
    const start = await member.post(`/api/bookings/${bookingId}/checkout`);
    expect(start.status).toBe(201);
    paymentId = start.body.paymentId;
    sessionId = new URL(start.body.url).pathname.split('/').pop()!;
    expect(t.payments.session(sessionId)).toMatchObject({ amount_total: 770_737, currency: 'eur', status: 'open', metadata: { bookingId: String(bookingId), paymentId: String(paymentId) } });
    // Asking again gives the same open session, not a second payment.
    const resumed = await member.post(`/api/bookings/${bookingId}/checkout`);
    expect(resumed.body.paymentId).toBe(paymentId);
    const delivery = await t.payments.complete(sessionId);
    expect(delivery?.status).toBe(200);
    const [p] = await t.database.db.select().from(bookingPayments).where(eq(bookingPayments.id, paymentId));
    expect(p).toMatchObject({ state: 'paid', amountMinor: 770_737, currency: 'EUR' });
    expect(p!.paymentIntentId).toMatch(/^pi_fake_/);
    const mine = (await member.get('/api/bookings/mine')).body;
    expect(mine[0]).toMatchObject({ id: bookingId, status: 'prepaid' });
    expect(await outbox('booking-receipt')).toHaveLength(1);
    expect((await outbox('booking-receipt'))[0]!.textBody).toContain('EUR 7,707.37');
    const audit = await paymentAudit();
    expect(audit.map((a) => `${a.action}:${(a.after as { state: string }).state}`)).toEqual(['payment.create:pending', 'payment.state:paid']);
  });

  it('a replayed event changes nothing twice', async () => {
    const original = t.payments.deliveries().find((d) => d.type === 'checkout.session.completed')!;
    const replay = await supertest(t.app).post('/api/payments/webhook').set('content-type', 'application/json').set('stripe-signature', original.signature).send(original.body);
    expect(replay.status).toBe(200);
    expect(replay.body).toEqual({ duplicate: true, outcome: 'paid' });
    expect(await outbox('booking-receipt')).toHaveLength(1);
    expect(await paymentAudit()).toHaveLength(2);
  });

  it('a forged or altered event is refused and not recorded', async () => {
    const original = t.payments.deliveries().find((d) => d.type === 'checkout.session.completed')!;
    const altered = original.body.replace('"amount_total":770737', '"amount_total":1');
    const res = await supertest(t.app).post('/api/payments/webhook').set('content-type', 'application/json').set('stripe-signature', original.signature).send(altered);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('bad_signature');
    const none = await supertest(t.app).post('/api/payments/webhook').set('content-type', 'application/json').send(original.body);
    expect(none.status).toBe(400);
    const other = t.payments.signedEvent('checkout.session.completed', t.payments.session(sessionId)!);
    const wrongSecret = other.signature.replace(/v1=[0-9a-f]+/, 'v1=' + '0'.repeat(64));
    expect((await supertest(t.app).post('/api/payments/webhook').set('content-type', 'application/json').set('stripe-signature', wrongSecret).send(other.body)).status).toBe(400);
  });

  it('an out-of-order event (expiry after payment) changes nothing', async () => {
    const late = t.payments.signedEvent('checkout.session.expired', { ...t.payments.session(sessionId)!, status: 'expired', payment_status: 'unpaid' });
    const res = await supertest(t.app).post('/api/payments/webhook').set('content-type', 'application/json').set('stripe-signature', late.signature).send(late.body);
    expect(res.body).toEqual({ duplicate: false, outcome: 'unchanged' });
    const [p] = await t.database.db.select().from(bookingPayments).where(eq(bookingPayments.id, paymentId));
    expect(p!.state).toBe('paid');
  });

  it('the treasurer sees the booking against the budget and the cash plan; the planner sees booked nutrients', async () => {
    const report = await treasurer.get(`/api/bookings/rounds/${roundId}/report`);
    expect(report.status).toBe(200);
    const ureaRow = report.body.rows.find((r: { productId: number; deliveryMonth: string | null }) => r.productId === urea && r.deliveryMonth === null);
    expect(ureaRow).toMatchObject({ bookedT: 12 });
    expect(report.body.totals).toMatchObject({ bookedT: 14.5, prepaidMinor: 770_737, outstandingMinor: 0, bookings: 1, farmsBooked: 1 });
    const month = DateTime.utc().toFormat('yyyy-MM');
    expect(report.body.cash.find((c: { month: string }) => c.month === month).receivedMinor).toBe(770_737);
    const csv = await treasurer.get(`/api/bookings/rounds/${roundId}/report/export?format=csv`);
    expect(csv.status).toBe(200);
    expect(csv.text.replace(/^\uFEFF/, '').split(/\r?\n/)[0]).toBe('product,delivery_month,budget_t,booked_t,not_yet_booked_t,booked_net,prepaid,outstanding,currency');
    expect(csv.text).toContain('Urea,all,');
    const xlsx = await treasurer.get(`/api/bookings/rounds/${roundId}/report/export?format=xlsx`).buffer(true);
    expect(xlsx.status).toBe(200);
    const nutrients = await planner.get(`/api/bookings/rounds/${roundId}/nutrients`);
    expect(nutrients.status).toBe(200);
    expect(nutrients.body.coop.booked).toEqual({ nitrogen: 5520, phosphate: 0, potash: 1500 });
    expect((await member.get(`/api/bookings/rounds/${roundId}/report`)).status).toBe(403);
  });

  it('cancelling before the deadline refunds the prepayment in full, once', async () => {
    const res = await member.post(`/api/bookings/${bookingId}/cancel`);
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('cancelled');
    expect(t.payments.refunds()).toEqual([expect.objectContaining({ amount: 770_737, status: 'succeeded' })]);
    const [p] = await t.database.db.select().from(bookingPayments).where(eq(bookingPayments.id, paymentId));
    expect(p!.state).toBe('refunded');
    expect(await outbox('booking-refund')).toHaveLength(1);
    expect((await member.post(`/api/bookings/${bookingId}/cancel`)).status).toBe(409);
    const audit = await paymentAudit();
    expect(audit.map((a) => (a.after as { state: string }).state)).toEqual(['pending', 'paid', 'refunded']);
  });
});

describe('lost webhooks, failures and the deadline', () => {
  it('a payment whose webhook never arrived is settled by reconciliation; the late webhook then changes nothing', async () => {
    const b = (await member.post('/api/bookings').send({ lines: [{ productId: urea, tonnes: 2 }], deliveryMonth: '2027-03' })).body;
    const start = (await member.post(`/api/bookings/${b.id}/checkout`)).body;
    const sessionId = new URL(start.url).pathname.split('/').pop()!;
    t.payments.setWebhooksOn(false);
    try {
      await t.payments.complete(sessionId);
    } finally {
      t.payments.setWebhooksOn(true);
    }
    const before = await t.database.db.select().from(bookingPayments).where(eq(bookingPayments.id, start.paymentId));
    expect(before[0]!.state).toBe('pending');
    const receipts = (await outbox('booking-receipt')).length;
    const done = await reconcilePayments(bookingDeps(t.ctx), 0);
    expect(done).toMatchObject({ paid: 1, errors: 0 });
    const [after] = await t.database.db.select().from(bookingPayments).where(eq(bookingPayments.id, start.paymentId));
    expect(after).toMatchObject({ state: 'paid', lastSource: 'reconciliation' });
    expect(await outbox('booking-receipt')).toHaveLength(receipts + 1);
    const late = t.payments.deliveries().find((d) => d.body.includes(sessionId) && d.type === 'checkout.session.completed')!;
    const res = await supertest(t.app).post('/api/payments/webhook').set('content-type', 'application/json').set('stripe-signature', late.signature).send(late.body);
    expect(res.body).toEqual({ duplicate: false, outcome: 'unchanged' });
    expect(await outbox('booking-receipt')).toHaveLength(receipts + 1);
    expect((await member.post(`/api/bookings/${b.id}/cancel`)).status).toBe(200);
  });

  it('a failed payment leaves the booking placed, and the member can pay again', async () => {
    const b = (await member.post('/api/bookings').send({ lines: [{ productId: urea, tonnes: 1 }], deliveryMonth: '2027-03' })).body;
    const first = (await member.post(`/api/bookings/${b.id}/checkout`)).body;
    await t.payments.fail(new URL(first.url).pathname.split('/').pop()!);
    const [p] = await t.database.db.select().from(bookingPayments).where(eq(bookingPayments.id, first.paymentId));
    expect(p!.state).toBe('failed');
    expect((await member.get('/api/bookings/offer')).body.booking.status).toBe('placed');
    const second = (await member.post(`/api/bookings/${b.id}/checkout`)).body;
    expect(second.paymentId).not.toBe(first.paymentId);
    await t.payments.complete(new URL(second.url).pathname.split('/').pop()!);
    expect((await member.get('/api/bookings/offer')).body.booking.status).toBe('prepaid');
  });

  it('after the deadline a booking is firm: no change, no cancellation', async () => {
    const id = (await member.get('/api/bookings/offer')).body.booking.id;
    await round('2020-01-31');
    const offer = (await member.get('/api/bookings/offer')).body;
    expect(offer.round.beforeDeadline).toBe(false);
    expect(offer.booking.changeable).toBe(false);
    const cancel = await member.post(`/api/bookings/${id}/cancel`);
    expect(cancel.status).toBe(409);
    expect(cancel.body.error.message).toMatch(/firm/);
    expect((await member.put(`/api/bookings/${id}`).send({ lines: [{ productId: urea, tonnes: 3 }], deliveryMonth: '2027-03' })).status).toBe(409);
    await round('2099-01-31');
    expect((await member.post(`/api/bookings/${id}/cancel`)).status).toBe(200);
  });

  it('events out of order: an expiry delivered before the payment, then the payment, end paid; the expiry again changes nothing', async () => {
    const offer = (await member.get('/api/bookings/offer')).body;
    if (offer.booking) expect((await member.post(`/api/bookings/${offer.booking.id}/cancel`)).status).toBe(200);
    const b = (await member.post('/api/bookings').send({ lines: [{ productId: mop, tonnes: 1 }], deliveryMonth: '2027-03' })).body;
    const start = (await member.post(`/api/bookings/${b.id}/checkout`)).body;
    const sessionId = new URL(start.url).pathname.split('/').pop()!;
    const session = t.payments.session(sessionId)!;
    const send = (e: { body: string; signature: string }) => supertest(t.app).post('/api/payments/webhook').set('content-type', 'application/json').set('stripe-signature', e.signature).send(e.body);
    const expired = t.payments.signedEvent('checkout.session.expired', { ...session, status: 'expired' });
    const completed = t.payments.signedEvent('checkout.session.completed', { ...session, status: 'complete', payment_status: 'paid', payment_intent: 'pi_fake_out_of_order' });
    expect((await send(expired)).body.outcome).toBe('failed');
    expect((await send(completed)).body.outcome).toBe('paid');
    expect((await send(expired)).body).toEqual({ duplicate: true, outcome: 'failed' });
    const [p] = await t.database.db.select().from(bookingPayments).where(eq(bookingPayments.id, start.paymentId));
    expect(p!.state).toBe('paid');
    expect((await member.get('/api/bookings/offer')).body.booking.status).toBe('prepaid');
    // The fake never took this money (the events were made by hand): cancel without a refund call.
    await t.database.db.update(bookings).set({ status: 'cancelled' }).where(eq(bookings.id, b.id));
  });
});

describe('safety', () => {
  it('a member sees and touches only their own farm’s bookings', async () => {
    const [mine] = await t.database.db.select({ farmId: users.farmId }).from(users).where(eq(users.email, 'member@example.org'));
    const [other] = (await t.database.db.select().from(farms)).filter((f) => f.id !== mine!.farmId);
    const [row] = await t.database.db
      .insert(bookings)
      .values({ roundId, farmId: other!.id, seasonId: (await t.database.db.select().from(bookingRounds).where(eq(bookingRounds.id, roundId)))[0]!.seasonId, budgetId, lines: [], deliveryMonth: '2027-03', currency: 'EUR', listMinor: 100, discountBp: 0, discountMinor: 0, netMinor: 100, vatBp: 0, vatMinor: 0, totalMinor: 100 })
      .returning();
    expect((await member.get('/api/bookings/mine')).body.every((b: { farmId: number }) => b.farmId === mine!.farmId)).toBe(true);
    expect((await member.post(`/api/bookings/${row!.id}/cancel`)).status).toBe(404);
    expect((await member.post(`/api/bookings/${row!.id}/checkout`)).status).toBe(404);
    expect((await member.put(`/api/bookings/${row!.id}`).send({ lines: [{ productId: urea, tonnes: 1 }], deliveryMonth: '2027-03' })).status).toBe(404);
    await t.database.db.delete(bookings).where(eq(bookings.id, row!.id));
  });

  it('quantities far above usual rates ask for confirmation; confirmed, they are booked', async () => {
    const offer = (await member.get('/api/bookings/offer')).body;
    // Without a published projection: more than 400 kg N per ha asks (1 t of urea per ha is 460 kg N/ha).
    const tonnes = Math.ceil(offer.farm.landHa);
    const res = await member.post('/api/bookings').send({ lines: [{ productId: urea, tonnes }], deliveryMonth: '2027-03' });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('needs_confirmation');
    expect(res.body.error.details[0].path).toBe('nutrients.nitrogen');
    const ok = await member.post('/api/bookings').send({ lines: [{ productId: urea, tonnes }], deliveryMonth: '2027-03', confirmLarge: true });
    expect(ok.status).toBe(201);
    expect((await member.post(`/api/bookings/${ok.body.id}/cancel`)).status).toBe(200);
  });

  it('bad input names what and where', async () => {
    const res = await member.post('/api/bookings').send({ lines: [{ productId: urea, tonnes: -1 }, { productId: mop, tonnes: 1.0001 }], deliveryMonth: '2027-13' });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual(
      expect.arrayContaining([
        { path: 'body.lines.0.tonnes', message: 'Book more than 0 t, or leave the product out' },
        { path: 'body.lines.1.tonnes', message: 'Give tonnes to at most three decimals (the kilogram)' },
        { path: 'body.deliveryMonth', message: 'Use YYYY-MM, e.g. 2027-02' },
      ]),
    );
    const month = await member.post('/api/bookings').send({ lines: [{ productId: urea, tonnes: 1 }], deliveryMonth: '2030-01' });
    expect(month.status).toBe(422);
    expect(month.body.error.details[0].path).toBe('deliveryMonth');
  });

  it('a reminder goes once to each member who has not booked, as a skipped row for one who opted out', async () => {
    const soon = DateTime.utc().plus({ days: 3 }).toISODate()!;
    await round(soon);
    const [opted] = await t.database.db.select().from(users).where(and(eq(users.role, 'member'), like(users.email, '%@example.org'))).limit(2).offset(1);
    await t.database.db.update(users).set({ mailOptOut: true }).where(eq(users.id, opted!.id));
    const deps = bookingDeps(t.ctx);
    const n = await sendBookingReminders(deps);
    expect(n).toBeGreaterThan(0);
    await sendBookingReminders(deps);
    const rows = await outbox('booking-reminder');
    expect(rows).toHaveLength(n);
    expect(rows.find((r) => r.userId === opted!.id)!.status).toBe('skipped');
    await round('2099-01-31');
  });
});

