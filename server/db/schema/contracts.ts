import { sql } from 'drizzle-orm';
import { check, doublePrecision, index, integer, pgTable, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { farms } from './farms.js';
import { items } from './items.js';
import { seasons } from './seasons.js';

/**
 * A forward delivery contract (issue 19): a member farm commits so many units of an output item
 * (tonnes for grain) in a season at an agreed price, delivered within a window of months.
 * The price is money, so it is kept in minor units (cents) per unit of the item, in `currency`.
 */
export const contracts = pgTable(
  'contracts',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    seasonId: integer('season_id')
      .notNull()
      .references(() => seasons.id, { onDelete: 'restrict' }),
    itemId: integer('item_id')
      .notNull()
      .references(() => items.id, { onDelete: 'restrict' }),
    /** Quantity committed, in the item's unit (t for grain and oilseeds). */
    quantity: doublePrecision('quantity').notNull(),
    /** Agreed price per item unit in minor units (cents) of `currency`. */
    priceCents: integer('price_cents').notNull(),
    currency: text('currency').notNull().default('EUR'),
    /** Delivery window, first and last month, as YYYY-MM. */
    deliveryFrom: text('delivery_from').notNull(),
    deliveryTo: text('delivery_to').notNull(),
    status: text('status', { enum: ['offered', 'signed', 'delivered', 'cancelled'] }).notNull().default('offered'),
    /** The co-op's own contract number, unique (an import updates the contract it names). */
    reference: text('reference').notNull(),
    /** Raised by every change; a save names the version it edited, so a stale save is refused (409). */
    version: integer('version').notNull().default(1),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    check('contracts_quantity_check', sql`${t.quantity} > 0`),
    check('contracts_price_check', sql`${t.priceCents} > 0`),
    check('contracts_status_check', sql`${t.status} in ('offered','signed','delivered','cancelled')`),
    check('contracts_window_check', sql`${t.deliveryFrom} <= ${t.deliveryTo}`),
    uniqueIndex('contracts_reference_unique').on(t.reference),
    index('contracts_season_idx').on(t.seasonId),
    index('contracts_farm_idx').on(t.farmId),
  ],
);
