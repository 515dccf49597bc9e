import { sql } from 'drizzle-orm';
import { boolean, check, doublePrecision, integer, jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';
import { users } from './users.js';

/**
 * Fertiliser products the co-op stocks: grade (N–P2O5–K2O, % by weight), form, price per tonne of
 * product, the delivery lot it is bought in, and the supplier. Budgets copy the rows they use.
 */
export const fertiliserProducts = pgTable(
  'fertiliser_products',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    name: text('name').notNull().unique(),
    nPct: doublePrecision('n_pct').notNull().default(0),
    p2o5Pct: doublePrecision('p2o5_pct').notNull().default(0),
    k2oPct: doublePrecision('k2o_pct').notNull().default(0),
    form: text('form', { enum: ['solid', 'liquid', 'gas'] }).notNull(),
    pricePerT: doublePrecision('price_per_t').notNull(),
    currency: text('currency').notNull(),
    lotT: doublePrecision('lot_t').notNull(),
    supplier: text('supplier').notNull().default(''),
    /** Where the grade comes from (a published table, the supplier's analysis). */
    gradeSource: text('grade_source').notNull().default(''),
    /** Where the price comes from (a quote, a price list; "invented" for the demo). */
    priceNote: text('price_note').notNull().default(''),
    active: boolean('active').notNull().default(true),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    check('fertiliser_products_form_check', sql`${t.form} in ('solid','liquid','gas')`),
    check('fertiliser_products_grade_check', sql`${t.nPct} >= 0 and ${t.p2o5Pct} >= 0 and ${t.k2oPct} >= 0 and ${t.nPct} + ${t.p2o5Pct} + ${t.k2oPct} > 0 and ${t.nPct} + ${t.p2o5Pct} + ${t.k2oPct} <= 100`),
    check('fertiliser_products_price_check', sql`${t.pricePerT} > 0 and ${t.lotT} > 0`),
  ],
);

/**
 * A treasurer's fertiliser purchase budget: the inputs (demand source, product copies, booking plan,
 * scenarios) and the result computed from them when saved, with the software version that did it.
 * Recomputing the stored inputs with the same version gives the same result.
 */
export const budgets = pgTable('budgets', {
  id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
  name: text('name').notNull(),
  /** BudgetSource: model-run | manual | outlook (shared/budget-schemas.ts). */
  source: jsonb('source').notNull(),
  /** Copies of the fertiliser products used, with any budget-specific price or lot. */
  products: jsonb('products').notNull(),
  /** { months: [{ month, share, prepay }], prepayDiscountPct, paymentTermsDays, deliveryMonth, financingRatePct } */
  bookingPlan: jsonb('booking_plan').notNull(),
  /** [{ name, priceChanges: { nitrogen: 20, ... }, productPriceChanges }] */
  scenarios: jsonb('scenarios').notNull().default([]),
  /** round-up | whole-lots and optional reference nutrient prices. */
  options: jsonb('options').notNull().default({}),
  result: jsonb('result').notNull(),
  softwareVersion: text('software_version').notNull(),
  createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
  updatedBy: integer('updated_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
});
