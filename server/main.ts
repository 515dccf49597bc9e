import { loadConfig } from './config.js';
import { openDatabase } from './db/client.js';
import { createApp } from './app.js';
import { createMailer } from './mail/mailer.js';
import { startFakeSmtp, type FakeSmtp } from './mail/fake-smtp.js';
import { purgeExpiredSessions } from './auth/session.js';
import { startBackgroundWork } from './jobs/background.js';
import { importCommitsIdle } from './imports/imports-service.js';
import { seedDemoIfEmpty } from '../seed/load-demo.js';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../seed/demo-coop.js';

const config = loadConfig();

async function main() {
  const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: `${config.dataDir}/pglite` });
  const seeded = await seedDemoIfEmpty(database.db);
  await purgeExpiredSessions(database.db);

  let fakeSmtp: FakeSmtp | undefined;
  let smtpUrl = config.smtpUrl;
  if (!smtpUrl) {
    fakeSmtp = await startFakeSmtp(Number(process.env.FAKE_SMTP_PORT ?? 0));
    smtpUrl = fakeSmtp.url;
  }
  const mailer = createMailer(smtpUrl, config.mailFrom);
  const background = startBackgroundWork(database.db, { mailer });
  const app = createApp({ db: database.db, dbKind: database.kind, changes: database.changes, config, mailer, fakeSmtp, jobs: background.runner });

  const server = app.listen(config.port, () => {
    const address = server.address();
    const port = typeof address === 'object' && address ? address.port : config.port;
    const url = `http://localhost:${port}`;
    const lines = [
      `Netput is running at ${url}`,
      `  database: ${database.kind === 'pglite' ? `PGlite in ${config.dataDir}/pglite` : 'PostgreSQL server (DATABASE_URL)'}`,
      `  mail: ${fakeSmtp ? `local fake SMTP server on 127.0.0.1:${fakeSmtp.port}${config.dev ? ` (read it at ${url}/admin/mail)` : ''}` : 'SMTP_URL'}`,
    ];
    if (seeded) lines.push('  the demo co-op was loaded into the empty database');
    lines.push(`  demo accounts (password "${DEMO_PASSWORD}"; change them before real use):`);
    for (const a of DEMO_ACCOUNTS) lines.push(`    ${a.role.padEnd(9)} ${a.email}`);
    console.log(lines.join('\n'));
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
    await background.stop();
    mailer.close();
    await fakeSmtp?.close();
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
