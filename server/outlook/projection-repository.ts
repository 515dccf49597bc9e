/**
 * What an outlook's projection, its price expectations and the portal's plain reading read besides
 * the outlook tables: the model run, items by code, the farms with their fixed-factor values, the
 * seasons and the farm records. Every read of farm figures names the farms in the query.
 */
import { and, asc, eq, inArray, lt } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { farmRecords, farms, farmSeasonFactors, items, models, modelRuns, seasons } from '../db/schema/index.js';

export type ItemRow = typeof items.$inferSelect;

/** A model run with its model's name (any status: the caller decides what it accepts). */
export async function runWithModelName(db: Db, runId: number) {
  const [run] = await db
    .select({ id: modelRuns.id, modelId: modelRuns.modelId, status: modelRuns.status, definition: modelRuns.definition, result: modelRuns.result, dataHash: modelRuns.dataHash, softwareVersion: modelRuns.softwareVersion, finishedAt: modelRuns.finishedAt, modelName: models.name })
    .from(modelRuns)
    .innerJoin(models, eq(models.id, modelRuns.modelId))
    .where(eq(modelRuns.id, runId));
  return run;
}

/** The items with these codes (none asked: none read). */
export async function itemsWithCodes(db: Db, codes: string[]): Promise<ItemRow[]> {
  return codes.length ? db.select().from(items).where(inArray(items.code, codes)) : [];
}

/** Every farm on the register, by code. */
export async function farmsByCode(db: Db) {
  return db.select().from(farms).orderBy(asc(farms.code));
}

/** The recorded values of these fixed factors for these farms, with each value's season. */
export async function fixedFactorValues(db: Db, farmIds: number[], factors: string[]) {
  if (!farmIds.length) return [];
  return db
    .select({ farmId: farmSeasonFactors.farmId, factor: farmSeasonFactors.factor, value: farmSeasonFactors.value, season: seasons.label, startYear: seasons.startYear })
    .from(farmSeasonFactors)
    .innerJoin(seasons, eq(seasons.id, farmSeasonFactors.seasonId))
    .where(and(inArray(farmSeasonFactors.farmId, farmIds), inArray(farmSeasonFactors.factor, factors.length ? factors : ['-'])));
}

/** Every season, oldest first. */
export async function seasonsInOrder(db: Db) {
  return db.select().from(seasons).orderBy(asc(seasons.startYear));
}

/** The seasons that start before a year, oldest first. */
export async function seasonsBefore(db: Db, beforeYear: number) {
  return db.select().from(seasons).where(lt(seasons.startYear, beforeYear)).orderBy(asc(seasons.startYear));
}

/** The labels of the seasons starting in these years (none asked: none read). */
export async function seasonLabelsStartingIn(db: Db, years: number[]): Promise<{ startYear: number; label: string }[]> {
  return years.length ? db.select({ startYear: seasons.startYear, label: seasons.label }).from(seasons).where(inArray(seasons.startYear, years)) : [];
}

/** Every season's records of these farms for these items (no farm asked: none read). */
export async function recordsOfFarms(db: Db, farmIds: number[], itemIds: number[]) {
  if (!farmIds.length) return [];
  return db
    .select({ farmId: farmRecords.farmId, seasonId: farmRecords.seasonId, itemId: farmRecords.itemId, quantity: farmRecords.quantity })
    .from(farmRecords)
    .where(and(inArray(farmRecords.farmId, farmIds), inArray(farmRecords.itemId, itemIds)));
}
