import os from 'node:os';
import path from 'node:path';
import type { DestinationStream } from 'pino';
import supertest from 'supertest';
import { loadConfig } from '../../server/config.js';
import type { Database } from '../../server/db/client.js';
import { openTestDatabase } from './test-db.js';
import { createApp, type NetputApp } from '../../server/app.js';
import type { AppContext } from '../../server/context.js';
import { createMailer } from '../../server/mail/mailer.js';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp.js';
import { loadDemoCoop } from '../../seed/load-demo.js';
import { startBackgroundWork } from '../../server/jobs/background.js';
import { startFakePayments, type FakePayments } from '../../server/bookings/fake-payments.js';
import { createPaymentGateway } from '../../server/bookings/payment-gateway.js';

export interface TestApp {
  app: NetputApp;
  database: Database;
  smtp: FakeSmtp;
  /** The local fake payment service; its webhooks go to the app through supertest. */
  payments: FakePayments;
  /** The context the app was built with (tests call services directly with it). */
  ctx: AppContext;
  close(): Promise<void>;
}

/** A real app on a fresh in-memory PGlite (migrated, optionally with the demo co-op) and a fake SMTP server. */
export async function startTestApp(options: { demo?: boolean; prepareDemo?: boolean; dev?: boolean; jobs?: boolean; logDestination?: DestinationStream } = {}): Promise<TestApp> {
  const database = await openTestDatabase();
  // The demo's fit, outlook and budget (a background job) only when a test asks for them.
  if (options.demo !== false) await loadDemoCoop(database.db, { prepare: options.prepareDemo === true });
  const smtp = await startFakeSmtp();
  const config = {
    ...loadConfig({ LOG_LEVEL: options.logDestination ? 'info' : (process.env.TEST_LOG_LEVEL ?? 'silent'), PUBLIC_URL: 'http://netput.test', APP_DIR: path.join(os.tmpdir(), 'netput-no-app') }, options.dev ? ['--dev'] : []),
  };
  const mailer = createMailer(smtp.url, config.mailFrom);
  const background = options.jobs ? startBackgroundWork(database.db, { pollMs: 50, mailer, config }) : undefined;
  const payments = await startFakePayments();
  const gateway = createPaymentGateway({ secretKey: payments.secretKey, webhookSecret: payments.webhookSecret, api: payments.api, kind: 'fake' });
  const ctx: AppContext = { db: database.db, dbKind: database.kind, changes: database.changes, config, mailer, fakeSmtp: smtp, jobs: background?.runner, logDestination: options.logDestination, payments: gateway, fakePayments: payments };
  const app = createApp(ctx);
  payments.setWebhookTarget(async (body, signature) => (await supertest(app).post('/api/payments/webhook').set('content-type', 'application/json').set('stripe-signature', signature).send(body)).status);
  return {
    app,
    database,
    smtp,
    payments,
    ctx,
    async close() {
      await payments.close();
      await background?.stop();
      mailer.close();
      await smtp.close();
      await database.close();
    },
  };
}

/**
 * A supertest agent that keeps cookies and sends the XSRF header the way Angular does: the current
 * `XSRF-TOKEN` cookie, read again before every request (the token changes at sign-in and sign-out).
 */
export async function agent(app: NetputApp) {
  const a = supertest.agent(app);
  type Inner = {
    _setDefaults(req: { set(name: string, value: string): unknown }): void;
    _saveCookies(res: { headers: Record<string, string | string[] | undefined> }): void;
  };
  const inner = a as unknown as Inner;
  const setDefaults = inner._setDefaults.bind(a);
  const saveCookies = inner._saveCookies.bind(a);
  let xsrf = '';
  inner._saveCookies = (res) => {
    saveCookies(res);
    const cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith('XSRF-TOKEN='));
    if (cookie) xsrf = decodeURIComponent(cookie.split(';')[0]!.slice('XSRF-TOKEN='.length));
  };
  inner._setDefaults = (req) => {
    setDefaults(req);
    if (xsrf) req.set('X-XSRF-TOKEN', xsrf);
  };
  await a.get('/api/auth/csrf');
  return a;
}

export const DEMO_PASSWORD = 'netput-demo';

export async function signedIn(app: NetputApp, email: string, password = DEMO_PASSWORD) {
  const a = await agent(app);
  const res = await a.post('/api/auth/login').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return a;
}
