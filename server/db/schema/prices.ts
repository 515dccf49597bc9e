import { date, doublePrecision, index, integer, pgTable, text, uniqueIndex } from 'drizzle-orm/pg-core';
import { items } from './items.js';
import { seasons } from './seasons.js';

export const deliveryPoints = pgTable('delivery_points', {
  id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
  name: text('name').notNull().unique(),
  kind: text('kind', { enum: ['delivery point', 'region'] }).notNull(),
  region: text('region').notNull(),
});

export const priceObservations = pgTable(
  'price_observations',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    itemId: integer('item_id')
      .notNull()
      .references(() => items.id, { onDelete: 'restrict' }),
    seasonId: integer('season_id')
      .notNull()
      .references(() => seasons.id, { onDelete: 'restrict' }),
    deliveryPointId: integer('delivery_point_id')
      .notNull()
      .references(() => deliveryPoints.id, { onDelete: 'restrict' }),
    /** Price per item unit, in `currency`. */
    price: doublePrecision('price').notNull(),
    currency: text('currency').notNull(),
    source: text('source').notNull(),
    observedOn: date('observed_on').notNull(),
    /** Raised by every change; a save names the version it edited, so a stale save is refused (409). */
    version: integer('version').notNull().default(1),
  },
  (t) => [
    uniqueIndex('price_obs_unique').on(t.itemId, t.seasonId, t.deliveryPointId, t.observedOn),
    index('price_obs_season_idx').on(t.seasonId),
  ],
);

/** A price index the planner picks or uploads to deflate nominal prices (e.g. a consumer price index). */
export const priceIndexes = pgTable('price_indexes', {
  id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
  name: text('name').notNull().unique(),
  /** e.g. "2015 = 100" */
  base: text('base').notNull(),
  source: text('source').notNull(),
});

export const priceIndexValues = pgTable(
  'price_index_values',
  {
    indexId: integer('index_id')
      .notNull()
      .references(() => priceIndexes.id, { onDelete: 'cascade' }),
    seasonId: integer('season_id')
      .notNull()
      .references(() => seasons.id, { onDelete: 'cascade' }),
    value: doublePrecision('value').notNull(),
  },
  (t) => [uniqueIndex('price_index_values_unique').on(t.indexId, t.seasonId)],
);
