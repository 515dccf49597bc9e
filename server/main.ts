import { loadConfig, publicUrlWarning } from './config.js';
import { openDatabase } from './db/client.js';
import { createApp } from './app.js';
import { createMailer } from './mail/mailer.js';
import { startFakeSmtp, type FakeSmtp } from './mail/fake-smtp.js';
import { purgeExpiredSessions } from './auth/session.js';
import { startBackgroundWork } from './jobs/background.js';
import { importCommitsIdle } from './imports/imports-service.js';
import { seedDemoIfEmpty } from '../seed/load-demo.js';
import { startBackupSocket, type BackupSocket } from './db/backup-socket.js';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../seed/demo-coop.js';
import { startPayments } from './bookings/payments-setup.js';
import { bookingDeps } from './bookings/bookings-router.js';
import { startPaymentReconciler } from './jobs/payment-reconciler.js';

const config = loadConfig();

async function main() {
  let seeded = false;
  // On a PostgreSQL server, migrations and the demo load run under one advisory lock (instances
  // starting together take turns); a PGlite folder is locked to this process (a second one is refused).
  const database = await openDatabase({
    databaseUrl: config.databaseUrl,
    dataDir: `${config.dataDir}/pglite`,
    purpose: 'server',
    setup: async (db) => {
      seeded = await seedDemoIfEmpty(db, { prepare: process.env.NETPUT_DEMO_PREPARE !== '0' });
    },
  });
  // `npm run backup` while the server runs asks this process for a consistent snapshot.
  let backupSocket: BackupSocket | undefined;
  if (database.lock && database.snapshot) {
    try {
      backupSocket = await startBackupSocket(database.lock, database.snapshot, (m) => console.log(m));
    } catch (err) {
      console.warn(`Live backups are off (the local backup socket could not be opened: ${(err as Error).message}); npm run backup will ask to stop the server`);
    }
  }
  await purgeExpiredSessions(database.db);

  let fakeSmtp: FakeSmtp | undefined;
  let smtpUrl = config.smtpUrl;
  if (!smtpUrl) {
    fakeSmtp = await startFakeSmtp(Number(process.env.FAKE_SMTP_PORT ?? 0));
    smtpUrl = fakeSmtp.url;
  }
  const mailer = createMailer(smtpUrl, config.mailFrom);
  const background = startBackgroundWork(database.db, { mailer, config });
  const payments = await startPayments(config, Number(process.env.FAKE_PAYMENTS_PORT ?? 0));
  const ctx = { db: database.db, dbKind: database.kind, changes: database.changes, config, mailer, fakeSmtp, jobs: background.runner, payments: payments.gateway, fakePayments: payments.fake };
  const app = createApp(ctx);
  const reconciler = startPaymentReconciler(bookingDeps(ctx), config.paymentReconcileMs);

  const server = app.listen(config.port, () => {
    const address = server.address();
    const port = typeof address === 'object' && address ? address.port : config.port;
    const url = `http://localhost:${port}`;
    // The local fake payment service sends its signed webhooks to this server, as the real one would.
    payments.fake?.setWebhookTarget(async (body, signature) => {
      const r = await fetch(`http://127.0.0.1:${port}/api/payments/webhook`, { method: 'POST', headers: { 'content-type': 'application/json', 'stripe-signature': signature }, body });
      return r.status;
    });
    const lines = [
      `Netput is running at ${url}`,
      `  database: ${database.kind === 'pglite' ? `PGlite in ${config.dataDir}/pglite` : 'PostgreSQL server (DATABASE_URL)'}`,
      `  payments: ${payments.fake ? `local fake payment service on 127.0.0.1:${payments.fake.port} (no money moves)` : 'PAYMENT_SECRET_KEY'}`,
      `  mail: ${fakeSmtp ? `local fake SMTP server on 127.0.0.1:${fakeSmtp.port}${config.dev ? ` (read it at ${url}/admin/mail)` : ''}` : 'SMTP_URL'}`,
    ];
    if (seeded) lines.push('  the demo co-op was loaded into the empty database; its model, outlook and budget are being prepared in the background');
    lines.push(`  demo accounts (password "${DEMO_PASSWORD}"; change them before real use):`);
    for (const a of DEMO_ACCOUNTS) lines.push(`    ${a.role.padEnd(9)} ${a.email}`);
    console.log(lines.join('\n'));
    const warning = publicUrlWarning(config);
    if (warning) console.warn(`Warning: ${warning}`);
  });

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`${signal}: stopping`);
    server.close();
    server.closeAllConnections();
    // Let a running import commit finish (or roll back) before the database closes.
    await importCommitsIdle();
    await reconciler.stop();
    await background.stop();
    await backupSocket?.close();
    mailer.close();
    await fakeSmtp?.close();
    await payments.close();
    await database.close();
    process.exit(0);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
}

main().catch((err: Error) => {
  console.error(`Netput could not start: ${err.message}`);
  process.exit(1);
});
