import { doublePrecision, integer, pgTable, primaryKey } from 'drizzle-orm/pg-core';
import { farms } from './farms.js';
import { items } from './items.js';
import { seasons } from './seasons.js';

/** What a farm produced or used of an item in a season (quantity ≥ 0 in the item's unit). */
export const farmRecords = pgTable(
  'farm_records',
  {
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    seasonId: integer('season_id')
      .notNull()
      .references(() => seasons.id, { onDelete: 'restrict' }),
    itemId: integer('item_id')
      .notNull()
      .references(() => items.id, { onDelete: 'restrict' }),
    quantity: doublePrecision('quantity').notNull(),
    /** Raised by every change; a save names the version it edited, so a stale save is refused (409). */
    version: integer('version').notNull().default(1),
  },
  (t) => [primaryKey({ columns: [t.farmId, t.seasonId, t.itemId] })],
);
