/** The models and their runs: plain queries, no use case (models-service.ts holds those). */
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import type { ModelDefinition } from '../../shared/model-schemas.js';
import type { Db } from '../db/client.js';
import { deliveryPoints, farmRecords, farms, farmSeasonFactors, items, models, modelRuns, priceObservations, seasons, users } from '../db/schema/index.js';

export type ModelRow = typeof models.$inferSelect;
export type ModelRunRow = typeof modelRuns.$inferSelect;

/** The run columns a list or a status poll needs (not the snapshot, not the result). */
export const runSummaryColumns = {
  id: modelRuns.id,
  modelId: modelRuns.modelId,
  status: modelRuns.status,
  progress: modelRuns.progress,
  stage: modelRuns.stage,
  dataHash: modelRuns.dataHash,
  optionsHash: modelRuns.optionsHash,
  softwareVersion: modelRuns.softwareVersion,
  error: modelRuns.error,
  rerunOf: modelRuns.rerunOf,
  createdAt: modelRuns.createdAt,
  startedAt: modelRuns.startedAt,
  finishedAt: modelRuns.finishedAt,
};

export async function insertModel(db: Db, name: string, definition: ModelDefinition, createdBy: number): Promise<ModelRow> {
  const [row] = await db.insert(models).values({ name, definition, createdBy }).returning();
  return row;
}

/** Every model, newest first, each with its runs' summaries (newest first). */
export async function listModelsWithRuns(db: Db) {
  const rows = await db.select().from(models).orderBy(desc(models.createdAt));
  const runs = rows.length ? await db.select(runSummaryColumns).from(modelRuns).where(inArray(modelRuns.modelId, rows.map((r) => r.id))).orderBy(desc(modelRuns.id)) : [];
  return rows.map((m) => ({ ...m, runs: runs.filter((r) => r.modelId === m.id) }));
}

export async function findModel(db: Db, id: number): Promise<ModelRow | undefined> {
  const [row] = await db.select().from(models).where(eq(models.id, id));
  return row;
}

export async function listRunSummaries(db: Db, modelId: number) {
  return db.select(runSummaryColumns).from(modelRuns).where(eq(modelRuns.modelId, modelId)).orderBy(desc(modelRuns.id));
}

export async function deleteModel(db: Db, id: number): Promise<void> {
  await db.delete(models).where(eq(models.id, id));
}

export async function insertRun(db: Db, values: typeof modelRuns.$inferInsert) {
  const [run] = await db.insert(modelRuns).values(values).returning(runSummaryColumns);
  return run;
}

export async function findRun(db: Db, id: number): Promise<ModelRunRow | undefined> {
  const [row] = await db.select().from(modelRuns).where(eq(modelRuns.id, id));
  return row;
}

export async function findRunSummary(db: Db, id: number) {
  const [row] = await db.select(runSummaryColumns).from(modelRuns).where(eq(modelRuns.id, id));
  return row;
}

export async function updateRun(db: Db, id: number, set: Partial<typeof modelRuns.$inferInsert>): Promise<void> {
  await db.update(modelRuns).set(set).where(eq(modelRuns.id, id));
}

/** Moves a running run's progress on; a run that has ended meanwhile keeps its end state. */
export async function updateRunProgress(db: Db, id: number, progress: number, stage: string): Promise<void> {
  await db
    .update(modelRuns)
    .set({ progress, stage })
    .where(and(eq(modelRuns.id, id), eq(modelRuns.status, 'running')));
}

/** A user's name (who started a run), or null. */
export async function userName(db: Db, userId: number | null): Promise<string | null> {
  if (userId === null) return null;
  const [row] = await db.select({ name: users.name }).from(users).where(eq(users.id, userId));
  return row?.name ?? null;
}

// The estimation sample's reads (model-data.ts builds the dataset from them). Models are fitted
// over the co-op's data desk, not one farm's part of it, so these reads are not narrowed to a farm.

export async function itemsByCode(db: Db, codes: string[]) {
  return db.select().from(items).where(inArray(items.code, codes));
}

export async function seasonsOldestFirst(db: Db) {
  return db.select().from(seasons).orderBy(asc(seasons.startYear));
}

export async function farmsByCode(db: Db) {
  return db.select().from(farms).orderBy(asc(farms.code));
}

/** Every price observation of the items in the seasons, with its delivery point's region. */
export async function pricesWithRegion(db: Db, itemIds: number[], seasonIds: number[]) {
  return db
    .select({ itemId: priceObservations.itemId, seasonId: priceObservations.seasonId, price: priceObservations.price, region: deliveryPoints.region })
    .from(priceObservations)
    .innerJoin(deliveryPoints, eq(deliveryPoints.id, priceObservations.deliveryPointId))
    .where(and(inArray(priceObservations.itemId, itemIds), inArray(priceObservations.seasonId, seasonIds)));
}

export async function farmRecordsOf(db: Db, itemIds: number[], seasonIds: number[], farmIds: number[]) {
  return db
    .select()
    .from(farmRecords)
    .where(and(inArray(farmRecords.itemId, itemIds), inArray(farmRecords.seasonId, seasonIds), inArray(farmRecords.farmId, farmIds)));
}

export async function farmSeasonFactorsOf(db: Db, factors: string[], seasonIds: number[], farmIds: number[]) {
  return db
    .select()
    .from(farmSeasonFactors)
    .where(and(inArray(farmSeasonFactors.factor, factors), inArray(farmSeasonFactors.seasonId, seasonIds), inArray(farmSeasonFactors.farmId, farmIds)));
}
