/**
 * The outlook's queries: seasons an outlook opens, drafts, published versions with their farm
 * parts, the finished model runs an outlook may rest on, the members an outlook e-mail goes to,
 * and outbox rows of a version. A farm's part of a
 * version is read only with the farm in the query (`farmPart`), so a member's view cannot hold
 * another farm's figures.
 */
import { and, asc, desc, eq, getTableColumns, inArray, sql } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { futuresQuotes, items, mailOutbox, models, modelRuns, outlooks, outlookVersionFarms, outlookVersions, seasons, users } from '../db/schema/index.js';
import type { FarmOutlook } from '../../shared/outlook-types.js';
import type { ForecastSpecName } from '../../shared/model-schemas.js';
import type { BackTestResult } from '../../shared/forecast-types.js';

export type SeasonRow = typeof seasons.$inferSelect;
export type OutlookRow = typeof outlooks.$inferSelect;
export type VersionRow = typeof outlookVersions.$inferSelect;

// ---- seasons ------------------------------------------------------------------------------------

export async function findSeasonByLabel(db: Db, label: string): Promise<SeasonRow | undefined> {
  const [row] = await db.select().from(seasons).where(eq(seasons.label, label));
  return row;
}

export async function findSeasonStartingIn(db: Db, startYear: number): Promise<SeasonRow | undefined> {
  const [row] = await db.select().from(seasons).where(eq(seasons.startYear, startYear));
  return row;
}

export async function latestSeason(db: Db): Promise<SeasonRow | undefined> {
  const [row] = await db.select().from(seasons).orderBy(desc(seasons.startYear)).limit(1);
  return row;
}

export async function insertSeason(db: Db, values: typeof seasons.$inferInsert): Promise<SeasonRow> {
  const [row] = await db.insert(seasons).values(values).returning();
  return row!;
}

/** The season of an existing row (outlooks and versions reference it, so it is there). */
export async function seasonById(db: Db, id: number): Promise<SeasonRow> {
  const [row] = await db.select().from(seasons).where(eq(seasons.id, id));
  return row!;
}

// ---- drafts -------------------------------------------------------------------------------------

/** The draft, locked for the rest of the transaction with `lock`. */
export async function findOutlook(db: Db, id: number, lock = false): Promise<OutlookRow | undefined> {
  const q = db.select().from(outlooks).where(eq(outlooks.id, id));
  const [row] = lock ? await q.for('update') : await q;
  return row;
}

export async function findOutlookOfSeason(db: Db, seasonId: number): Promise<{ id: number } | undefined> {
  const [row] = await db.select({ id: outlooks.id }).from(outlooks).where(eq(outlooks.seasonId, seasonId));
  return row;
}

export async function insertOutlook(db: Db, values: typeof outlooks.$inferInsert): Promise<OutlookRow> {
  const [row] = await db.insert(outlooks).values(values).returning();
  return row!;
}

export async function updateOutlook(db: Db, id: number, values: Partial<typeof outlooks.$inferInsert>): Promise<void> {
  await db.update(outlooks).set(values).where(eq(outlooks.id, id));
}

/** Every draft with its season, newest season first. */
export async function listOutlookRows(db: Db) {
  return db
    .select({ id: outlooks.id, season: seasons.label, startYear: seasons.startYear, title: outlooks.title, modelRunId: outlooks.modelRunId, projectionStatus: outlooks.projectionStatus, updatedAt: outlooks.updatedAt })
    .from(outlooks)
    .innerJoin(seasons, eq(seasons.id, outlooks.seasonId))
    .orderBy(desc(seasons.startYear));
}

// ---- published versions -------------------------------------------------------------------------

/** The published versions (of one outlook, or of all), newest season and version first. */
export async function listVersions(db: Db, outlookId?: number) {
  return db
    .select({
      id: outlookVersions.id,
      outlookId: outlookVersions.outlookId,
      version: outlookVersions.version,
      season: seasons.label,
      title: sql<string>`${outlookVersions.snapshot}->>'title'`,
      modelRunId: outlookVersions.modelRunId,
      publishedAt: outlookVersions.publishedAt,
      publishedBy: users.name,
    })
    .from(outlookVersions)
    .innerJoin(seasons, eq(seasons.id, outlookVersions.seasonId))
    .leftJoin(users, eq(users.id, outlookVersions.publishedBy))
    .where(outlookId ? eq(outlookVersions.outlookId, outlookId) : undefined)
    .orderBy(desc(seasons.startYear), desc(outlookVersions.version));
}

/** The outlook's latest version: what the draft is compared with. */
export async function latestVersionOf(db: Db, outlookId: number) {
  const [row] = await db
    .select({ version: outlookVersions.version, inputsHash: outlookVersions.inputsHash, commentary: sql<string | null>`${outlookVersions.snapshot}->>'commentary'`, publishedAt: outlookVersions.publishedAt })
    .from(outlookVersions)
    .where(eq(outlookVersions.outlookId, outlookId))
    .orderBy(desc(outlookVersions.version))
    .limit(1);
  return row;
}

/** The highest version number the outlook has published, or 0. */
export async function highestVersion(db: Db, outlookId: number): Promise<number> {
  const [{ max }] = await db.select({ max: sql<number | null>`max(${outlookVersions.version})` }).from(outlookVersions).where(eq(outlookVersions.outlookId, outlookId));
  return max === null ? 0 : Number(max);
}

/** Writes a version and each farm's part of it; returns the version's id. */
export async function insertVersion(db: Db, values: typeof outlookVersions.$inferInsert, farmParts: FarmOutlook[]): Promise<number> {
  const [row] = await db.insert(outlookVersions).values(values).returning({ id: outlookVersions.id });
  const versionId = row!.id;
  if (farmParts.length) await db.insert(outlookVersionFarms).values(farmParts.map((f) => ({ versionId, farmId: f.farmId, data: f })));
  return versionId;
}

export async function findVersion(db: Db, versionId: number): Promise<VersionRow | undefined> {
  const [row] = await db.select().from(outlookVersions).where(eq(outlookVersions.id, versionId));
  return row;
}

/** The newest version of the latest season that has one. */
export async function newestVersion(db: Db): Promise<VersionRow | undefined> {
  const [row] = await db
    .select(getTableColumns(outlookVersions))
    .from(outlookVersions)
    .innerJoin(seasons, eq(seasons.id, outlookVersions.seasonId))
    .orderBy(desc(seasons.startYear), desc(outlookVersions.version))
    .limit(1);
  return row;
}

export async function anyVersionPublished(db: Db): Promise<boolean> {
  const [any] = await db.select({ id: outlookVersions.id }).from(outlookVersions).limit(1);
  return Boolean(any);
}

/** Every farm's part of a version (for planners, treasurers and admins only). */
export async function allFarmParts(db: Db, versionId: number): Promise<FarmOutlook[]> {
  const parts = await db.select({ data: outlookVersionFarms.data }).from(outlookVersionFarms).where(eq(outlookVersionFarms.versionId, versionId));
  return parts.map((p) => p.data as FarmOutlook);
}

/**
 * The land (ha) of every farm projected in a version, and nothing else of their parts: what the
 * portal sums into the co-op's land (null where a part has none).
 */
export async function landOfFarmParts(db: Db, versionId: number): Promise<(number | null)[]> {
  const rows = await db
    .select({ land: sql<number | null>`(${outlookVersionFarms.data}->'fixed'->>'land_ha')::float8` })
    .from(outlookVersionFarms)
    .where(eq(outlookVersionFarms.versionId, versionId));
  return rows.map((r) => (r.land === null ? null : Number(r.land)));
}

/** One farm's part of a version, the farm held in the query; null when the farm has none. */
export async function farmPart(db: Db, versionId: number, farmId: number): Promise<FarmOutlook | null> {
  const [part] = await db
    .select({ data: outlookVersionFarms.data })
    .from(outlookVersionFarms)
    .where(and(eq(outlookVersionFarms.versionId, versionId), eq(outlookVersionFarms.farmId, farmId)));
  return (part?.data as FarmOutlook | undefined) ?? null;
}

// ---- model runs an outlook may rest on ---------------------------------------------------------

/** Every item's code and name. */
export async function itemCodesAndNames(db: Db): Promise<{ code: string; name: string }[]> {
  return db.select({ code: items.code, name: items.name }).from(items);
}

/**
 * The succeeded runs (of all, or only those in `runIds`), newest first, with what the choice of a
 * run reads from each result: its forecast spec, whether its fit is convex at the means, and its
 * back-test (which may come back as JSON text).
 */
export async function succeededRunsWithSkill(db: Db, runIds?: number[]) {
  return db
    .select({
      runId: modelRuns.id,
      modelId: modelRuns.modelId,
      modelName: models.name,
      finishedAt: modelRuns.finishedAt,
      spec: sql<ForecastSpecName | null>`${modelRuns.result}->>'spec'`,
      convex: sql<boolean | null>`(${modelRuns.result}->'fit'->'curvature'->>'convexAtMeans')::boolean`,
      skill: sql<BackTestResult | string | null>`${modelRuns.result}->'skill'`,
    })
    .from(modelRuns)
    .innerJoin(models, eq(models.id, modelRuns.modelId))
    .where(runIds ? and(eq(modelRuns.status, 'succeeded'), inArray(modelRuns.id, runIds.length ? runIds : [-1])) : eq(modelRuns.status, 'succeeded'))
    .orderBy(desc(modelRuns.id));
}

// ---- e-mail -------------------------------------------------------------------------------------

/** The active member accounts, with what decides whether they get an outlook e-mail. */
export async function activeMembers(db: Db) {
  return db
    .select({ id: users.id, email: users.email, name: users.name, active: users.active, optOut: users.mailOptOut, passwordHash: users.passwordHash, farmId: users.farmId })
    .from(users)
    .where(and(eq(users.role, 'member'), eq(users.active, true)))
    .orderBy(asc(users.id));
}

/** An outbox row with the version it belongs to. */
export async function findDelivery(db: Db, deliveryId: number) {
  const [row] = await db.select({ id: mailOutbox.id, status: mailOutbox.status, versionId: mailOutbox.outlookVersionId }).from(mailOutbox).where(eq(mailOutbox.id, deliveryId));
  return row;
}

// ---- reset --------------------------------------------------------------------------------------

/**
 * Deletes every outlook, version and outbox row: for a full reset of the database only (the demo
 * reload). Published versions refuse deletion unless this transaction says so.
 */
export async function purgeOutlookData(tx: Db) {
  await tx.execute(sql`select set_config('netput.purge_outlooks', 'on', true)`);
  await tx.delete(mailOutbox);
  await tx.delete(outlookVersionFarms);
  await tx.delete(outlookVersions);
  await tx.delete(outlooks);
  await tx.delete(futuresQuotes);
}
