/**
 * The mail outbox: messages are written to `mail_outbox` in the same transaction as the change that
 * calls for them (e.g. publishing an outlook) and sent later by the OutboxDispatcher.
 *
 * Delivery guarantee — at-least-once with a stable Message-ID:
 *   1. a row is claimed and set to `sending` (with a lease) in a committed statement before any SMTP;
 *   2. the message is handed to SMTP with Message-ID = <idempotency key @ domain>;
 *   3. on the server's 250 the row becomes `sent`.
 * A crash between 1 and 3 leaves the row `sending`; when its lease lapses (or at once, when the same
 * host sees that the claiming process is gone) it is sent again with the same Message-ID. If the crash
 * came before the SMTP server accepted the DATA (the long part: connecting, the optional
 * OUTBOX_SEND_DELAY_MS pause, the transfer), the resend is the only copy; only a crash in the few
 * milliseconds between the server's 250 and our commit of `sent` yields a second copy, which carries
 * the same Message-ID so that mail systems and readers can recognise it. We chose this over
 * at-most-once (never resend a `sending` row) because a lost outlook e-mail goes unnoticed while a
 * rare duplicate is harmless and detectable. The unique idempotency key (one per member per outlook
 * version) keeps a message from being queued twice, whatever happens to the publishing request.
 */
import { and, asc, desc, eq, inArray, sql } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { mailOutbox, users } from '../db/schema/index.js';

export type OutboxRow = typeof mailOutbox.$inferSelect;
export type OutboxStatus = OutboxRow['status'];

export interface NewOutboxMail {
  idempotencyKey: string;
  kind: string;
  outlookVersionId?: number | null;
  userId?: number | null;
  to: string;
  subject: string;
  text: string;
  html?: string | null;
  headers?: Record<string, string>;
  /** A row that should not be sent (e.g. the recipient opted out): kept for the delivery log. */
  skipReason?: string;
}

/** The domain part of the From address, for Message-IDs (`Netput <outlook@netput.example.org>` → netput.example.org). */
export function mailDomain(from: string): string {
  const m = /@([A-Za-z0-9.-]+)>?\s*$/.exec(from.trim());
  return m ? m[1]!.toLowerCase() : 'netput.invalid';
}

/** Message-ID from the idempotency key: the same key always gives the same id (RFC 5322 §3.6.4 msg-id). */
export function messageIdFor(key: string, domain: string): string {
  return `<${key.replace(/[^A-Za-z0-9.!#$%&'*+/=?^_`{|}~-]/g, '.')}@${domain}>`;
}

/** Queues messages; a key already queued is left as it is (idempotent). Returns the rows inserted now. */
export async function enqueueMail(db: Db, mails: NewOutboxMail[], domain: string) {
  if (!mails.length) return [];
  return db
    .insert(mailOutbox)
    .values(
      mails.map((m) => ({
        idempotencyKey: m.idempotencyKey,
        messageId: messageIdFor(m.idempotencyKey, domain),
        kind: m.kind,
        outlookVersionId: m.outlookVersionId ?? null,
        userId: m.userId ?? null,
        toAddress: m.to,
        subject: m.subject,
        textBody: m.text,
        htmlBody: m.html ?? null,
        headers: m.headers ?? {},
        status: m.skipReason ? ('skipped' as const) : ('queued' as const),
        lastError: m.skipReason ?? null,
      })),
    )
    .onConflictDoNothing({ target: mailOutbox.idempotencyKey })
    .returning({ id: mailOutbox.id, idempotencyKey: mailOutbox.idempotencyKey });
}

export interface ClaimedMail extends OutboxRow {
  /** The row was found `sending` with a lapsed lease: a previous attempt's outcome is unknown. */
  recovered: boolean;
}

/**
 * Claims the oldest due message for `instance`: queued and due, or `sending` with a lapsed lease.
 * `FOR UPDATE SKIP LOCKED` keeps two instances on one PostgreSQL server from taking the same row.
 * The claim (status `sending`, attempts + 1) is committed before the caller talks to SMTP.
 */
export async function claimMail(db: Db, instance: string, leaseMs: number): Promise<ClaimedMail | null> {
  const result = await db.execute(sql`
    with c as (
      select id, status as prev from ${mailOutbox}
      where (status = 'queued' and next_attempt_at <= now()) or (status = 'sending' and locked_until < now())
      order by id
      for update skip locked
      limit 1
    )
    update ${mailOutbox} m set status = 'sending', attempts = m.attempts + 1, locked_by = ${instance},
      locked_until = now() + (${leaseMs} * interval '1 millisecond')
    from c where m.id = c.id
    returning m.id, c.prev`);
  const rows = (result as unknown as { rows: { id: number; prev: string }[] }).rows;
  if (!rows?.length) return null;
  const [row] = await db.select().from(mailOutbox).where(eq(mailOutbox.id, Number(rows[0]!.id)));
  return row ? { ...row, recovered: rows[0]!.prev === 'sending' } : null;
}

export async function renewMailLease(db: Db, id: number, instance: string, leaseMs: number) {
  await db
    .update(mailOutbox)
    .set({ lockedUntil: new Date(Date.now() + leaseMs) })
    .where(and(eq(mailOutbox.id, id), eq(mailOutbox.lockedBy, instance), eq(mailOutbox.status, 'sending')));
}

/** Updates a row this instance holds (a lapsed claim taken over by another instance is left alone). */
async function settle(db: Db, id: number, instance: string, values: Partial<typeof mailOutbox.$inferInsert>) {
  const done = await db
    .update(mailOutbox)
    .set({ lockedBy: null, lockedUntil: null, ...values })
    .where(and(eq(mailOutbox.id, id), eq(mailOutbox.lockedBy, instance), eq(mailOutbox.status, 'sending')))
    .returning({ id: mailOutbox.id });
  return done.length > 0;
}

export const markSent = (db: Db, id: number, instance: string, smtpResponse: string | null, note: string | null) =>
  settle(db, id, instance, { status: 'sent', sentAt: new Date(), smtpResponse, lastError: note });
export const markSkipped = (db: Db, id: number, instance: string, reason: string) => settle(db, id, instance, { status: 'skipped', lastError: reason });
export const markFailed = (db: Db, id: number, instance: string, error: string) => settle(db, id, instance, { status: 'failed', lastError: error });
export const markRetry = (db: Db, id: number, instance: string, error: string, delayMs: number) =>
  settle(db, id, instance, { status: 'queued', lastError: error, nextAttemptAt: new Date(Date.now() + delayMs) });

/**
 * Claims held by processes of this host that no longer run (a crash or kill): their lease is ended
 * now instead of when it lapses. A claim held by a live process, or by another host, is left alone.
 */
export async function releaseDeadClaims(db: Db, host: string, isAlive: (pid: number) => boolean, ownPid: number, ownInstance: string) {
  const rows = await db.select({ id: mailOutbox.id, lockedBy: mailOutbox.lockedBy }).from(mailOutbox).where(eq(mailOutbox.status, 'sending'));
  const dead = rows
    .filter((r) => {
      if (!r.lockedBy || r.lockedBy === ownInstance) return false;
      const [h, pid] = r.lockedBy.split(':');
      if (h !== host) return false;
      const n = Number(pid);
      return Number.isInteger(n) && (n === ownPid || !isAlive(n));
    })
    .map((r) => r.id);
  if (dead.length) await db.update(mailOutbox).set({ lockedUntil: new Date(Date.now() - 1000) }).where(and(inArray(mailOutbox.id, dead), eq(mailOutbox.status, 'sending')));
  return dead.length;
}

/** Puts a failed message back in the queue (the planner's "try again"). */
export async function requeueFailed(db: Db, id: number) {
  const rows = await db
    .update(mailOutbox)
    .set({ status: 'queued', nextAttemptAt: new Date(), attempts: 0 })
    .where(and(eq(mailOutbox.id, id), eq(mailOutbox.status, 'failed')))
    .returning({ id: mailOutbox.id });
  return rows.length > 0;
}

/** The delivery log of one outlook version: one row per recipient. */
export async function deliveryLog(db: Db, outlookVersionId: number) {
  return db
    .select({
      id: mailOutbox.id,
      userId: mailOutbox.userId,
      name: users.name,
      to: mailOutbox.toAddress,
      status: mailOutbox.status,
      attempts: mailOutbox.attempts,
      lastError: mailOutbox.lastError,
      messageId: mailOutbox.messageId,
      createdAt: mailOutbox.createdAt,
      nextAttemptAt: mailOutbox.nextAttemptAt,
      sentAt: mailOutbox.sentAt,
    })
    .from(mailOutbox)
    .leftJoin(users, eq(users.id, mailOutbox.userId))
    .where(eq(mailOutbox.outlookVersionId, outlookVersionId))
    .orderBy(asc(users.name), desc(mailOutbox.id));
}

/** Messages not yet settled (queued or sending). */
export async function pendingCount(db: Db) {
  const [row] = await db
    .select({ n: sql<number>`count(*)`.mapWith(Number) })
    .from(mailOutbox)
    .where(inArray(mailOutbox.status, ['queued', 'sending']));
  return row?.n ?? 0;
}
