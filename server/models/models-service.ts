import { and, desc, eq, inArray } from 'drizzle-orm';
import { modelDefinitionSchema, specOf, type ModelDefinition } from '../../shared/model-schemas.js';
import type { Db } from '../db/client.js';
import { models, modelRuns } from '../db/schema/index.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import { VERSION } from '../version.js';
import { enqueueJob, requestCancel } from '../jobs/job-queue.js';
import type { JobHandler } from '../jobs/job-runner.js';
import type { WorkerPool } from '../jobs/worker-pool.js';
import { isEstimationInputError, type FitOptions, type NetputDataset } from '../estimation/index.js';
import { buildDataset, hashOf } from './model-data.js';

export const FIT_JOB = 'fit';

export function fitOptionsOf(def: ModelDefinition): FitOptions {
  return { form: def.form, numeraire: def.numeraire, trend: def.trend, curvature: def.curvature };
}

export async function createModel(db: Db, name: string, definition: ModelDefinition, actorUserId: number) {
  return db.transaction(async (tx) => {
    const [row] = await tx.insert(models).values({ name, definition, createdBy: actorUserId }).returning();
    await recordAudit(tx, { actorUserId, action: 'model.create', entity: 'model', entityId: row.id, after: { name, definition } });
    return row;
  });
}

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

export async function listModels(db: Db) {
  const rows = await db.select().from(models).orderBy(desc(models.createdAt));
  const runs = rows.length ? await db.select(runSummaryColumns).from(modelRuns).where(inArray(modelRuns.modelId, rows.map((r) => r.id))).orderBy(desc(modelRuns.id)) : [];
  return rows.map((m) => ({ ...m, runs: runs.filter((r) => r.modelId === m.id) }));
}

export async function getModel(db: Db, id: number) {
  const [row] = await db.select().from(models).where(eq(models.id, id));
  if (!row) throw AppError.notFound('The model');
  const runs = await db.select(runSummaryColumns).from(modelRuns).where(eq(modelRuns.modelId, id)).orderBy(desc(modelRuns.id));
  return { ...row, runs };
}

async function insertRun(
  db: Db,
  modelId: number,
  definition: ModelDefinition,
  dataset: NetputDataset,
  excluded: unknown[],
  actorUserId: number,
  rerunOf: number | null,
) {
  return db.transaction(async (tx) => {
    const [run] = await tx
      .insert(modelRuns)
      .values({
        modelId,
        definition,
        dataset,
        excluded,
        dataHash: hashOf(dataset),
        optionsHash: hashOf(definition),
        softwareVersion: VERSION,
        rerunOf,
        createdBy: actorUserId,
      })
      .returning(runSummaryColumns);
    await enqueueJob(tx, FIT_JOB, run.id);
    await recordAudit(tx, { actorUserId, action: rerunOf ? 'model-run.rerun' : 'model-run.start', entity: 'model-run', entityId: run.id, after: { modelId, rerunOf } });
    return run;
  });
}

/** Snapshots the data desk for the model's definition and queues the fit. */
export async function startRun(db: Db, modelId: number, actorUserId: number) {
  const model = await getModel(db, modelId);
  // Read through the schema: a definition stored before a choice existed gets today's default.
  const definition = modelDefinitionSchema.parse(model.definition);
  const { dataset, excluded } = await buildDataset(db, definition);
  return insertRun(db, modelId, definition, dataset, excluded, actorUserId, null);
}

/** Runs a stored run again on its own snapshot and definition: the numbers come out identical. */
export async function rerun(db: Db, runId: number, actorUserId: number) {
  const [old] = await db.select().from(modelRuns).where(eq(modelRuns.id, runId));
  if (!old) throw AppError.notFound('The model run');
  return insertRun(db, old.modelId, old.definition as ModelDefinition, old.dataset as NetputDataset, old.excluded as unknown[], actorUserId, runId);
}

export async function getRun(db: Db, id: number, withDataset = false) {
  const [row] = await db.select().from(modelRuns).where(eq(modelRuns.id, id));
  if (!row) throw AppError.notFound('The model run');
  const { dataset, ...rest } = row;
  return withDataset ? row : { ...rest, observations: (dataset as NetputDataset).seasons.length };
}

export async function getRunStatus(db: Db, id: number) {
  const [row] = await db.select(runSummaryColumns).from(modelRuns).where(eq(modelRuns.id, id));
  if (!row) throw AppError.notFound('The model run');
  return row;
}

export async function cancelRun(db: Db, id: number, actorUserId: number) {
  const run = await getRunStatus(db, id);
  if (run.status !== 'queued' && run.status !== 'running') throw AppError.conflict(`The run has already ${run.status}`);
  const wasQueued = await requestCancel(db, FIT_JOB, id);
  if (wasQueued) await db.update(modelRuns).set({ status: 'cancelled', stage: 'Cancelled before it started', finishedAt: new Date() }).where(eq(modelRuns.id, id));
  await recordAudit(db, { actorUserId, action: 'model-run.cancel', entity: 'model-run', entityId: id });
  return getRunStatus(db, id);
}

/** The job handler: runs the fit in the worker pool and stores the result unchanged. */
export function fitJobHandler(db: Db, pool: WorkerPool): JobHandler {
  return async (job, { signal }) => {
    const runId = job.refId!;
    const [run] = await db.select().from(modelRuns).where(eq(modelRuns.id, runId));
    if (!run || run.status === 'cancelled' || run.status === 'succeeded') return;
    await db.update(modelRuns).set({ status: 'running', startedAt: new Date(), progress: 0, stage: 'Starting' }).where(eq(modelRuns.id, runId));
    let lastWrite = 0;
    const def = run.definition as ModelDefinition;
    try {
      const result = await pool.runFit(
        { dataset: run.dataset as NetputDataset, options: fitOptionsOf(def), spec: specOf(def), backtestSeasons: def.backtestSeasons },
        (share, stage) => {
          const now = Date.now();
          if (now - lastWrite < 300) return;
          lastWrite = now;
          void db
            .update(modelRuns)
            .set({ progress: share, stage })
            .where(and(eq(modelRuns.id, runId), eq(modelRuns.status, 'running')))
            .catch(() => {});
        },
        signal,
      );
      await db
        .update(modelRuns)
        .set({ status: 'succeeded', progress: 1, stage: 'Done', result, finishedAt: new Date() })
        .where(eq(modelRuns.id, runId));
    } catch (err) {
      const cancelled = signal.aborted;
      const message = cancelled
        ? 'Cancelled by the planner'
        : isEstimationInputError(err)
          ? (err as Error).message
          : `The fit failed: ${(err as Error).message}`;
      await db
        .update(modelRuns)
        .set({ status: cancelled ? 'cancelled' : 'failed', stage: cancelled ? 'Cancelled' : 'Failed', error: message, finishedAt: new Date() })
        .where(eq(modelRuns.id, runId));
      if (cancelled) throw err;
    }
  };
}
