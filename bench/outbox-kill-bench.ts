/**
 * Mail after a crash: how many outlook e-mails are sent twice (or not at all) when the server is
 * killed at random moments while an outlook goes out. Real processes: `tsx server/main.ts` on a
 * temporary PGlite folder, sending to a fake SMTP server in this process, SIGKILLed KILLS times
 * (default 20) at a uniformly random moment within the time one version's 20 messages take, then
 * started again until its outbox drains. Also measures, in this process, the window itself: from
 * the SMTP server storing a message to the outbox row's `sent` being committed, over 200 messages
 * through the same functions the dispatcher uses. Writes bench/results/outbox-kills.json.
 *
 *   npm run bench:outbox-kills [-- --kills 20 --seed 12345]
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { openDatabase } from '../server/db/client.js';
import { startFakeSmtp } from '../server/mail/fake-smtp.js';
import { createMailer } from '../server/mail/mailer.js';
import { claimMail, enqueueMail, markSent } from '../server/mail/outbox.js';
import { calibrate, killRound, openKillLab, seeded, type KillRound } from '../tests/integration/outbox-kills.js';

const arg = (name: string) => {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? process.argv[i + 1] : undefined;
};
const KILLS = Number(arg('kills') ?? 20);
const SEED = Number(arg('seed') ?? Date.now() % 2 ** 31);
const OUT = path.join(import.meta.dirname, 'results', 'outbox-kills.json');

const quantile = (xs: number[], q: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))]!;
};

/** Accepted by SMTP → `sent` committed, per message, through claimMail / the mailer / markSent on a PGlite folder. */
async function measureWindow(n: number) {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'netput-window-'));
  const database = await openDatabase({ dataDir: path.join(dir, 'pglite'), purpose: 'bench' });
  const smtp = await startFakeSmtp();
  const mailer = createMailer(smtp.url, 'Netput <outlook@netput.example.org>');
  const acceptedAt = new Map<string, number>();
  const keep = smtp.messages;
  try {
    await enqueueMail(
      database.db,
      Array.from({ length: n }, (_, i) => ({ idempotencyKey: `window.${i}`, kind: 'bench', to: `member${i}@example.org`, subject: 'Outlook', text: 'Your outlook. '.repeat(200) })),
      'netput.example.org',
    );
    const windows: number[] = [];
    const cycles: number[] = [];
    for (let i = 0; i < n; i++) {
      const t0 = performance.now();
      const m = (await claimMail(database.db, 'bench', 60_000))!;
      const before = keep().length;
      await mailer.send({ to: m.toAddress, subject: m.subject, text: m.textBody, messageId: m.messageId, headers: m.headers });
      await markSent(database.db, m.id, 'bench', null, null);
      const t1 = performance.now();
      // The fake SMTP server stamps each message (ms) as it stores it, before its 250 goes out.
      const stored = keep()[before]!;
      acceptedAt.set(m.messageId, Date.parse(stored.receivedAt));
      windows.push(performance.timeOrigin + t1 - Date.parse(stored.receivedAt));
      cycles.push(t1 - t0);
    }
    const r = (x: number) => Math.round(x * 10) / 10;
    return { messages: n, windowMs: { median: r(quantile(windows, 0.5)), p95: r(quantile(windows, 0.95)), max: r(Math.max(...windows)) }, cycleMs: { median: r(quantile(cycles, 0.5)) } };
  } finally {
    mailer.close();
    await smtp.close();
    await database.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

async function main() {
  console.log(`outbox kill bench: ${KILLS} kills, seed ${SEED}`);
  const random = seeded(SEED);
  const window = await measureWindow(200);
  console.log(`window (SMTP stored → sent committed): ${JSON.stringify(window)}`);

  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'netput-outbox-kills-'));
  const smtp = await startFakeSmtp();
  const env = { DATA_DIR: dir, DATABASE_URL: '', SMTP_URL: smtp.url, LOG_LEVEL: 'silent' };
  const lab = await openKillLab(smtp, env);
  const rounds: KillRound[] = [];
  try {
    const { spanMs, queued } = await calibrate(lab);
    console.log(`one version: ${queued} messages in ${spanMs} ms`);
    for (let i = 0; rounds.filter((r) => r.duringSending).length < KILLS && i < KILLS * 2; i++) {
      const r = await killRound(lab, random, spanMs);
      rounds.push(r);
      console.log(`kill ${i + 1}: after ${r.killAfterMs} ms, ${r.receivedBeforeKill}/${r.queued} received before; duplicates ${r.duplicates}, missed ${r.missed}${r.duringSending ? '' : ' (landed after the last message: not counted)'}`);
    }
    const counted = rounds.filter((r) => r.duringSending);
    const result = {
      benchmark: 'outbox-kills',
      date: new Date().toISOString(),
      machine: { cpus: os.cpus().length, loadavg: os.loadavg().map((x) => Math.round(x * 100) / 100), node: process.version },
      seed: SEED,
      messagesPerVersion: queued,
      versionSendMs: spanMs,
      kills: counted.length,
      killsWithDuplicate: counted.filter((r) => r.duplicates > 0).length,
      duplicates: counted.reduce((s, r) => s + r.duplicates, 0),
      missed: counted.reduce((s, r) => s + r.missed, 0),
      duplicatesKeptTheirMessageId: counted.every((r) => r.sameMessageId),
      resentRowsSayWhy: counted.every((r) => r.resentNoted),
      window,
      rounds,
    };
    fs.mkdirSync(path.dirname(OUT), { recursive: true });
    fs.writeFileSync(OUT, `${JSON.stringify(result, null, 2)}\n`);
    console.log(`${result.kills} kills: ${result.duplicates} duplicate(s) in ${result.killsWithDuplicate} kill(s), ${result.missed} missed → ${path.relative(process.cwd(), OUT)}`);
  } finally {
    await lab.server.stop('SIGKILL');
    await smtp.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

await main();
