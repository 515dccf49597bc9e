import type { Config } from '../config.js';
import { createPaymentGateway, type PaymentGateway } from './payment-gateway.js';
import { startFakePayments, type FakePayments } from './fake-payments.js';

/**
 * The payment service of this process: the real one when PAYMENT_SECRET_KEY is set (with
 * PAYMENT_API_URL, tests point it at a fake in another process), else a local fake payment service
 * on 127.0.0.1 (FAKE_PAYMENTS_PORT, default any free port).
 */
export async function startPayments(config: Pick<Config, 'paymentSecretKey' | 'paymentWebhookSecret' | 'paymentApiUrl'>, fakePort = 0): Promise<{ gateway: PaymentGateway; fake?: FakePayments; close(): Promise<void> }> {
  if (config.paymentSecretKey) {
    let api: { host: string; port: number; protocol: 'http' | 'https' } | undefined;
    if (config.paymentApiUrl) {
      const u = new URL(config.paymentApiUrl);
      api = { host: u.hostname, port: Number(u.port || (u.protocol === 'https:' ? 443 : 80)), protocol: u.protocol === 'https:' ? 'https' : 'http' };
    }
    const gateway = createPaymentGateway({ secretKey: config.paymentSecretKey, webhookSecret: config.paymentWebhookSecret ?? '', api, kind: api ? 'fake' : 'service' });
    return { gateway, close: async () => {} };
  }
  const fake = await startFakePayments({ port: fakePort });
  const gateway = createPaymentGateway({ secretKey: fake.secretKey, webhookSecret: fake.webhookSecret, api: fake.api, kind: 'fake' });
  return { gateway, fake, close: () => fake.close() };
}
