import path from 'node:path';

export interface Config {
  port: number;
  /** Folder for PGlite's data and other local files. */
  dataDir: string;
  databaseUrl?: string;
  /** smtp:// or smtps:// URL; unset: a local fake SMTP server is started. */
  smtpUrl?: string;
  mailFrom: string;
  /** Base URL used in links sent by e-mail. */
  publicUrl: string;
  /** Whether PUBLIC_URL was set; unset, links in e-mails point to localhost (a warning at start and on the admin settings page). */
  publicUrlSet: boolean;
  /** Development mode (`--dev` or NODE_ENV=development): the received-mail page at /admin/mail is on. */
  dev: boolean;
  /** Set the `Secure` flag on cookies (serve over HTTPS): COOKIE_SECURE=true|false, else whether PUBLIC_URL is https. */
  secureCookies: boolean;
  logLevel: string;
  /** Folder with the built Angular app, served with an SPA fallback when it exists. */
  appDir: string;
  /** The payment service's secret key; unset: a local fake payment service is started. */
  paymentSecretKey?: string;
  /** The signing secret of the payment service's webhooks (required with PAYMENT_SECRET_KEY). */
  paymentWebhookSecret?: string;
  /** Tests only: an http(s) URL of a payment service to use instead of the real one (a fake in another process). */
  paymentApiUrl?: string;
  /** How often the reconciliation job asks the payment service about pending payments, ms. */
  paymentReconcileMs: number;
}

/** The warning `npm start` prints, and the admin settings page shows, while PUBLIC_URL is unset. */
export function publicUrlWarning(config: Pick<Config, 'publicUrl' | 'publicUrlSet'>): string | null {
  return config.publicUrlSet
    ? null
    : `PUBLIC_URL is not set, so links in e-mails (invitations, password resets, outlooks) point to ${config.publicUrl}, which only works on this computer. Set PUBLIC_URL to the address members open, e.g. PUBLIC_URL=https://netput.example.org`;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env, argv: string[] = process.argv): Config {
  if (env.PAYMENT_SECRET_KEY && !env.PAYMENT_WEBHOOK_SECRET) throw new Error('PAYMENT_WEBHOOK_SECRET must be set with PAYMENT_SECRET_KEY (the webhooks cannot be verified without it)');
  const port = Number(env.PORT ?? 3000);
  if (!Number.isInteger(port) || port < 0 || port > 65535) throw new Error(`PORT must be a port number, not "${env.PORT}"`);
  const dev = argv.includes('--dev') || env.NODE_ENV === 'development';
  const publicUrl = (env.PUBLIC_URL ?? `http://localhost:${port}`).replace(/\/$/, '');
  return {
    port,
    dataDir: path.resolve(env.DATA_DIR ?? './data'),
    databaseUrl: env.DATABASE_URL || undefined,
    smtpUrl: env.SMTP_URL || undefined,
    mailFrom: env.MAIL_FROM ?? 'Netput <outlook@netput.example.org>',
    publicUrl,
    publicUrlSet: Boolean(env.PUBLIC_URL),
    dev,
    secureCookies: env.COOKIE_SECURE ? env.COOKIE_SECURE === 'true' : publicUrl.startsWith('https://'),
    logLevel: env.LOG_LEVEL ?? 'info',
    appDir: path.resolve(env.APP_DIR ?? 'dist/netput/browser'),
    paymentSecretKey: env.PAYMENT_SECRET_KEY || undefined,
    paymentWebhookSecret: env.PAYMENT_WEBHOOK_SECRET || undefined,
    paymentApiUrl: env.PAYMENT_API_URL || undefined,
    paymentReconcileMs: positiveMs(env.PAYMENT_RECONCILE_MS, 60_000, 'PAYMENT_RECONCILE_MS'),
  };
}

function positiveMs(value: string | undefined, fallback: number, name: string): number {
  if (value === undefined || value === '') return fallback;
  const n = Number(value);
  if (!Number.isInteger(n) || n < 100) throw new Error(`${name} must be a whole number of milliseconds ≥ 100, not "${value}"`);
  return n;
}
