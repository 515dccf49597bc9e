import { index, integer, jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

/**
 * Background work (fits, back-tests, mail sends), kept in the database so that any app instance can
 * claim it (`FOR UPDATE SKIP LOCKED`) and a crash leaves it to be picked up again.
 */
export const jobs = pgTable(
  'jobs',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    kind: text('kind').notNull(),
    /** e.g. the model run id for `fit`. */
    refId: integer('ref_id'),
    payload: jsonb('payload').notNull().default({}),
    /** queued | running | done | failed | cancelled */
    status: text('status').notNull().default('queued'),
    attempts: integer('attempts').notNull().default(0),
    cancelRequested: integer('cancel_requested').notNull().default(0),
    lockedBy: text('locked_by'),
    lockedUntil: timestamp('locked_until', { withTimezone: true }),
    runAfter: timestamp('run_after', { withTimezone: true }).notNull().defaultNow(),
    error: text('error'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    finishedAt: timestamp('finished_at', { withTimezone: true }),
  },
  (t) => [index('jobs_status_idx').on(t.status, t.runAfter)],
);
