import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedIn, startTestApp, type TestApp } from './test-app.js';

/** The development-mode page of the local fake payment service: an admin completes or fails a member's payment. */
let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ dev: true });
});
afterAll(async () => t?.close());

describe('test payments in development mode', () => {
  it('an admin lists the fake service’s sessions and completes one; the booking becomes prepaid', async () => {
    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    const member = await signedIn(t.app, 'member@example.org');
    const admin = await signedIn(t.app, 'admin@example.org');
    const budget = await treasurer.post('/api/budgets').send({
      name: 'Dev payments',
      source: { kind: 'manual', nKg: 50_000, p2o5Kg: 0, k2oKg: 0 },
      bookingPlan: { months: [{ month: '2026-12', share: 1, prepay: true }], prepayDiscountPct: 0, paymentTermsDays: 30, deliveryMonth: '2027-03', financingRatePct: null },
    });
    expect((await treasurer.put('/api/bookings/rounds').send({ season: '2026/27', budgetId: budget.body.id, discountDeadline: '2099-01-31', vatPct: 0 })).status).toBe(200);
    const urea = (await member.get('/api/bookings/offer')).body.products.find((p: { name: string }) => p.name === 'Urea').productId;
    const booking = (await member.post('/api/bookings').send({ lines: [{ productId: urea, tonnes: 1 }], deliveryMonth: '2027-03' })).body;
    await member.post(`/api/bookings/${booking.id}/checkout`);

    expect((await admin.get('/api/dev/payments/status')).body).toEqual({ available: true });
    expect((await member.get('/api/dev/payments')).status).toBe(403);
    const list = (await admin.get('/api/dev/payments')).body;
    expect(list.sessions[0]).toMatchObject({ status: 'open', amount_total: 47_500, currency: 'eur' });
    const done = await admin.post(`/api/dev/payments/${list.sessions[0].id}/complete`);
    expect(done.status).toBe(200);
    expect(done.body).toMatchObject({ type: 'checkout.session.completed', status: 200 });
    expect((await admin.post(`/api/dev/payments/${list.sessions[0].id}/fail`)).status).toBe(409);
    expect((await member.get('/api/bookings/offer')).body.booking.status).toBe('prepaid');
  });
});
