import { doublePrecision, integer, pgTable, primaryKey, text } from 'drizzle-orm/pg-core';
import { seasons } from './seasons.js';

export const farms = pgTable('farms', {
  id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
  /** The co-op's own farm code, e.g. F07. */
  code: text('code').notNull().unique(),
  name: text('name').notNull(),
  region: text('region').notNull(),
  /** Land farmed now, in hectares; per-season land is in farm_season_factors. */
  landHa: doublePrecision('land_ha').notNull(),
});

/** Quasi-fixed factors per farm and season (land in ha, and any others the co-op records). */
export const farmSeasonFactors = pgTable(
  'farm_season_factors',
  {
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    seasonId: integer('season_id')
      .notNull()
      .references(() => seasons.id, { onDelete: 'cascade' }),
    factor: text('factor').notNull(),
    value: doublePrecision('value').notNull(),
  },
  (t) => [primaryKey({ columns: [t.farmId, t.seasonId, t.factor] })],
);
