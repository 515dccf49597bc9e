import { hostname } from 'node:os';
import net from 'node:net';
import { eq } from 'drizzle-orm';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Database } from '../db/client.js';
import { mailOutbox, users } from '../db/schema/index.js';
import { openTestDatabase } from '../../tests/api/test-db.js';
import { sleep, until } from '../../tests/polling.js';
import { createMailer } from './mailer.js';
import { OutboxDispatcher } from './outbox-dispatcher.js';
import { enqueueMail, mailDomain, messageIdFor, pendingCount, type NewOutboxMail } from './outbox.js';

/** An SMTP server that keeps each message's raw header lines; RCPT to refuse@… answers 550. */
async function rawSmtp() {
  const received: { to: string[]; messageId: string | undefined; header: (name: string) => string | undefined }[] = [];
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onRcptTo(address, _session, callback) {
      if (address.address.startsWith('refuse')) {
        const err = Object.assign(new Error('No such mailbox here'), { responseCode: 550 });
        return callback(err);
      }
      callback();
    },
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then((m) => {
          const to = (Array.isArray(m.to) ? m.to : m.to ? [m.to] : []).flatMap((a) => a.value.map((v) => v.address ?? ''));
          received.push({
            to,
            messageId: m.messageId,
            header: (name) => m.headerLines.find((h) => h.key === name.toLowerCase())?.line.replace(/^[^:]+:\s*/, ''),
          });
          callback();
        })
        .catch(callback);
    },
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', () => resolve()));
  const port = (server.server.address() as net.AddressInfo).port;
  return { url: `smtp://127.0.0.1:${port}`, received, close: () => new Promise<void>((r) => server.close(() => r())) };
}

async function closedPort() {
  const s = net.createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', () => r()));
  const port = (s.address() as net.AddressInfo).port;
  await new Promise<void>((r) => s.close(() => r()));
  return port;
}

/** Waits until `probe` holds (polling every 20 ms, at most 15 s). */
const settled = (what: string, probe: () => Promise<boolean>) => until(what, async () => ((await probe()) ? true : undefined), 15_000, 20);

const FROM = 'Netput <outlook@netput.example.org>';
const DOMAIN = mailDomain(FROM);
let database: Database;
let smtp: Awaited<ReturnType<typeof rawSmtp>>;
let memberId: number;

const mail = (key: string, to: string, extra: Partial<NewOutboxMail> = {}): NewOutboxMail => ({
  idempotencyKey: key,
  kind: 'test',
  to,
  subject: `Test ${key}`,
  text: 'Hello',
  html: '<p>Hello</p>',
  headers: { 'List-Unsubscribe': '<http://netput.test/api/unsubscribe/1.x>', 'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click' },
  ...extra,
});
const row = async (key: string) => (await database.db.select().from(mailOutbox).where(eq(mailOutbox.idempotencyKey, key)))[0]!;

beforeAll(async () => {
  database = await openTestDatabase();
  smtp = await rawSmtp();
  const [u] = await database.db.insert(users).values({ email: 'grower@example.org', name: 'Grower', role: 'member' }).returning({ id: users.id });
  memberId = u!.id;
});
afterAll(async () => {
  await smtp?.close();
  await database?.close();
});

describe('mail outbox', () => {
  it('derives the Message-ID from the idempotency key and the From domain', () => {
    expect(DOMAIN).toBe('netput.example.org');
    expect(messageIdFor('outlook.v3.u12', DOMAIN)).toBe('<outlook.v3.u12@netput.example.org>');
    expect(mailDomain('no address')).toBe('netput.invalid');
  });

  it('sends each queued message once, with its Message-ID and the RFC 8058 List-Unsubscribe headers; a key queued twice is one message', async () => {
    const db = database.db;
    expect(await enqueueMail(db, [mail('a.1', 'one@example.org', { userId: memberId }), mail('a.2', 'two@example.org')], DOMAIN)).toHaveLength(2);
    expect(await enqueueMail(db, [mail('a.1', 'one@example.org')], DOMAIN)).toHaveLength(0);
    const mailer = createMailer(smtp.url, FROM);
    const d = new OutboxDispatcher(db, mailer, { pollMs: 20 }).start();
    await settled('the outbox to empty', async () => (await pendingCount(db)) === 0);
    await d.stop();
    mailer.close();
    expect(smtp.received.map((m) => m.to[0]).sort()).toEqual(['one@example.org', 'two@example.org']);
    const one = smtp.received.find((m) => m.to[0] === 'one@example.org')!;
    expect(one.messageId).toBe('<a.1@netput.example.org>');
    expect(one.header('List-Unsubscribe')).toBe('<http://netput.test/api/unsubscribe/1.x>');
    expect(one.header('List-Unsubscribe-Post')).toBe('List-Unsubscribe=One-Click');
    const r = await row('a.1');
    expect(r).toMatchObject({ status: 'sent', attempts: 1, lockedBy: null, lastError: null, messageId: '<a.1@netput.example.org>' });
    expect(r.smtpResponse).toBe('accepted as <a.1@netput.example.org>');
  });

  it('skips a message whose recipient opted out after it was queued', async () => {
    const db = database.db;
    await enqueueMail(db, [mail('b.1', 'grower@example.org', { userId: memberId })], DOMAIN);
    await db.update(users).set({ mailOptOut: true }).where(eq(users.id, memberId));
    const mailer = createMailer(smtp.url, FROM);
    const before = smtp.received.length;
    const d = new OutboxDispatcher(db, mailer, { pollMs: 20 }).start();
    await settled('the outbox to empty', async () => (await pendingCount(db)) === 0);
    await d.stop();
    mailer.close();
    await db.update(users).set({ mailOptOut: false }).where(eq(users.id, memberId));
    expect(smtp.received.length).toBe(before);
    expect(await row('b.1')).toMatchObject({ status: 'skipped', lastError: 'The member opted out of outlook e-mails before it was sent' });
  });

  it('a permanent refusal (550) fails at once; an unreachable server is retried with exponential backoff until the attempts run out', async () => {
    const db = database.db;
    await enqueueMail(db, [mail('c.1', 'refuse@example.org')], DOMAIN);
    let mailer = createMailer(smtp.url, FROM);
    let d = new OutboxDispatcher(db, mailer, { pollMs: 20 }).start();
    await settled('c.1 to be settled', async () => (await row('c.1')).status !== 'queued' && (await row('c.1')).status !== 'sending');
    await d.stop();
    mailer.close();
    const refused = await row('c.1');
    expect(refused).toMatchObject({ status: 'failed', attempts: 1 });
    expect(refused.lastError).toMatch(/^Refused by the mail server: .*550/);

    mailer = createMailer(`smtp://127.0.0.1:${await closedPort()}`, FROM);
    await enqueueMail(db, [mail('c.2', 'later@example.org')], DOMAIN);
    const t0 = Date.now();
    d = new OutboxDispatcher(db, mailer, { pollMs: 20, backoffMs: 10_000, maxAttempts: 3 }).start();
    await settled('the first attempt at c.2', async () => (await row('c.2')).attempts === 1 && (await row('c.2')).status === 'queued');
    const t1 = Date.now();
    let r = await row('c.2');
    expect(r.lastError).toMatch(/ECONNREFUSED/);
    // First retry 10 s after the failure.
    expect(r.nextAttemptAt.getTime()).toBeGreaterThanOrEqual(t0 + 10_000 - 5);
    expect(r.nextAttemptAt.getTime()).toBeLessThanOrEqual(t1 + 10_000 + 5);
    // Make it due now: the second failure waits twice as long (20 s).
    await db.update(mailOutbox).set({ nextAttemptAt: new Date() }).where(eq(mailOutbox.id, r.id));
    const t2 = Date.now();
    await settled('the second attempt at c.2', async () => (await row('c.2')).attempts === 2 && (await row('c.2')).status === 'queued');
    const t3 = Date.now();
    r = await row('c.2');
    expect(r.nextAttemptAt.getTime()).toBeGreaterThanOrEqual(t2 + 20_000 - 5);
    expect(r.nextAttemptAt.getTime()).toBeLessThanOrEqual(t3 + 20_000 + 5);
    await db.update(mailOutbox).set({ nextAttemptAt: new Date() }).where(eq(mailOutbox.id, r.id));
    await settled('c.2 to fail', async () => (await row('c.2')).status === 'failed');
    await d.stop();
    mailer.close();
    r = await row('c.2');
    expect(r.attempts).toBe(3);
    expect(r.lastError).toMatch(/^Gave up after 3 attempts: .*ECONNREFUSED/);
  });

  it('a claim left by a process of this host that is gone is taken over at once and sent again with the same Message-ID; live and foreign claims are left alone', async () => {
    const db = database.db;
    await enqueueMail(db, [mail('d.dead', 'dead@example.org'), mail('d.live', 'live@example.org'), mail('d.other', 'other@example.org')], DOMAIN);
    const future = new Date(Date.now() + 3600_000);
    let gone = 4_000_000;
    while (gone > 1) {
      try {
        process.kill(gone, 0);
        gone--;
      } catch {
        break;
      }
    }
    const claim = (key: string, lockedBy: string) =>
      db.update(mailOutbox).set({ status: 'sending', attempts: 1, lockedBy, lockedUntil: future }).where(eq(mailOutbox.idempotencyKey, key));
    await claim('d.dead', `${hostname()}:${gone}:outbox`);
    await claim('d.live', `${hostname()}:${process.ppid}:outbox`);
    await claim('d.other', `another-host.example.org:${process.pid}:outbox`);
    const before = smtp.received.length;
    const mailer = createMailer(smtp.url, FROM);
    const d = new OutboxDispatcher(db, mailer, { pollMs: 20 }).start();
    await settled('d.dead to be sent', async () => (await row('d.dead')).status === 'sent');
    await sleep(200);
    await d.stop();
    mailer.close();
    expect(smtp.received.length).toBe(before + 1);
    expect(smtp.received.at(-1)!.messageId).toBe('<d.dead@netput.example.org>');
    const dead = await row('d.dead');
    expect(dead.attempts).toBe(2);
    expect(dead.lastError).toMatch(/outcome was known/);
    expect((await row('d.live')).status).toBe('sending');
    expect((await row('d.other')).status).toBe('sending');
  });
});
