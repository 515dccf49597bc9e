/**
 * Farm records (quantities per farm, season and item) and fixed factors (land and any other level per
 * farm and season). Every read takes the reader and narrows a member to their own farm
 * (core/farm-scope.ts); writes are the planner's and run inside the service's transaction.
 */
import { and, asc, countDistinct, eq, gt, sql } from 'drizzle-orm';
import type { FarmRecordRow } from '../../shared/api-types.js';
import type { z } from 'zod';
import type { factorValueSchema, recordSchema } from '../../shared/data-schemas.js';
import type { Db } from '../db/client.js';
import { farmRecords, farms, farmSeasonFactors, items, seasons } from '../db/schema/index.js';
import { readableFarmIds, type Reader } from '../core/farm-scope.js';
import { inAny, onlyIn } from '../db/conditions.js';
import type { SheetRow } from '../exports/spreadsheet-writers.js';
import type { QuantityHistory } from '../../shared/plausibility.js';

export interface RecordFilter {
  farmIds?: number[];
  seasonIds?: number[];
}

export async function listRecords(db: Db, reader: Reader, filter: RecordFilter = {}): Promise<FarmRecordRow[]> {
  const farmIds = readableFarmIds(reader, filter.farmIds);
  if (farmIds && farmIds.length === 0) return [];
  return db
    .select({
      farmId: farmRecords.farmId,
      farmCode: farms.code,
      seasonId: farmRecords.seasonId,
      season: seasons.label,
      itemId: farmRecords.itemId,
      itemCode: items.code,
      itemName: items.name,
      role: items.role,
      unit: items.unit,
      quantity: farmRecords.quantity,
      version: farmRecords.version,
    })
    .from(farmRecords)
    .innerJoin(farms, eq(farms.id, farmRecords.farmId))
    .innerJoin(seasons, eq(seasons.id, farmRecords.seasonId))
    .innerJoin(items, eq(items.id, farmRecords.itemId))
    .where(and(onlyIn(farmRecords.farmId, farmIds), inAny(farmRecords.seasonId, filter.seasonIds)))
    .orderBy(asc(farms.code), asc(seasons.startYear), asc(items.id));
}

export async function listLand(db: Db, reader: Reader, requestedFarmIds?: number[]) {
  const farmIds = readableFarmIds(reader, requestedFarmIds);
  if (farmIds && farmIds.length === 0) return [];
  return db
    .select({ farmId: farmSeasonFactors.farmId, farmCode: farms.code, seasonId: farmSeasonFactors.seasonId, season: seasons.label, landHa: farmSeasonFactors.value })
    .from(farmSeasonFactors)
    .innerJoin(farms, eq(farms.id, farmSeasonFactors.farmId))
    .innerJoin(seasons, eq(seasons.id, farmSeasonFactors.seasonId))
    .where(and(eq(farmSeasonFactors.factor, 'land_ha'), onlyIn(farmSeasonFactors.farmId, farmIds)))
    .orderBy(asc(farms.code), asc(seasons.startYear));
}

/** Every fixed factor (land_ha and any other) per farm and season. */
export async function listFactors(db: Db, reader: Reader, requestedFarmIds?: number[]) {
  const farmIds = readableFarmIds(reader, requestedFarmIds);
  if (farmIds && farmIds.length === 0) return [];
  return db
    .select({ farmId: farmSeasonFactors.farmId, farmCode: farms.code, seasonId: farmSeasonFactors.seasonId, season: seasons.label, factor: farmSeasonFactors.factor, value: farmSeasonFactors.value })
    .from(farmSeasonFactors)
    .innerJoin(farms, eq(farms.id, farmSeasonFactors.farmId))
    .innerJoin(seasons, eq(seasons.id, farmSeasonFactors.seasonId))
    .where(onlyIn(farmSeasonFactors.farmId, farmIds))
    .orderBy(asc(farms.code), asc(seasons.startYear), asc(farmSeasonFactors.factor));
}

/** The fixed factors recorded on the farms `reader` may see, with how many farms and seasons have a value. */
export async function listFactorNames(db: Db, reader: Reader) {
  const farmIds = readableFarmIds(reader);
  if (farmIds && farmIds.length === 0) return [];
  return db
    .select({ factor: farmSeasonFactors.factor, farms: countDistinct(farmSeasonFactors.farmId), seasons: countDistinct(farmSeasonFactors.seasonId) })
    .from(farmSeasonFactors)
    .where(onlyIn(farmSeasonFactors.farmId, farmIds))
    .groupBy(farmSeasonFactors.factor)
    .orderBy(asc(farmSeasonFactors.factor));
}

/**
 * Farm records with each farm's land of the season, in the records import's layout; a farm and
 * season with land but no records gets a row of its own (item and quantity empty).
 */
export async function recordExportRows(db: Db, reader: Reader, requestedFarmIds?: number[]): Promise<SheetRow[]> {
  const farmIds = readableFarmIds(reader, requestedFarmIds);
  if (farmIds && farmIds.length === 0) return [];
  const records = await db
    .select({ farmId: farmRecords.farmId, farm: farms.code, seasonId: farmRecords.seasonId, season: seasons.label, year: seasons.startYear, itemId: items.id, item: items.code, quantity: farmRecords.quantity, unit: items.unit })
    .from(farmRecords)
    .innerJoin(farms, eq(farms.id, farmRecords.farmId))
    .innerJoin(seasons, eq(seasons.id, farmRecords.seasonId))
    .innerJoin(items, eq(items.id, farmRecords.itemId))
    .where(onlyIn(farmRecords.farmId, farmIds));
  const land = await db
    .select({ farmId: farmSeasonFactors.farmId, farm: farms.code, seasonId: farmSeasonFactors.seasonId, season: seasons.label, year: seasons.startYear, value: farmSeasonFactors.value })
    .from(farmSeasonFactors)
    .innerJoin(farms, eq(farms.id, farmSeasonFactors.farmId))
    .innerJoin(seasons, eq(seasons.id, farmSeasonFactors.seasonId))
    .where(and(eq(farmSeasonFactors.factor, 'land_ha'), onlyIn(farmSeasonFactors.farmId, farmIds)));
  const landOf = new Map(land.map((l) => [`${l.farmId}|${l.seasonId}`, l]));
  type Out = SheetRow & { farm: string; year: number; itemId: number };
  const out: Out[] = records.map((r) => ({ farm: r.farm, season: r.season, year: r.year, itemId: r.itemId, item: r.item, quantity: r.quantity, unit: r.unit, landHa: landOf.get(`${r.farmId}|${r.seasonId}`)?.value ?? null }));
  const withRecords = new Set(records.map((r) => `${r.farmId}|${r.seasonId}`));
  for (const l of land) {
    if (!withRecords.has(`${l.farmId}|${l.seasonId}`)) out.push({ farm: l.farm, season: l.season, year: l.year, itemId: 0, item: null, quantity: null, unit: null, landHa: l.value });
  }
  out.sort((a, b) => a.farm.localeCompare(b.farm) || a.year - b.year || a.itemId - b.itemId);
  return out.map(({ year: _y, itemId: _i, ...r }) => r);
}

type FarmRecord = z.infer<typeof recordSchema>;
type FactorValue = z.infer<typeof factorValueSchema>;
type RecordKey = Pick<FarmRecord, 'farmId' | 'seasonId' | 'itemId'>;
type FactorKey = Pick<FactorValue, 'farmId' | 'seasonId' | 'factor'>;

const recordWhere = (k: RecordKey) => and(eq(farmRecords.farmId, k.farmId), eq(farmRecords.seasonId, k.seasonId), eq(farmRecords.itemId, k.itemId));
const factorWhere = (k: FactorKey) => and(eq(farmSeasonFactors.farmId, k.farmId), eq(farmSeasonFactors.seasonId, k.seasonId), eq(farmSeasonFactors.factor, k.factor));

/** The stored record, locked (FOR UPDATE) so the write that follows replaces exactly what was read. */
export async function lockRecord(tx: Db, key: RecordKey) {
  const [row] = await tx.select().from(farmRecords).where(recordWhere(key)).for('update');
  return row;
}

/** Inserts the quantity, or replaces it and moves its version on. */
export async function upsertRecord(tx: Db, row: FarmRecord) {
  await tx
    .insert(farmRecords)
    .values(row)
    .onConflictDoUpdate({ target: [farmRecords.farmId, farmRecords.seasonId, farmRecords.itemId], set: { quantity: row.quantity, version: sql`${farmRecords.version} + 1` } });
}

/** Deletes the record; returns it, or undefined when there was none. */
export async function deleteRecord(tx: Db, key: RecordKey) {
  const [deleted] = await tx.delete(farmRecords).where(recordWhere(key)).returning();
  return deleted;
}

export async function getFactor(tx: Db, key: FactorKey) {
  const [row] = await tx.select().from(farmSeasonFactors).where(factorWhere(key));
  return row;
}

export async function upsertFactor(tx: Db, value: FactorValue) {
  await tx
    .insert(farmSeasonFactors)
    .values(value)
    .onConflictDoUpdate({ target: [farmSeasonFactors.farmId, farmSeasonFactors.seasonId, farmSeasonFactors.factor], set: { value: value.value } });
}

/** Deletes the factor value; returns it, or undefined when there was none. */
export async function deleteFactor(tx: Db, key: FactorKey) {
  const [deleted] = await tx.delete(farmSeasonFactors).where(factorWhere(key)).returning();
  return deleted;
}

/**
 * Each farm's land by season (`farmId|seasonId` → ha) and its quantity per hectare of each item over
 * its own seasons (`farmId|itemId`): what shared/plausibility.ts judges a new farm record against.
 */
export async function recordHistories(db: Db): Promise<{ land: Record<string, number>; history: Record<string, QuantityHistory> }> {
  const landRows = await db
    .select({ farmId: farmSeasonFactors.farmId, seasonId: farmSeasonFactors.seasonId, value: farmSeasonFactors.value })
    .from(farmSeasonFactors)
    .where(and(eq(farmSeasonFactors.factor, 'land_ha'), gt(farmSeasonFactors.value, 0)));
  const land: Record<string, number> = {};
  for (const l of landRows) land[`${l.farmId}|${l.seasonId}`] = l.value;
  // The median per hectare in the database (percentile_cont), not every record in this process.
  const res = (await db.execute(sql`
    select r.farm_id as "farmId", r.item_id as "itemId",
           percentile_cont(0.5) within group (order by r.quantity / f.value) as "perHa", count(*)::int as seasons
    from farm_records r
    join farm_season_factors f on f.farm_id = r.farm_id and f.season_id = r.season_id and f.factor = 'land_ha' and f.value > 0
    group by r.farm_id, r.item_id`)) as unknown as { rows: { farmId: number; itemId: number; perHa: number | string; seasons: number | string }[] };
  const history: Record<string, QuantityHistory> = {};
  for (const r of res.rows) history[`${r.farmId}|${r.itemId}`] = { perHa: Number(r.perHa), seasons: Number(r.seasons) };
  return { land, history };
}
