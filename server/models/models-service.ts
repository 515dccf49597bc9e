import { modelDefinitionSchema, specOf, type ModelDefinition } from '../../shared/model-schemas.js';
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import { VERSION } from '../version.js';
import { enqueueJob, requestCancel } from '../jobs/job-queue.js';
import type { JobHandler } from '../jobs/job-runner.js';
import type { WorkerPool } from '../jobs/worker-pool.js';
import { elasticitiesAt, evaluateFit, isEstimationInputError, type FitOptions, type FitResult, type NetputDataset } from '../estimation/index.js';
import { buildDataset, hashOf } from './model-data.js';
import * as repo from './models-repository.js';

export const FIT_JOB = 'fit';

export function fitOptionsOf(def: ModelDefinition): FitOptions {
  return { form: def.form, numeraire: def.numeraire, trend: def.trend, curvature: def.curvature };
}

export async function createModel(db: Db, name: string, definition: ModelDefinition, actorUserId: number) {
  return db.transaction(async (tx) => {
    const row = await repo.insertModel(tx, name, definition, actorUserId);
    await recordAudit(tx, { actorUserId, action: 'model.create', entity: 'model', entityId: row.id, after: { name, definition } });
    return row;
  });
}

export const listModels = repo.listModelsWithRuns;

export async function getModel(db: Db, id: number) {
  const row = await repo.findModel(db, id);
  if (!row) throw AppError.notFound('The model');
  return { ...row, runs: await repo.listRunSummaries(db, id) };
}

export async function deleteModel(db: Db, id: number, actorUserId: number): Promise<void> {
  const before = await getModel(db, id);
  await db.transaction(async (tx) => {
    await repo.deleteModel(tx, id);
    await recordAudit(tx, { actorUserId, action: 'model.delete', entity: 'model', entityId: id, before: { name: before.name, definition: before.definition } });
  });
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
    const run = await repo.insertRun(tx, {
      modelId,
      definition,
      dataset,
      excluded,
      dataHash: hashOf(dataset),
      optionsHash: hashOf(definition),
      softwareVersion: VERSION,
      rerunOf,
      createdBy: actorUserId,
    });
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
  const old = await repo.findRun(db, runId);
  if (!old) throw AppError.notFound('The model run');
  return insertRun(db, old.modelId, old.definition as ModelDefinition, old.dataset as NetputDataset, old.excluded as unknown[], actorUserId, runId);
}

export async function getRun(db: Db, id: number, withDataset = false) {
  const row = await repo.findRun(db, id);
  if (!row) throw AppError.notFound('The model run');
  const { dataset, ...rest } = row;
  return withDataset ? row : { ...rest, observations: (dataset as NetputDataset).seasons.length };
}

/** The run for its result page, with who started it by name (treasurers cannot list users). */
export async function getRunWithAuthor(db: Db, id: number) {
  const run = await getRun(db, id);
  return { ...run, createdByName: await repo.userName(db, run.createdBy) };
}

export async function getRunStatus(db: Db, id: number) {
  const row = await repo.findRunSummary(db, id);
  if (!row) throw AppError.notFound('The model run');
  return row;
}

export async function cancelRun(db: Db, id: number, actorUserId: number) {
  const run = await getRunStatus(db, id);
  if (run.status !== 'queued' && run.status !== 'running') throw AppError.conflict(`The run has already ${run.status}`);
  const wasQueued = await requestCancel(db, FIT_JOB, id);
  if (wasQueued) await repo.updateRun(db, id, { status: 'cancelled', stage: 'Cancelled before it started', finishedAt: new Date() });
  await recordAudit(db, { actorUserId, action: 'model-run.cancel', entity: 'model-run', entityId: id });
  return getRunStatus(db, id);
}

/** A succeeded run's fit; 409 while the run has not succeeded. */
async function succeededFit(db: Db, runId: number): Promise<FitResult> {
  const run = await getRun(db, runId);
  if (run.status !== 'succeeded' || !run.result) throw AppError.conflict(`The run has not succeeded (it is ${run.status})`);
  return (run.result as { fit: FitResult }).fit;
}

/** Netputs, profit and elasticities of a succeeded run at any prices and fixed factors (cheap: no fit). */
export async function evaluateRun(db: Db, runId: number, point: { prices?: Record<string, number>; fixed?: Record<string, number> }) {
  const fit = await succeededFit(db, runId);
  try {
    const ev = evaluateFit(fit, point);
    const el = elasticitiesAt(fit, point);
    return { items: fit.layout.items, point: ev.point, netputs: ev.netputs, profit: ev.profit, convex: ev.convex, elasticities: el.elasticities, standardErrors: el.standardErrors };
  } catch (err) {
    if (isEstimationInputError(err)) throw AppError.unprocessable((err as Error).message);
    throw err;
  }
}

/** The job handler: runs the fit in the worker pool and stores the result unchanged. */
export function fitJobHandler(db: Db, pool: WorkerPool): JobHandler {
  return async (job, { signal }) => {
    const runId = job.refId!;
    const run = await repo.findRun(db, runId);
    if (!run || run.status === 'cancelled' || run.status === 'succeeded') return;
    await repo.updateRun(db, runId, { status: 'running', startedAt: new Date(), progress: 0, stage: 'Starting' });
    let lastWrite = 0;
    const def = run.definition as ModelDefinition;
    try {
      const result = await pool.runFit(
        { dataset: run.dataset as NetputDataset, options: fitOptionsOf(def), spec: specOf(def), backtestSeasons: def.backtestSeasons },
        (share, stage) => {
          const now = Date.now();
          if (now - lastWrite < 300) return;
          lastWrite = now;
          void repo.updateRunProgress(db, runId, share, stage).catch(() => {});
        },
        signal,
      );
      await repo.updateRun(db, runId, { status: 'succeeded', progress: 1, stage: 'Done', result, finishedAt: new Date() });
    } catch (err) {
      const cancelled = signal.aborted;
      const message = cancelled
        ? 'Cancelled by the planner'
        : isEstimationInputError(err)
          ? (err as Error).message
          : `The fit failed: ${(err as Error).message}`;
      await repo.updateRun(db, runId, { status: cancelled ? 'cancelled' : 'failed', stage: cancelled ? 'Cancelled' : 'Failed', error: message, finishedAt: new Date() });
      if (cancelled) throw err;
    }
  };
}
