/**
 * A local fake of the payment service (development and tests), like the fake SMTP server for mail.
 * It answers the few calls Netput makes through the `stripe` SDK — create and read a Checkout
 * Session, create a refund — in the SDK's own wire format (form-encoded requests, JSON answers,
 * Idempotency-Key honoured), serves a hosted "checkout" page where a payment is completed or
 * failed, and sends webhooks signed with the SDK's own scheme (`webhooks.generateTestHeaderString`),
 * which Netput verifies with `constructEvent` exactly as it would the real service's.
 * Nothing here is ever used when PAYMENT_SECRET_KEY is set.
 */
import crypto from 'node:crypto';
import http from 'node:http';
import Stripe from 'stripe';

export interface FakeSession {
  id: string;
  object: 'checkout.session';
  status: 'open' | 'complete' | 'expired';
  payment_status: 'unpaid' | 'paid';
  amount_total: number;
  currency: string;
  client_reference_id: string | null;
  customer_email: string | null;
  metadata: Record<string, string>;
  payment_intent: string | null;
  success_url: string;
  cancel_url: string;
  url: string;
  created: number;
  description: string;
  livemode: false;
  mode: 'payment';
}

export interface FakeRefund {
  id: string;
  object: 'refund';
  amount: number;
  payment_intent: string;
  status: 'succeeded';
  currency: string;
  created: number;
}

export interface FakeDelivery {
  eventId: string;
  type: string;
  status: number | 'not sent' | 'error';
  at: string;
  /** The signed body and header as sent (tests replay them). */
  body: string;
  signature: string;
}

/** Sends one signed webhook; answers the HTTP status Netput gave. */
export type WebhookTarget = (body: string, signature: string) => Promise<number>;

export interface FakePayments {
  port: number;
  /** The SDK's options pointing at this fake. */
  api: { host: string; port: number; protocol: 'http' };
  secretKey: string;
  webhookSecret: string;
  sessions(): FakeSession[];
  session(id: string): FakeSession | undefined;
  refunds(): FakeRefund[];
  deliveries(): FakeDelivery[];
  setWebhookTarget(target: WebhookTarget | null): void;
  /** Tests: false keeps webhooks from being sent (a lost webhook), the payment still completes. */
  setWebhooksOn(on: boolean): void;
  /** The member paid: the session completes; then `checkout.session.completed` is sent. */
  complete(sessionId: string): Promise<FakeDelivery | null>;
  /** The member gave up or the card was refused: the session expires; `checkout.session.expired` is sent. */
  fail(sessionId: string): Promise<FakeDelivery | null>;
  /** A signed event body and header, as the service would send them (tests: replay, out of order). */
  signedEvent(type: string, object: object, at?: number): { body: string; signature: string; eventId: string };
  close(): Promise<void>;
}

const html = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

function readBody(req: http.IncomingMessage): Promise<string> {
  return new Promise((resolve, reject) => {
    let b = '';
    req.setEncoding('utf8');
    req.on('data', (c: string) => {
      b += c;
      if (b.length > 100_000) req.destroy();
    });
    req.on('end', () => resolve(b));
    req.on('error', reject);
  });
}

function money(minor: number, currency: string) {
  return `${currency.toUpperCase()} ${(minor / 100).toFixed(2)}`;
}

export async function startFakePayments(options: { port?: number; secretKey?: string; webhookSecret?: string } = {}): Promise<FakePayments> {
  const secretKey = options.secretKey ?? `sk_test_fake_${crypto.randomBytes(12).toString('hex')}`;
  const webhookSecret = options.webhookSecret ?? `whsec_fake_${crypto.randomBytes(16).toString('hex')}`;
  const signer = new Stripe(secretKey, { telemetry: false });
  const sessions = new Map<string, FakeSession>();
  const refunds: FakeRefund[] = [];
  const deliveries: FakeDelivery[] = [];
  const idempotent = new Map<string, { status: number; body: string }>();
  let target: WebhookTarget | null = null;
  let webhooksOn = true;
  let port = 0;
  const rid = (prefix: string) => `${prefix}_fake_${crypto.randomBytes(10).toString('hex')}`;

  function signedEvent(type: string, object: object, at = Math.floor(Date.now() / 1000)) {
    const eventId = rid('evt');
    const body = JSON.stringify({ id: eventId, object: 'event', api_version: null, created: at, livemode: false, pending_webhooks: 1, request: { id: null, idempotency_key: null }, type, data: { object } });
    const signature = signer.webhooks.generateTestHeaderString({ payload: body, secret: webhookSecret });
    return { body, signature, eventId };
  }

  async function send(type: string, object: object): Promise<FakeDelivery | null> {
    const ev = signedEvent(type, object);
    const d: FakeDelivery = { eventId: ev.eventId, type, status: 'not sent', at: new Date().toISOString(), body: ev.body, signature: ev.signature };
    deliveries.push(d);
    if (!webhooksOn || !target) return d;
    try {
      d.status = await target(ev.body, ev.signature);
    } catch {
      d.status = 'error';
    }
    return d;
  }

  const fake: Omit<FakePayments, 'port' | 'api'> = {
    secretKey,
    webhookSecret,
    sessions: () => [...sessions.values()].map((s) => ({ ...s })),
    session: (id) => (sessions.has(id) ? { ...sessions.get(id)! } : undefined),
    refunds: () => [...refunds],
    deliveries: () => [...deliveries],
    setWebhookTarget: (t) => {
      target = t;
    },
    setWebhooksOn: (on) => {
      webhooksOn = on;
    },
    async complete(id) {
      const s = sessions.get(id);
      if (!s || s.status !== 'open') return null;
      s.status = 'complete';
      s.payment_status = 'paid';
      s.payment_intent = rid('pi');
      return send('checkout.session.completed', { ...s });
    },
    async fail(id) {
      const s = sessions.get(id);
      if (!s || s.status !== 'open') return null;
      s.status = 'expired';
      return send('checkout.session.expired', { ...s });
    },
    signedEvent,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };

  function json(res: http.ServerResponse, status: number, body: unknown) {
    res.writeHead(status, { 'content-type': 'application/json' });
    res.end(JSON.stringify(body));
  }
  const apiError = (res: http.ServerResponse, status: number, message: string, type = 'invalid_request_error') => json(res, status, { error: { type, message } });

  async function api(req: http.IncomingMessage, res: http.ServerResponse, url: URL) {
    if (req.headers.authorization !== `Bearer ${secretKey}`) return apiError(res, 401, 'Invalid API key provided', 'authentication_error');
    const key = req.headers['idempotency-key'];
    const idemKey = typeof key === 'string' && req.method === 'POST' ? `${url.pathname}:${key}` : null;
    if (idemKey && idempotent.has(idemKey)) {
      const prior = idempotent.get(idemKey)!;
      res.writeHead(prior.status, { 'content-type': 'application/json', 'idempotent-replayed': 'true' });
      return res.end(prior.body);
    }
    const form = new URLSearchParams(req.method === 'POST' ? await readBody(req) : '');
    const reply = (status: number, body: unknown) => {
      const text = JSON.stringify(body);
      if (idemKey) idempotent.set(idemKey, { status, body: text });
      res.writeHead(status, { 'content-type': 'application/json' });
      res.end(text);
    };
    if (req.method === 'POST' && url.pathname === '/v1/checkout/sessions') {
      const amount = Number(form.get('line_items[0][price_data][unit_amount]'));
      const quantity = Number(form.get('line_items[0][quantity]') ?? 1);
      const currency = form.get('line_items[0][price_data][currency]') ?? '';
      if (!Number.isSafeInteger(amount) || amount <= 0 || !/^[a-z]{3}$/.test(currency)) return apiError(res, 400, 'line_items[0][price_data]: a positive unit_amount and a currency are required');
      const metadata: Record<string, string> = {};
      for (const [k, v] of form) {
        const m = /^metadata\[(.+)\]$/.exec(k);
        if (m) metadata[m[1]!] = v;
      }
      const id = rid('cs');
      const s: FakeSession = {
        id,
        object: 'checkout.session',
        status: 'open',
        payment_status: 'unpaid',
        amount_total: amount * quantity,
        currency,
        client_reference_id: form.get('client_reference_id'),
        customer_email: form.get('customer_email'),
        metadata,
        payment_intent: null,
        success_url: form.get('success_url') ?? '',
        cancel_url: form.get('cancel_url') ?? '',
        url: `http://127.0.0.1:${port}/pay/${id}`,
        created: Math.floor(Date.now() / 1000),
        description: form.get('line_items[0][price_data][product_data][name]') ?? '',
        livemode: false,
        mode: 'payment',
      };
      sessions.set(id, s);
      return reply(200, s);
    }
    const get = /^\/v1\/checkout\/sessions\/([A-Za-z0-9_]+)$/.exec(url.pathname);
    if (req.method === 'GET' && get) {
      const s = sessions.get(get[1]!);
      return s ? json(res, 200, s) : apiError(res, 404, `No such checkout.session: '${get[1]}'`);
    }
    if (req.method === 'POST' && url.pathname === '/v1/refunds') {
      const pi = form.get('payment_intent') ?? '';
      const s = [...sessions.values()].find((x) => x.payment_intent === pi && x.payment_status === 'paid');
      if (!s) return apiError(res, 400, `No paid payment ${pi}`);
      const already = refunds.filter((r) => r.payment_intent === pi).reduce((a, r) => a + r.amount, 0);
      const amount = form.has('amount') ? Number(form.get('amount')) : s.amount_total - already;
      if (!Number.isSafeInteger(amount) || amount <= 0 || amount + already > s.amount_total) return apiError(res, 400, `Refund of ${amount} exceeds what is left of the ${s.amount_total} paid`);
      const r: FakeRefund = { id: rid('re'), object: 'refund', amount, payment_intent: pi, status: 'succeeded', currency: s.currency, created: Math.floor(Date.now() / 1000) };
      refunds.push(r);
      return reply(200, r);
    }
    return apiError(res, 404, `Unrecognized request URL (${req.method}: ${url.pathname}); the local fake payment service implements only what Netput uses`);
  }

  /** The hosted checkout page: a form per outcome, no script (served from the fake's own origin). */
  async function page(req: http.IncomingMessage, res: http.ServerResponse, url: URL) {
    const m = /^\/pay\/([A-Za-z0-9_]+)(?:\/(complete|fail))?$/.exec(url.pathname);
    const s = m ? sessions.get(m[1]!) : undefined;
    if (!m || !s) {
      res.writeHead(404, { 'content-type': 'text/plain; charset=utf-8' });
      return res.end('No such payment');
    }
    if (req.method === 'POST' && m[2]) {
      await readBody(req);
      if (m[2] === 'complete') await fake.complete(s.id);
      else await fake.fail(s.id);
      res.writeHead(303, { location: m[2] === 'complete' ? s.success_url : s.cancel_url });
      return res.end();
    }
    const open = s.status === 'open';
    res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' });
    res.end(`<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>Local test payment</title>
<style>body{font-family:system-ui,sans-serif;max-width:28rem;margin:2rem auto;padding:0 1rem;color:#1b1b1b}p.note{background:#fff4d6;padding:.75rem;border-radius:6px}button{font:inherit;padding:.7rem 1.2rem;margin:.3rem .3rem 0 0;border-radius:6px;border:1px solid #555;background:#fff;cursor:pointer}button.pay{background:#1d5c3a;color:#fff;border-color:#1d5c3a}</style></head>
<body><h1>Local test payment</h1>
<p class="note">This is Netput's local fake payment service (development and tests). No card is asked for and no money moves.</p>
<p>${html(s.description)}</p><p><strong>${html(money(s.amount_total, s.currency))}</strong></p>
<p>Status: ${html(s.status)}${s.payment_status === 'paid' ? ' (paid)' : ''}</p>
${open ? `<form method="post" action="/pay/${s.id}/complete"><button class="pay" type="submit">Pay ${html(money(s.amount_total, s.currency))}</button></form>
<form method="post" action="/pay/${s.id}/fail"><button type="submit">Payment fails</button></form>` : `<p><a href="${html(s.success_url)}">Back to Netput</a></p>`}
</body></html>`);
  }

  const server = http.createServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://127.0.0.1');
    const handler = url.pathname.startsWith('/v1/') ? api : page;
    handler(req, res, url).catch((err: Error) => {
      if (!res.headersSent) apiError(res, 500, err.message, 'api_error');
      else res.end();
    });
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(options.port ?? 0, '127.0.0.1', () => resolve());
  });
  const address = server.address();
  port = typeof address === 'object' && address ? address.port : 0;
  return { ...fake, port, api: { host: '127.0.0.1', port, protocol: 'http' } };
}
