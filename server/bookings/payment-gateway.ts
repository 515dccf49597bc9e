/**
 * The payment service as Netput uses it: a hosted Checkout Session per prepayment (the member pays on
 * the service's own page, so no card data touches Netput), reading a session back (reconciliation),
 * refunds, and webhook verification. One implementation over the `stripe` SDK; in development and
 * tests the SDK talks to the local fake (server/bookings/fake-payments.ts) through its host/port/
 * protocol options, so the same code path runs everywhere.
 */
import Stripe from 'stripe';

export interface CheckoutInput {
  amountMinor: number;
  currency: string;
  description: string;
  bookingId: number;
  paymentId: number;
  customerEmail: string | null;
  successUrl: string;
  cancelUrl: string;
  idempotencyKey: string;
}

export interface CheckoutView {
  sessionId: string;
  url: string | null;
  /** open | complete | expired */
  status: string;
  /** paid | unpaid | no_payment_required */
  paymentStatus: string;
  paymentIntentId: string | null;
  amountTotal: number | null;
  currency: string | null;
  paymentId: number | null;
}

export interface PaymentGateway {
  /** `fake`: the local fake payment service; `service`: the real one (PAYMENT_SECRET_KEY). */
  readonly kind: 'fake' | 'service';
  createCheckout(input: CheckoutInput): Promise<CheckoutView>;
  retrieveCheckout(sessionId: string): Promise<CheckoutView>;
  refund(paymentIntentId: string, amountMinor: number, idempotencyKey: string): Promise<{ refundId: string; status: string }>;
  /** Verifies the signature header over the raw body and parses the event; throws when it does not verify. */
  verifyWebhook(rawBody: Buffer | string, signature: string | undefined): Stripe.Event;
}

export interface GatewayOptions {
  secretKey: string;
  webhookSecret: string;
  /** The fake (or another test double): where the SDK sends its requests. */
  api?: { host: string; port: number; protocol: 'http' | 'https' };
  kind: 'fake' | 'service';
}

export function sessionView(s: Stripe.Checkout.Session): CheckoutView {
  const pi = s.payment_intent;
  const paymentId = Number(s.metadata?.['paymentId']);
  return {
    sessionId: s.id,
    url: s.url ?? null,
    status: s.status ?? 'open',
    paymentStatus: s.payment_status,
    paymentIntentId: typeof pi === 'string' ? pi : (pi?.id ?? null),
    amountTotal: s.amount_total ?? null,
    currency: s.currency ?? null,
    paymentId: Number.isInteger(paymentId) && paymentId > 0 ? paymentId : null,
  };
}

export function createPaymentGateway(o: GatewayOptions): PaymentGateway {
  const stripe = new Stripe(o.secretKey, {
    maxNetworkRetries: 2,
    timeout: 20_000,
    telemetry: false,
    ...(o.api ? { host: o.api.host, port: o.api.port, protocol: o.api.protocol } : {}),
  });
  return {
    kind: o.kind,
    async createCheckout(i) {
      const s = await stripe.checkout.sessions.create(
        {
          mode: 'payment',
          line_items: [{ quantity: 1, price_data: { currency: i.currency.toLowerCase(), unit_amount: i.amountMinor, product_data: { name: i.description } } }],
          client_reference_id: String(i.bookingId),
          metadata: { bookingId: String(i.bookingId), paymentId: String(i.paymentId) },
          ...(i.customerEmail ? { customer_email: i.customerEmail } : {}),
          success_url: i.successUrl,
          cancel_url: i.cancelUrl,
        },
        { idempotencyKey: i.idempotencyKey },
      );
      return sessionView(s);
    },
    async retrieveCheckout(id) {
      return sessionView(await stripe.checkout.sessions.retrieve(id));
    },
    async refund(paymentIntentId, amountMinor, idempotencyKey) {
      const r = await stripe.refunds.create({ payment_intent: paymentIntentId, amount: amountMinor }, { idempotencyKey });
      return { refundId: r.id, status: r.status ?? 'pending' };
    },
    verifyWebhook(rawBody, signature) {
      return stripe.webhooks.constructEvent(rawBody, signature ?? '', o.webhookSecret);
    },
  };
}
