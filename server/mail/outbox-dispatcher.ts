import { hostname } from 'node:os';
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { users } from '../db/schema/index.js';
import type { Mailer, OutgoingMail } from './mailer.js';
import { claimMail, markFailed, markRetry, markSent, markSkipped, releaseDeadClaims, renewMailLease, type ClaimedMail } from './outbox.js';

export interface OutboxOptions {
  /** How often to look for due messages when the queue is empty. */
  pollMs?: number;
  /** Attempts before a message is marked failed. */
  maxAttempts?: number;
  /** First retry after this long; each further retry waits twice as long. */
  backoffMs?: number;
  /** A claim lapses this long after its last renewal (renewed every third of it while sending). */
  leaseMs?: number;
  /** Pause after the claim and before SMTP (tests set OUTBOX_SEND_DELAY_MS to make a crash land mid-send). */
  sendDelayMs?: number;
  instance?: string;
}

/** What the outbox hands to the mailer: nodemailer takes `messageId` and `headers` as they are. */
export interface OutboxMail extends OutgoingMail {
  messageId: string;
  headers: Record<string, string>;
}

/** A permanent refusal (SMTP 5xx): trying again will not help. */
function isPermanent(err: unknown): boolean {
  const code = (err as { responseCode?: unknown })?.responseCode;
  return typeof code === 'number' && code >= 500 && code < 600;
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

/**
 * Sends what the outbox holds, one message at a time per instance, with retries and exponential
 * backoff. See server/mail/outbox.ts for the delivery guarantee.
 */
export class OutboxDispatcher {
  readonly instance: string;
  private readonly o: Required<Omit<OutboxOptions, 'instance'>>;
  private stopped = true;
  private timer: NodeJS.Timeout | undefined;
  private wake: (() => void) | undefined;
  private loopDone: Promise<void> = Promise.resolve();

  constructor(
    private readonly db: Db,
    private readonly mailer: Mailer,
    options: OutboxOptions = {},
  ) {
    this.instance = options.instance ?? `${hostname()}:${process.pid}:outbox`;
    this.o = {
      pollMs: options.pollMs ?? 500,
      maxAttempts: options.maxAttempts ?? 6,
      backoffMs: options.backoffMs ?? 30_000,
      leaseMs: options.leaseMs ?? 60_000,
      sendDelayMs: options.sendDelayMs ?? 0,
    };
  }

  start() {
    if (!this.stopped) return this;
    this.stopped = false;
    this.loopDone = this.loop();
    return this;
  }

  /** Look for work now (after queueing). */
  poke() {
    this.wake?.();
  }

  async stop() {
    this.stopped = true;
    this.poke();
    await this.loopDone;
  }

  private async loop() {
    try {
      await releaseDeadClaims(this.db, hostname(), alive, process.pid, this.instance);
    } catch {
      /* the database is not ready; lapsed leases are picked up anyway */
    }
    while (!this.stopped) {
      let worked = false;
      try {
        const mail = await claimMail(this.db, this.instance, this.o.leaseMs);
        if (mail) {
          worked = true;
          await this.deliver(mail);
        }
      } catch {
        // The database is busy or closing: try again after a pause.
      }
      if (!worked && !this.stopped) {
        await new Promise<void>((resolve) => {
          this.wake = resolve;
          this.timer = setTimeout(resolve, this.o.pollMs);
          this.timer.unref?.();
        });
        clearTimeout(this.timer);
        this.wake = undefined;
      }
    }
  }

  private async deliver(mail: ClaimedMail) {
    const note = mail.recovered ? 'An earlier attempt stopped before its outcome was known (the server stopped mid-send); sent again with the same Message-ID' : null;
    if (mail.userId !== null) {
      const [u] = await this.db.select({ optOut: users.mailOptOut, active: users.active }).from(users).where(eq(users.id, mail.userId));
      if (!u || !u.active || u.optOut) {
        await markSkipped(this.db, mail.id, this.instance, !u ? 'The account no longer exists' : !u.active ? 'The account is deactivated' : 'The member opted out of outlook e-mails before it was sent');
        return;
      }
    }
    const renew = setInterval(() => void renewMailLease(this.db, mail.id, this.instance, this.o.leaseMs).catch(() => {}), Math.max(1000, this.o.leaseMs / 3));
    renew.unref?.();
    let info: { messageId: string };
    try {
      if (this.o.sendDelayMs > 0) await sleep(this.o.sendDelayMs);
      const message: OutboxMail = {
        to: mail.toAddress,
        subject: mail.subject,
        text: mail.textBody,
        ...(mail.htmlBody ? { html: mail.htmlBody } : {}),
        messageId: mail.messageId,
        headers: mail.headers,
      };
      info = await this.mailer.send(message);
    } catch (err) {
      const message = `${(err as Error).message ?? String(err)}`.slice(0, 500);
      if (isPermanent(err)) await markFailed(this.db, mail.id, this.instance, `Refused by the mail server: ${message}`);
      else if (mail.attempts >= this.o.maxAttempts) await markFailed(this.db, mail.id, this.instance, `Gave up after ${mail.attempts} attempts: ${message}`);
      else await markRetry(this.db, mail.id, this.instance, message, this.o.backoffMs * 2 ** (mail.attempts - 1));
      return;
    } finally {
      clearInterval(renew);
    }
    // Accepted by the SMTP server. Should this commit fail, the row stays `sending` and is sent
    // again when its lease lapses (at-least-once, same Message-ID).
    await markSent(this.db, mail.id, this.instance, info.messageId ? `accepted as ${info.messageId}` : null, note);
  }
}
