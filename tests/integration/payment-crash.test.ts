/**
 * Kill the server between the payment service's confirmation of a prepayment and Netput recording
 * it, start it again on the same data folder, and check that the reconciliation job settles the
 * payment: the booking becomes prepaid, the receipt goes out once, and the webhook arriving late
 * changes nothing.
 *
 * The fake payment service runs in this test's process (so it outlives the server), and the server
 * is pointed at it with PAYMENT_SECRET_KEY / PAYMENT_WEBHOOK_SECRET / PAYMENT_API_URL, as it would be
 * at the real service. PAYMENT_WEBHOOK_DELAY_MS makes the first server pause after verifying the
 * webhook and before recording it; the SIGKILL lands in that pause. The restarted server gets no
 * webhook at all (the fake's webhooks are turned off), so only reconciliation can settle it.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { startFakePayments, type FakePayments } from '../../server/bookings/fake-payments.js';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp.js';
import { HttpSession, startServerProcess, type ServerProcess } from './server-process.js';
import { sleep, until } from '../polling.js';

let fake: FakePayments;
let smtp: FakeSmtp;
let dataDir: string;
const servers: ServerProcess[] = [];

afterAll(async () => {
  for (const s of servers) await s.stop('SIGKILL').catch(() => {});
  await fake?.close();
  await smtp?.close();
  if (dataDir) fs.rmSync(dataDir, { recursive: true, force: true });
});

async function signIn(base: string, email: string) {
  const s = new HttpSession(base);
  const r = await s.request('POST', '/api/auth/login', { email, password: 'netput-demo' });
  expect(r.status).toBe(200);
  return s;
}

describe('a crash between the payment service’s confirmation and Netput recording it', () => {
  it('is settled by the reconciliation job after a restart, with one receipt', async () => {
    fake = await startFakePayments();
    smtp = await startFakeSmtp();
    dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'netput-payment-crash-'));
    const env = {
      DATA_DIR: dataDir,
      DATABASE_URL: '',
      NODE_ENV: 'production',
      SMTP_URL: smtp.url,
      PAYMENT_SECRET_KEY: fake.secretKey,
      PAYMENT_WEBHOOK_SECRET: fake.webhookSecret,
      PAYMENT_API_URL: `http://127.0.0.1:${fake.port}`,
    };
    const first = await startServerProcess({ ...env, PAYMENT_WEBHOOK_DELAY_MS: '4000', PAYMENT_RECONCILE_MS: '3600000' });
    servers.push(first);

    const treasurer = await signIn(first.url, 'treasurer@example.org');
    const budget = await treasurer.request('POST', '/api/budgets', {
      name: 'Crash test',
      source: { kind: 'manual', nKg: 100_000, p2o5Kg: 0, k2oKg: 0 },
      bookingPlan: { months: [{ month: '2026-12', share: 1, prepay: true }], prepayDiscountPct: 2, paymentTermsDays: 30, deliveryMonth: '2027-03', financingRatePct: null },
    });
    expect(budget.status).toBe(201);
    expect((await treasurer.request('PUT', '/api/bookings/rounds', { season: '2026/27', budgetId: budget.body.id, discountDeadline: '2099-01-31', vatPct: 20 })).status).toBe(200);
    const member = await signIn(first.url, 'member@example.org');
    const offer = (await member.request('GET', '/api/bookings/offer')).body;
    const urea = offer.products.find((p: { name: string }) => p.name === 'Urea').productId;
    const booking = await member.request('POST', '/api/bookings', { lines: [{ productId: urea, tonnes: 3 }], deliveryMonth: '2027-03' });
    expect(booking.status).toBe(201);
    const checkout = await member.request('POST', `/api/bookings/${booking.body.id}/checkout`);
    expect(checkout.status).toBe(201);
    const sessionId = new URL(checkout.body.url).pathname.split('/').pop()!;

    // The member pays; the service confirms and sends the webhook, which the server verifies and
    // then holds for 4 s: the kill lands there.
    fake.setWebhookTarget(async (body, signature) => (await fetch(`${first.url}/api/payments/webhook`, { method: 'POST', headers: { 'content-type': 'application/json', 'stripe-signature': signature }, body })).status);
    const delivery = fake.complete(sessionId);
    for (let i = 0; i < 200 && !/payment webhook evt_\S+ verified/.test(first.output()); i++) await sleep(50);
    expect(first.output()).toMatch(/payment webhook evt_\S+ verified/);
    await first.stop('SIGKILL');
    expect((await delivery)?.status).toBe('error');
    expect(fake.session(sessionId)).toMatchObject({ status: 'complete', payment_status: 'paid' });

    // Restart: no webhook reaches it; the reconciliation job (every 500 ms) asks the service.
    fake.setWebhooksOn(false);
    const second = await startServerProcess({ ...env, PAYMENT_RECONCILE_MS: '500' });
    servers.push(second);
    const member2 = await signIn(second.url, 'member@example.org');
    type Mine = { status: string; payments: { state: string; amountMinor: number }[] }[];
    const mine = await until('the reconciled prepayment', async () => {
      const m = (await member2.request('GET', '/api/bookings/mine')).body as Mine;
      return m[0]?.status === 'prepaid' ? m : undefined;
    }, 30_000, 250);
    expect(mine[0]).toMatchObject({ status: 'prepaid', payments: [{ state: 'paid' }] });
    // 3 t × 475.00 = 142,500; 2 % discount 2,850; net 139,650; VAT 20 % 27,930; total 167,580.
    expect(mine[0]!.payments[0]!.amountMinor).toBe(167_580);
    expect(fake.session(sessionId)!.amount_total).toBe(167_580);

    const receipts = async () => smtp.messages().filter((m) => m.subject.startsWith('Receipt: prepayment of booking'));
    await until('the receipt', async () => ((await receipts()).length > 0 ? true : undefined), 20_000, 250);
    expect(await receipts()).toHaveLength(1);

    // The webhook the first server never recorded arrives now: nothing changes twice.
    const late = fake.deliveries().find((d) => d.type === 'checkout.session.completed')!;
    const res = await fetch(`${second.url}/api/payments/webhook`, { method: 'POST', headers: { 'content-type': 'application/json', 'stripe-signature': late.signature }, body: late.body });
    expect(await res.json()).toEqual({ duplicate: false, outcome: 'unchanged' });
    await sleep(1500);
    expect(await receipts()).toHaveLength(1);
    await second.stop();
  }, 400_000);
});
