import { sql } from 'drizzle-orm';
import { check, doublePrecision, integer, pgTable, text } from 'drizzle-orm/pg-core';

/** Goods the co-op's members sell (outputs) or buy (inputs): the netputs of the model. */
export const items = pgTable(
  'items',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    /** Short machine name used in imports and model definitions, e.g. `wheat`, `nitrogen`. */
    code: text('code').notNull().unique(),
    name: text('name').notNull(),
    role: text('role', { enum: ['output', 'input'] }).notNull(),
    category: text('category', { enum: ['grain', 'oilseed', 'fertiliser', 'fuel', 'labour', 'other'] }).notNull(),
    /** Unit of quantity (t, kg N, L, h); prices are per this unit. */
    unit: text('unit').notNull(),
    /** For fertiliser items: grade N–P2O5–K2O in % by weight. */
    nPct: doublePrecision('n_pct'),
    p2o5Pct: doublePrecision('p2o5_pct'),
    k2oPct: doublePrecision('k2o_pct'),
  },
  (t) => [check('items_role_check', sql`${t.role} in ('output','input')`)],
);
