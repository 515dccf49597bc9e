/**
 * The accountability record's queries: the published versions with their seasons, the items, and
 * the farm records of a season. The record is read by the planner and the board (every farm); the
 * farms and items compared are held in the query (`recordedQuantities`), so a season's comparison
 * reads only the farms its outlook projected.
 */
import { and, asc, eq, inArray } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { farmRecords, farms, items, outlookVersions, seasons } from '../db/schema/index.js';

export type ItemRow = typeof items.$inferSelect;

/** Every published version with its season, oldest season and version first. */
export async function versionsWithSeasons(db: Db) {
  return db
    .select({
      id: outlookVersions.id,
      outlookId: outlookVersions.outlookId,
      version: outlookVersions.version,
      seasonId: outlookVersions.seasonId,
      snapshot: outlookVersions.snapshot,
      publishedAt: outlookVersions.publishedAt,
      season: seasons.label,
      startYear: seasons.startYear,
    })
    .from(outlookVersions)
    .innerJoin(seasons, eq(seasons.id, outlookVersions.seasonId))
    .orderBy(asc(seasons.startYear), asc(outlookVersions.version));
}

export type PublishedVersionRow = Awaited<ReturnType<typeof versionsWithSeasons>>[number];

export async function allItems(db: Db): Promise<ItemRow[]> {
  return db.select().from(items);
}

/** The quantities recorded in a season for the given farms and items only (none asked: none read). */
export async function recordedQuantities(db: Db, seasonId: number, farmIds: number[], itemIds: number[]) {
  if (!farmIds.length || !itemIds.length) return [];
  return db
    .select({ farmId: farmRecords.farmId, itemId: farmRecords.itemId, quantity: farmRecords.quantity })
    .from(farmRecords)
    .where(and(eq(farmRecords.seasonId, seasonId), inArray(farmRecords.farmId, farmIds), inArray(farmRecords.itemId, itemIds)));
}

/** Every record of a season with its farm's code and name. */
export async function seasonRecordsWithFarms(db: Db, seasonId: number) {
  return db
    .select({ farmId: farmRecords.farmId, itemId: farmRecords.itemId, quantity: farmRecords.quantity, code: farms.code, name: farms.name })
    .from(farmRecords)
    .innerJoin(farms, eq(farms.id, farmRecords.farmId))
    .where(eq(farmRecords.seasonId, seasonId));
}
