import { doublePrecision, index, integer, jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';
import { users } from './users.js';

/** A model definition: which items, numeraire, fixed factors, trend, sample and functional form. */
export const models = pgTable('models', {
  id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
  name: text('name').notNull(),
  /** ModelDefinition (shared/model-schemas.ts). */
  definition: jsonb('definition').notNull(),
  createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
});

/**
 * One fit of a model, stored unchanged: the definition as run, the exact data snapshot and its hash,
 * the software version, and the result. Re-running a stored run uses the same snapshot.
 */
export const modelRuns = pgTable(
  'model_runs',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    modelId: integer('model_id')
      .notNull()
      .references(() => models.id, { onDelete: 'cascade' }),
    /** queued | running | succeeded | failed | cancelled */
    status: text('status').notNull().default('queued'),
    progress: doublePrecision('progress').notNull().default(0),
    stage: text('stage').notNull().default('Waiting for a worker'),
    definition: jsonb('definition').notNull(),
    dataset: jsonb('dataset').notNull(),
    dataHash: text('data_hash').notNull(),
    optionsHash: text('options_hash').notNull(),
    softwareVersion: text('software_version').notNull(),
    /** Observations left out of the sample, with the reason. */
    excluded: jsonb('excluded').notNull().default([]),
    result: jsonb('result'),
    error: text('error'),
    /** The run this one repeats, when it was started with "run again". */
    rerunOf: integer('rerun_of'),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp('started_at', { withTimezone: true }),
    finishedAt: timestamp('finished_at', { withTimezone: true }),
  },
  (t) => [index('model_runs_model_idx').on(t.modelId)],
);
