import { and, eq, inArray, sql } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { jobs } from '../db/schema/index.js';
import { ownerIsGone, ownerTag } from '../core/process-identity.js';

export type JobRow = typeof jobs.$inferSelect;

/** `host:pid:start`: precise enough that a restarted server knows its earlier incarnation is gone. */
export const INSTANCE_ID = ownerTag();
/** A claimed job whose instance stopped renewing its lease is handed to another instance. */
const LEASE_MS = 60_000;

export async function enqueueJob(db: Db, kind: string, refId: number | null, payload: unknown = {}) {
  const [row] = await db.insert(jobs).values({ kind, refId, payload }).returning();
  return row;
}

/**
 * Claims the oldest runnable job of the given kinds for this instance. `FOR UPDATE SKIP LOCKED`
 * keeps two instances on one PostgreSQL server from taking the same job; an expired lease
 * (crashed instance) makes a running job claimable again.
 */
export async function claimJob(db: Db, kinds: string[], instance = INSTANCE_ID): Promise<JobRow | null> {
  const kindList = sql.join(
    kinds.map((k) => sql`${k}`),
    sql`, `,
  );
  const result = await db.execute(sql`
    update ${jobs} set status = 'running', attempts = ${jobs.attempts} + 1, locked_by = ${instance},
      locked_until = now() + (${LEASE_MS} * interval '1 millisecond')
    where ${jobs.id} = (
      select id from ${jobs}
      where kind in (${kindList}) and run_after <= now()
        and (status = 'queued' or (status = 'running' and locked_until < now()))
      order by id
      for update skip locked
      limit 1
    )
    returning id`);
  const rows = (result as unknown as { rows: { id: number }[] }).rows;
  if (!rows?.length) return null;
  const [row] = await db.select().from(jobs).where(eq(jobs.id, Number(rows[0].id)));
  return row ?? null;
}

/**
 * Running jobs whose instance is known to have stopped (same host, process gone: a crash, a kill, a
 * restart) get their lease ended now instead of when it lapses, so a restarted server picks its
 * fits up at once. Jobs held by live processes or by other hosts are left to their lease.
 */
export async function releaseDeadLeases(db: Db, isGone: (owner: string) => boolean = ownerIsGone): Promise<number> {
  const rows = await db.select({ id: jobs.id, lockedBy: jobs.lockedBy }).from(jobs).where(eq(jobs.status, 'running'));
  const dead = rows.filter((r) => r.lockedBy && isGone(r.lockedBy)).map((r) => r.id);
  if (dead.length) {
    await db
      .update(jobs)
      .set({ lockedUntil: sql`now() - interval '1 second'` })
      .where(and(inArray(jobs.id, dead), eq(jobs.status, 'running')));
  }
  return dead.length;
}

export async function renewLease(db: Db, id: number, instance = INSTANCE_ID) {
  await db
    .update(jobs)
    .set({ lockedUntil: new Date(Date.now() + LEASE_MS) })
    .where(and(eq(jobs.id, id), eq(jobs.lockedBy, instance)));
}

export async function finishJob(db: Db, id: number, status: 'done' | 'failed' | 'cancelled', error?: string) {
  await db.update(jobs).set({ status, error: error ?? null, finishedAt: new Date(), lockedUntil: null }).where(eq(jobs.id, id));
}

/** Puts a failed attempt back in the queue after `delayMs`. */
export async function retryJob(db: Db, id: number, delayMs: number, error: string) {
  await db
    .update(jobs)
    .set({ status: 'queued', error, lockedBy: null, lockedUntil: null, runAfter: new Date(Date.now() + delayMs) })
    .where(eq(jobs.id, id));
}

export async function requestCancel(db: Db, kind: string, refId: number) {
  await db.update(jobs).set({ cancelRequested: 1 }).where(and(eq(jobs.kind, kind), eq(jobs.refId, refId)));
  const cancelled = await db
    .update(jobs)
    .set({ status: 'cancelled', finishedAt: new Date() })
    .where(and(eq(jobs.kind, kind), eq(jobs.refId, refId), eq(jobs.status, 'queued')))
    .returning({ id: jobs.id });
  return cancelled.length > 0;
}

export async function isCancelRequested(db: Db, id: number) {
  const [row] = await db.select({ c: jobs.cancelRequested }).from(jobs).where(eq(jobs.id, id));
  return (row?.c ?? 0) > 0;
}
