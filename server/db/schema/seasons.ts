import { date, integer, pgTable, text } from 'drizzle-orm/pg-core';

/** A crop or marketing year, e.g. 2024/25 starting in July 2024. */
export const seasons = pgTable('seasons', {
  id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
  label: text('label').notNull().unique(),
  startYear: integer('start_year').notNull().unique(),
  startMonth: integer('start_month').notNull().default(7),
  startsOn: date('starts_on').notNull(),
});
