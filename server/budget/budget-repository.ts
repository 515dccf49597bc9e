/**
 * Budgets and the items and model names they refer to: plain queries, no use case (budget-service.ts
 * holds those and opens the transactions). Budgets are the co-op's, not one farm's, and members
 * cannot reach them, so nothing here is narrowed to a farm.
 */
import { desc, eq, inArray } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { budgets, items, models, users } from '../db/schema/index.js';

export type ItemRow = typeof items.$inferSelect;

export const budgetColumns = {
  id: budgets.id,
  name: budgets.name,
  source: budgets.source,
  products: budgets.products,
  bookingPlan: budgets.bookingPlan,
  scenarios: budgets.scenarios,
  options: budgets.options,
  result: budgets.result,
  softwareVersion: budgets.softwareVersion,
  createdBy: budgets.createdBy,
  updatedBy: budgets.updatedBy,
  createdAt: budgets.createdAt,
  updatedAt: budgets.updatedAt,
};

export async function findBudgetRow(db: Db, id: number) {
  const [row] = await db.select(budgetColumns).from(budgets).where(eq(budgets.id, id));
  return row;
}

/** Every budget, last changed first. */
export async function listBudgetRows(db: Db) {
  return db.select(budgetColumns).from(budgets).orderBy(desc(budgets.updatedAt), desc(budgets.id));
}

export async function insertBudget(db: Db, values: typeof budgets.$inferInsert): Promise<number> {
  const [row] = await db.insert(budgets).values(values).returning({ id: budgets.id });
  return row!.id;
}

export async function updateBudgetRow(db: Db, id: number, set: Partial<typeof budgets.$inferInsert>): Promise<void> {
  await db.update(budgets).set(set).where(eq(budgets.id, id));
}

export async function deleteBudgetRow(db: Db, id: number): Promise<void> {
  await db.delete(budgets).where(eq(budgets.id, id));
}

/** A user's name (who created or changed a budget), or null. */
export async function userName(db: Db, id: number | null): Promise<string | null> {
  if (id === null) return null;
  const [u] = await db.select({ name: users.name }).from(users).where(eq(users.id, id));
  return u?.name ?? null;
}

export async function modelName(db: Db, modelId: number): Promise<string | null> {
  const [model] = await db.select({ name: models.name }).from(models).where(eq(models.id, modelId));
  return model?.name ?? null;
}

export async function itemsByCodes(db: Db, codes: string[]): Promise<ItemRow[]> {
  return db.select().from(items).where(inArray(items.code, codes));
}

export async function itemLabelsByCodes(db: Db, codes: string[]) {
  return db.select({ code: items.code, name: items.name, unit: items.unit }).from(items).where(inArray(items.code, codes));
}
