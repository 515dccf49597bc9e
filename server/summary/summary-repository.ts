/**
 * The database reads behind Home's summary: counts of what Netput holds, which seasons have records,
 * the newest fitted run, the outlooks and their published versions, and the budgets built from them.
 */
import { and, asc, count, countDistinct, desc, eq, inArray, sql } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { budgets, farmRecords, farms, items, modelRuns, models, outlooks, outlookVersions, priceObservations, seasons, users } from '../db/schema/index.js';

export async function countFarms(db: Db): Promise<number> {
  const [{ n }] = await db.select({ n: count() }).from(farms);
  return Number(n);
}

export async function countMembers(db: Db): Promise<number> {
  const [{ n }] = await db.select({ n: count() }).from(users).where(eq(users.role, 'member'));
  return Number(n);
}

export async function countItemsByRole(db: Db): Promise<{ outputs: number; inputs: number }> {
  const rows = await db.select({ role: items.role, n: count() }).from(items).groupBy(items.role);
  return { outputs: Number(rows.find((r) => r.role === 'output')?.n ?? 0), inputs: Number(rows.find((r) => r.role === 'input')?.n ?? 0) };
}

export async function countPriceObservations(db: Db): Promise<number> {
  const [{ n }] = await db.select({ n: count() }).from(priceObservations);
  return Number(n);
}

export async function countFarmRecords(db: Db): Promise<number> {
  const [{ n }] = await db.select({ n: count() }).from(farmRecords);
  return Number(n);
}

/** Every season, oldest first. */
export async function seasonsInOrder(db: Db) {
  return db.select({ id: seasons.id, label: seasons.label }).from(seasons).orderBy(asc(seasons.startYear));
}

/** Season id → how many farms have any record in it. */
export async function farmsWithRecordsBySeason(db: Db): Promise<Map<number, number>> {
  const rows = await db.select({ seasonId: farmRecords.seasonId, n: countDistinct(farmRecords.farmId) }).from(farmRecords).groupBy(farmRecords.seasonId);
  return new Map(rows.map((r) => [r.seasonId, Number(r.n)]));
}

/** Ids of the seasons with any price observation. */
export async function pricedSeasonIds(db: Db): Promise<Set<number>> {
  return new Set((await db.selectDistinct({ seasonId: priceObservations.seasonId }).from(priceObservations)).map((r) => r.seasonId));
}

/** The newest run of any model that is queued or running (null when none is). */
export async function runInProgress(db: Db) {
  const [row] = await db
    .select({ id: modelRuns.id, modelName: models.name, status: modelRuns.status })
    .from(modelRuns)
    .innerJoin(models, eq(models.id, modelRuns.modelId))
    .where(inArray(modelRuns.status, ['queued', 'running']))
    .orderBy(desc(modelRuns.id))
    .limit(1);
  return row ?? null;
}

/** A succeeded run with the definition it ran and the hash of its data snapshot. */
export async function succeededRunFacts(db: Db, runId?: number) {
  const [row] = await db
    .select({ id: modelRuns.id, modelName: models.name, definition: modelRuns.definition, dataHash: modelRuns.dataHash, finishedAt: modelRuns.finishedAt })
    .from(modelRuns)
    .innerJoin(models, eq(models.id, modelRuns.modelId))
    .where(runId ? and(eq(modelRuns.status, 'succeeded'), eq(modelRuns.id, runId)) : eq(modelRuns.status, 'succeeded'))
    .orderBy(desc(modelRuns.id))
    .limit(1);
  return row ?? null;
}

/** Each outlook (newest season first) with its draft's state and its latest published version. */
export async function outlookStates(db: Db) {
  const rows = await db.select({ outlook: outlooks, season: seasons.label }).from(outlooks).innerJoin(seasons, eq(seasons.id, outlooks.seasonId)).orderBy(desc(seasons.startYear));
  const versions = await db
    .select({
      id: outlookVersions.id,
      outlookId: outlookVersions.outlookId,
      version: outlookVersions.version,
      inputsHash: outlookVersions.inputsHash,
      commentary: sql<string | null>`${outlookVersions.snapshot}->>'commentary'`,
      publishedAt: outlookVersions.publishedAt,
    })
    .from(outlookVersions)
    .orderBy(desc(outlookVersions.version));
  return rows.map((r) => ({ ...r, latest: versions.find((v) => v.outlookId === r.outlook.id) ?? null }));
}

/** Budgets (name and the outlook version they were built from, when they were). */
export async function budgetSources(db: Db) {
  const rows = await db.select({ id: budgets.id, name: budgets.name, source: budgets.source }).from(budgets).orderBy(desc(budgets.id));
  return rows.map((r) => {
    const s = r.source as { kind: string; outlookVersionId?: number };
    return { id: r.id, name: r.name, outlookVersionId: s.kind === 'outlook' ? (s.outlookVersionId ?? null) : null };
  });
}
