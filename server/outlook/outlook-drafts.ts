/**
 * Outlook drafts: opening one for a season, reading and changing it, its price expectations, and
 * queuing its projection. Publishing a draft is `outlook-publishing.ts`.
 */
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import { enqueueJob } from '../jobs/job-queue.js';
import { skillOfRun } from './run-choice.js';
import { SCENARIO_RULE_TEXT, type ExpectationSetting, type ScenarioRule } from './expectations.js';
import { computeExpectations, type ItemExpectation } from './expectations-service.js';
import { OUTLOOK_CAUTIONS } from './outlook-cautions.js';
import { draftInputsHash, gatherProjectionInputs, OUTLOOK_PROJECTION_JOB, succeededRun, type ProjectionTables } from './projection-service.js';
import { findOrCreateSeason } from './season-creation.js';
import * as repo from './outlook-repository.js';
import type { OutlookRow } from './outlook-repository.js';

/** The draft, or a 404; `lock` holds it for the rest of the transaction. */
export async function draftRow(db: Db, id: number, lock = false): Promise<OutlookRow> {
  const row = await repo.findOutlook(db, id, lock);
  if (!row) throw AppError.notFound('The outlook');
  return row;
}

/** Last season's price for every item of the run: a plain start the planner then changes. */
async function defaultExpectations(db: Db, runId: number, target: { label: string; startYear: number }) {
  const run = await succeededRun(db, runId);
  const settings: ExpectationSetting[] = run.result.fit.layout.items.map((i) => ({ item: i.name, method: { kind: 'last' } }));
  try {
    return { settings, computed: await computeExpectations(db, settings, target) };
  } catch (err) {
    if (err instanceof AppError && err.status === 422) return { settings: [] as ExpectationSetting[], computed: [] as ItemExpectation[] };
    throw err;
  }
}

/** Opens the draft of a season: first the season itself when it is new (`findOrCreateSeason`), then the draft. */
export async function createOutlook(db: Db, input: { season: string; title?: string; modelRunId?: number | null }, actorUserId: number) {
  const id = await db.transaction(async (tx) => {
    const season = await findOrCreateSeason(tx, input.season, actorUserId);
    const existing = await repo.findOutlookOfSeason(tx, season.id);
    if (existing) throw AppError.conflict(`An outlook for ${season.label} exists already (id ${existing.id}); open it or publish a new version of it`);
    let settings: ExpectationSetting[] = [];
    let computed: ItemExpectation[] = [];
    if (input.modelRunId) ({ settings, computed } = await defaultExpectations(tx, input.modelRunId, season));
    const row = await repo.insertOutlook(tx, {
      seasonId: season.id,
      title: input.title ?? `Season outlook ${season.label}`,
      modelRunId: input.modelRunId ?? null,
      expectationSettings: settings,
      expectations: computed,
      createdBy: actorUserId,
    });
    await recordAudit(tx, { actorUserId, action: 'outlook.create', entity: 'outlook', entityId: row.id, after: { season: season.label, title: row.title, modelRunId: row.modelRunId } });
    return row.id;
  });
  return getOutlook(db, id);
}

export async function listOutlooks(db: Db) {
  const rows = await repo.listOutlookRows(db);
  const versions = await repo.listVersions(db);
  return rows.map((r) => {
    const mine = versions.filter((v) => v.outlookId === r.id);
    return { ...r, versions: mine.length, latestVersion: mine[0] ? { id: mine[0].id, version: mine[0].version, publishedAt: mine[0].publishedAt } : null };
  });
}

/**
 * Whether the draft as it stands is what its latest version published: the same projection inputs,
 * an up-to-date projection and the same commentary. The page's badge says "Published" then, and
 * "Draft" once anything changed since.
 */
async function publishedState(db: Db, o: OutlookRow, upToDate: boolean) {
  const latest = await repo.latestVersionOf(db, o.id);
  if (!latest) return { version: null, publishedAt: null, unchangedSince: false };
  const unchangedSince = upToDate && latest.inputsHash === o.projectionInputsHash && (latest.commentary ?? '') === (o.commentary ?? '');
  return { version: latest.version, publishedAt: latest.publishedAt, unchangedSince };
}

export async function getOutlook(db: Db, id: number) {
  const o = await draftRow(db, id);
  const season = await repo.seasonById(db, o.seasonId);
  const versions = await repo.listVersions(db, id);
  const hash = draftInputsHash(o);
  const upToDate = o.projectionStatus === 'succeeded' && o.projectionInputsHash === hash;
  return {
    id: o.id,
    season: season.label,
    seasonStartYear: season.startYear,
    title: o.title,
    modelRunId: o.modelRunId,
    expectationSettings: o.expectationSettings as ExpectationSetting[],
    expectations: o.expectations as ItemExpectation[],
    scenarioRule: o.scenarioRule,
    scenarioRuleText: SCENARIO_RULE_TEXT[o.scenarioRule],
    draws: o.draws,
    seed: o.seed,
    commentary: o.commentary,
    projection: {
      status: o.projectionStatus,
      progress: o.projectionProgress,
      stage: o.projectionStage,
      error: o.projectionError,
      projectedAt: o.projectedAt,
      upToDate,
    },
    versions,
    published: await publishedState(db, o, upToDate),
    skill: await skillOfRun(db, o.modelRunId),
    cautions: OUTLOOK_CAUTIONS,
    createdAt: o.createdAt,
    updatedAt: o.updatedAt,
  };
}

export async function patchOutlook(
  db: Db,
  id: number,
  patch: Partial<{ title: string; modelRunId: number | null; commentary: string; scenarioRule: ScenarioRule; draws: number; seed: number }>,
  actorUserId: number,
) {
  await db.transaction(async (tx) => {
    const before = await draftRow(tx, id, true);
    const values: Parameters<typeof repo.updateOutlook>[2] = { ...patch, updatedAt: new Date() };
    if (patch.modelRunId) {
      await succeededRun(tx, patch.modelRunId);
      if (!(before.expectationSettings as unknown[]).length) {
        const d = await defaultExpectations(tx, patch.modelRunId, await repo.seasonById(tx, before.seasonId));
        values.expectationSettings = d.settings;
        values.expectations = d.computed;
      }
    }
    await repo.updateOutlook(tx, id, values);
    await recordAudit(tx, {
      actorUserId,
      action: 'outlook.update',
      entity: 'outlook',
      entityId: id,
      before: Object.fromEntries(Object.keys(patch).map((k) => [k, before[k as keyof OutlookRow]])),
      after: patch,
    });
  });
  return getOutlook(db, id);
}

export async function setExpectations(db: Db, id: number, settings: ExpectationSetting[], actorUserId: number) {
  await db.transaction(async (tx) => {
    const before = await draftRow(tx, id, true);
    const computed = await computeExpectations(tx, settings, await repo.seasonById(tx, before.seasonId));
    await repo.updateOutlook(tx, id, { expectationSettings: settings, expectations: computed, updatedAt: new Date() });
    await recordAudit(tx, {
      actorUserId,
      action: 'outlook.expectations',
      entity: 'outlook',
      entityId: id,
      before: before.expectationSettings,
      after: settings.map((s) => ({ ...s, base: computed.find((c) => c.item === s.item)?.base })),
    });
  });
  return getOutlook(db, id);
}

/** The season the draft is for. */
export async function outlookSeason(db: Db, id: number) {
  const o = await draftRow(db, id);
  return repo.seasonById(db, o.seasonId);
}

// ---- projecting the draft -----------------------------------------------------------------------

/** Queues the draft's projection job (`projection-service.ts` runs it). */
export async function startProjection(db: Db, id: number, actorUserId: number) {
  return db.transaction(async (tx) => {
    const o = await draftRow(tx, id, true);
    if (o.projectionStatus === 'queued' || o.projectionStatus === 'running') throw AppError.conflict('A projection of this outlook is already under way');
    await gatherProjectionInputs(tx, o); // refuses now what the job would refuse later
    await repo.updateOutlook(tx, id, { projectionStatus: 'queued', projectionProgress: 0, projectionStage: 'Waiting for a worker', projectionError: null });
    const job = await enqueueJob(tx, OUTLOOK_PROJECTION_JOB, id);
    await recordAudit(tx, { actorUserId, action: 'outlook.project', entity: 'outlook', entityId: id, after: { jobId: job.id, modelRunId: o.modelRunId, draws: o.draws, seed: o.seed } });
    return { status: 'queued' as const, jobId: job.id };
  });
}

export async function getProjection(db: Db, id: number) {
  const o = await draftRow(db, id);
  return {
    status: o.projectionStatus,
    progress: o.projectionProgress,
    stage: o.projectionStage,
    error: o.projectionError,
    projectedAt: o.projectedAt,
    upToDate: o.projectionStatus === 'succeeded' && o.projectionInputsHash === draftInputsHash(o),
    result: (o.projection as ProjectionTables | null) ?? null,
  };
}
