import { sql } from 'drizzle-orm';
import { check, date, doublePrecision, index, integer, jsonb, pgTable, primaryKey, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { farms } from './farms.js';
import { items } from './items.js';
import { modelRuns } from './models.js';
import { seasons } from './seasons.js';
import { users } from './users.js';

/**
 * Futures quotes the planner records for the futures-plus-basis expectation: per item and season the
 * contract quoted, the quote (in the item's unit and the co-op currency, converted by the planner) and
 * the day it was quoted. The basis of a past season is its local cash price minus its latest quote.
 */
export const futuresQuotes = pgTable(
  'futures_quotes',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    itemId: integer('item_id')
      .notNull()
      .references(() => items.id, { onDelete: 'restrict' }),
    seasonId: integer('season_id')
      .notNull()
      .references(() => seasons.id, { onDelete: 'restrict' }),
    /** The contract as the planner names it, e.g. "Sep 2027 milling wheat". */
    contract: text('contract').notNull(),
    quote: doublePrecision('quote').notNull(),
    currency: text('currency').notNull(),
    quotedOn: date('quoted_on').notNull(),
    source: text('source').notNull(),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('futures_quotes_unique').on(t.itemId, t.seasonId, t.contract, t.quotedOn), index('futures_quotes_season_idx').on(t.seasonId)],
);

export const PROJECTION_STATUSES = ['none', 'queued', 'running', 'succeeded', 'failed'] as const;

/**
 * The planner's working outlook for one season (the draft): model run, price expectations, scenario
 * rule, Monte Carlo settings, commentary and the latest projection. Publishing copies it into an
 * immutable `outlook_versions` row; the draft stays editable for the next version.
 */
export const outlooks = pgTable(
  'outlooks',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    seasonId: integer('season_id')
      .notNull()
      .unique()
      .references(() => seasons.id, { onDelete: 'restrict' }),
    title: text('title').notNull(),
    modelRunId: integer('model_run_id').references(() => modelRuns.id, { onDelete: 'set null' }),
    /** The planner's settings per item (ExpectationSetting[]). */
    expectationSettings: jsonb('expectation_settings').notNull().default([]),
    /** The expectations computed from them when they were last saved (ComputedExpectation[]). */
    expectations: jsonb('expectations').notNull().default([]),
    /** How the low and high scenarios combine the items' low and high prices: `margin` or `uniform`. */
    scenarioRule: text('scenario_rule', { enum: ['margin', 'uniform'] }).notNull().default('margin'),
    draws: integer('draws').notNull().default(2000),
    seed: integer('seed').notNull().default(1),
    commentary: text('commentary').notNull().default(''),
    projectionStatus: text('projection_status', { enum: PROJECTION_STATUSES }).notNull().default('none'),
    projectionProgress: doublePrecision('projection_progress').notNull().default(0),
    projectionStage: text('projection_stage'),
    projectionError: text('projection_error'),
    /** Hash of the draft inputs the stored projection was made from; publishing requires a match. */
    projectionInputsHash: text('projection_inputs_hash'),
    projection: jsonb('projection'),
    projectedAt: timestamp('projected_at', { withTimezone: true }),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    check('outlooks_scenario_rule_check', sql`${t.scenarioRule} in ('margin','uniform')`),
    check('outlooks_projection_status_check', sql`${t.projectionStatus} in ('none','queued','running','succeeded','failed')`),
  ],
);

/**
 * A published outlook: an unchangeable snapshot of everything a member or the board sees (season,
 * model run, expectations, scenarios, co-op projection, commentary, cautions). A database trigger
 * refuses UPDATE and DELETE (migration 0006_outlook_immutable); the code only ever inserts.
 * Each farm's own part is in `outlook_version_farms`, so a member's query can be held to one farm.
 */
export const outlookVersions = pgTable(
  'outlook_versions',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    outlookId: integer('outlook_id')
      .notNull()
      .references(() => outlooks.id, { onDelete: 'restrict' }),
    version: integer('version').notNull(),
    seasonId: integer('season_id')
      .notNull()
      .references(() => seasons.id, { onDelete: 'restrict' }),
    modelRunId: integer('model_run_id')
      .notNull()
      .references(() => modelRuns.id, { onDelete: 'restrict' }),
    /** The co-op part (OutlookSnapshot): no farm's own numbers. */
    snapshot: jsonb('snapshot').notNull(),
    inputsHash: text('inputs_hash').notNull(),
    publishedBy: integer('published_by').references(() => users.id),
    publishedAt: timestamp('published_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('outlook_versions_unique').on(t.outlookId, t.version), index('outlook_versions_season_idx').on(t.seasonId)],
);

/** One farm's part of a published outlook (FarmOutlook); as unchangeable as its version. */
export const outlookVersionFarms = pgTable(
  'outlook_version_farms',
  {
    versionId: integer('version_id')
      .notNull()
      .references(() => outlookVersions.id, { onDelete: 'restrict' }),
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'restrict' }),
    data: jsonb('data').notNull(),
  },
  (t) => [primaryKey({ columns: [t.versionId, t.farmId] })],
);

export const OUTBOX_STATUSES = ['queued', 'sending', 'sent', 'failed', 'skipped'] as const;

/**
 * Mail waiting to go out, and the record of what went. One row per message, with a key that is
 * unique per recipient and purpose (e.g. one per member per outlook version) so nothing can be queued
 * twice; `message_id` is derived from that key and sent as the Message-ID header.
 * Life of a row: queued → sending (committed before SMTP) → sent | queued again (retry, backoff) | failed;
 * skipped when the recipient opted out before the send.
 */
export const mailOutbox = pgTable(
  'mail_outbox',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    idempotencyKey: text('idempotency_key').notNull().unique(),
    messageId: text('message_id').notNull().unique(),
    /** e.g. `outlook` */
    kind: text('kind').notNull(),
    outlookVersionId: integer('outlook_version_id').references(() => outlookVersions.id, { onDelete: 'restrict' }),
    userId: integer('user_id').references(() => users.id),
    toAddress: text('to_address').notNull(),
    subject: text('subject').notNull(),
    textBody: text('text_body').notNull(),
    htmlBody: text('html_body'),
    /** Extra headers (List-Unsubscribe, List-Unsubscribe-Post, ...). */
    headers: jsonb('headers').$type<Record<string, string>>().notNull().default({}),
    status: text('status', { enum: OUTBOX_STATUSES }).notNull().default('queued'),
    attempts: integer('attempts').notNull().default(0),
    nextAttemptAt: timestamp('next_attempt_at', { withTimezone: true }).notNull().defaultNow(),
    lockedBy: text('locked_by'),
    lockedUntil: timestamp('locked_until', { withTimezone: true }),
    lastError: text('last_error'),
    /** The SMTP server's answer to the accepted message. */
    smtpResponse: text('smtp_response'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    sentAt: timestamp('sent_at', { withTimezone: true }),
  },
  (t) => [
    index('mail_outbox_due_idx').on(t.status, t.nextAttemptAt),
    index('mail_outbox_version_idx').on(t.outlookVersionId),
    check('mail_outbox_status_check', sql`${t.status} in ('queued','sending','sent','failed','skipped')`),
  ],
);
