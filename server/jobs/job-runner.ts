import type { Db } from '../db/client.js';
import { claimJob, finishJob, INSTANCE_ID, isCancelRequested, releaseDeadLeases, renewLease, retryJob, type JobRow } from './job-queue.js';

export interface JobContext {
  /** Aborted when a cancel is requested for the job (checked about once a second). */
  signal: AbortSignal;
}

/** A handler finishes the job itself by returning; a thrown error marks it failed (or retried). */
export type JobHandler = (job: JobRow, jc: JobContext) => Promise<void>;

export interface JobKind {
  handler: JobHandler;
  /** Attempts before a job is marked failed; retries back off exponentially from `backoffMs`. */
  maxAttempts?: number;
  backoffMs?: number;
}

/**
 * Polls the jobs table and runs what it claims, up to `concurrency` at once. Every app instance runs
 * one; the claim query makes sure a job runs on one instance only.
 */
export class JobRunner {
  private timer: NodeJS.Timeout | undefined;
  private running = new Set<Promise<void>>();
  private stopped = false;
  private readonly idleWaiters: (() => void)[] = [];

  constructor(
    private readonly db: Db,
    private readonly kinds: Record<string, JobKind>,
    private readonly concurrency = 2,
    private readonly pollMs = 250,
    readonly instance = INSTANCE_ID,
  ) {}

  start() {
    this.stopped = false;
    // Jobs left running by a process that is gone (this server before a crash or restart) are
    // claimable at once, not after their lease lapses.
    void releaseDeadLeases(this.db)
      .catch(() => 0)
      .then(() => {
        if (!this.stopped) this.schedule(0);
      });
    return this;
  }

  /** Wakes the poller now (after enqueueing). */
  poke() {
    if (!this.stopped) this.schedule(0);
  }

  private schedule(ms: number) {
    clearTimeout(this.timer);
    this.timer = setTimeout(() => void this.tick(), ms);
    this.timer.unref?.();
  }

  private async tick() {
    if (this.stopped) return;
    try {
      while (this.running.size < this.concurrency && !this.stopped) {
        const job = await claimJob(this.db, Object.keys(this.kinds), this.instance);
        if (!job) break;
        const p = this.run(job).finally(() => {
          this.running.delete(p);
          if (this.running.size === 0) this.idleWaiters.splice(0).forEach((w) => w());
          this.poke();
        });
        this.running.add(p);
      }
    } catch {
      // The database is busy or closing; try again at the next tick.
    }
    if (!this.stopped) this.schedule(this.pollMs);
  }

  private async run(job: JobRow) {
    const kind = this.kinds[job.kind];
    const controller = new AbortController();
    const watch = setInterval(() => {
      void (async () => {
        try {
          await renewLease(this.db, job.id, this.instance);
          if (await isCancelRequested(this.db, job.id)) controller.abort();
        } catch {
          /* next round */
        }
      })();
    }, 1000);
    watch.unref?.();
    try {
      await kind.handler(job, { signal: controller.signal });
      await finishJob(this.db, job.id, controller.signal.aborted ? 'cancelled' : 'done');
    } catch (err) {
      const message = (err as Error).message ?? String(err);
      const max = kind.maxAttempts ?? 1;
      if (controller.signal.aborted) await finishJob(this.db, job.id, 'cancelled', message).catch(() => {});
      else if (job.attempts < max) await retryJob(this.db, job.id, (kind.backoffMs ?? 1000) * 2 ** (job.attempts - 1), message).catch(() => {});
      else await finishJob(this.db, job.id, 'failed', message).catch(() => {});
    } finally {
      clearInterval(watch);
    }
  }

  /** Resolves when nothing is running (tests). */
  idle(): Promise<void> {
    if (this.running.size === 0) return Promise.resolve();
    return new Promise((resolve) => this.idleWaiters.push(resolve));
  }

  async stop() {
    this.stopped = true;
    clearTimeout(this.timer);
    await Promise.allSettled([...this.running]);
  }
}
