/**
 * The contracted view of an outlook (issue 19): the season's binding contracts (signed, delivered)
 * evaluated against the outlook's model run at the outlook's base prices — marginal cost of each
 * committed output against its contract price, conditional input demand — by the engine's
 * evaluateContracted (docs/cost-duality.md) in a worker thread, as a database-backed job whose row
 * carries progress and, when done, the view. Uncontracted output stays as the outlook projects it.
 */
import { BINDING_STATUSES, type ContractRow } from '../../shared/contract-schemas.js';
import type { ContractedFarmSpec } from '../../shared/contracted-types.js';
import type { ContractedState, ContractedView, DemandBasisRow, DemandBand, MyContracts } from '../../shared/contracted-view.js';
import type { ProjectionTables } from '../../shared/outlook-types.js';
import { AppError } from '../core/app-error.js';
import type { Reader } from '../core/farm-scope.js';
import type { Db } from '../db/client.js';
import { CONTRACTED_CAUTION } from '../estimation/index.js';
import { enqueueJob } from '../jobs/job-queue.js';
import type { JobHandler } from '../jobs/job-runner.js';
import type { WorkerPool } from '../jobs/worker-pool.js';
import { hashOf } from '../models/model-data.js';
import { draftInputsHash, gatherProjectionInputs } from '../outlook/projection-service.js';
import { getSettings } from '../settings/settings-service.js';
import { findOutlook, findOutlookOfSeason } from '../outlook/outlook-repository.js';
import type { OutlookRow } from '../outlook/outlook-repository.js';
import { allFarmNames, farmNameAndCode, itemsByCode, latestDoneJobOf, latestJobOf, listContracts, pastOutputAndLand, setJobPayload } from './contracts-repository.js';

export const CONTRACTED_JOB = 'outlook-contracted';
/** Draws for the bands (the engine's default); the seed is the outlook's, so a re-run gives the same figures. */
const DRAWS = 2000;

interface JobPayload {
  progress?: number;
  stage?: string;
  view?: ContractedView;
}

async function outlookRow(db: Db, id: number): Promise<OutlookRow> {
  const o = await findOutlook(db, id);
  if (!o) throw AppError.notFound('The outlook');
  return o;
}

/** What the view depends on: the outlook's inputs and every binding contract of its season, as stored. */
async function currentHash(db: Db, o: OutlookRow, contracts?: ContractRow[]) {
  const rows = contracts ?? (await listContracts(db, { seasonIds: [o.seasonId], statuses: BINDING_STATUSES }));
  return hashOf({ outlook: draftInputsHash(o), contracts: rows.map((c) => [c.id, c.version]) });
}

export async function contractedState(db: Db, outlookId: number): Promise<ContractedState> {
  const o = await outlookRow(db, outlookId);
  const job = await latestJobOf(db, CONTRACTED_JOB, outlookId);
  if (!job) return { status: 'none', progress: 0, stage: '', error: null, stale: false, view: null };
  const p = (job.payload ?? {}) as JobPayload;
  // The last finished view stays on screen while a new evaluation runs.
  let view = p.view ?? null;
  if (!view) {
    const done = await latestDoneJobOf(db, CONTRACTED_JOB, outlookId);
    view = (done?.payload as JobPayload | undefined)?.view ?? null;
  }
  const status = job.status === 'done' ? 'succeeded' : job.status === 'failed' || job.status === 'cancelled' ? 'failed' : job.status === 'running' ? 'running' : 'queued';
  return {
    status,
    progress: p.progress ?? (status === 'succeeded' ? 1 : 0),
    stage: p.stage ?? '',
    error: job.error,
    stale: view ? view.inputsHash !== (await currentHash(db, o)) : false,
    view,
  };
}

/** Queues an evaluation (one at a time per outlook). */
export async function startContracted(db: Db, outlookId: number): Promise<ContractedState> {
  const o = await outlookRow(db, outlookId);
  if (!o.modelRunId) throw AppError.conflict('Choose a model run for the outlook first');
  const job = await latestJobOf(db, CONTRACTED_JOB, outlookId);
  if (job && (job.status === 'queued' || job.status === 'running')) return contractedState(db, outlookId);
  const binding = await listContracts(db, { seasonIds: [o.seasonId], statuses: BINDING_STATUSES });
  if (!binding.length) throw AppError.unprocessable('No signed or delivered contract for this season: record contracts first (offers count once signed)');
  await enqueueJob(db, CONTRACTED_JOB, outlookId, { progress: 0, stage: 'Waiting for a worker' } satisfies JobPayload);
  return contractedState(db, outlookId);
}

/** Past output per hectare of each farm, by output code (for the engine's words on unusual commitments). */
async function historyPerHa(db: Db, farmIds: number[], outputIds: Map<number, string>, beforeYear: number) {
  if (!farmIds.length || !outputIds.size) return new Map<number, Record<string, number[]>>();
  const { recs, land } = await pastOutputAndLand(db, farmIds, [...outputIds.keys()]);
  const landOf = new Map(land.map((l) => [`${l.farmId}|${l.seasonId}`, l.value]));
  const out = new Map<number, Record<string, number[]>>();
  for (const r of recs) {
    if (r.startYear >= beforeYear) continue;
    const ha = landOf.get(`${r.farmId}|${r.seasonId}`);
    if (!ha || !(ha > 0)) continue;
    const h = out.get(r.farmId) ?? {};
    (h[outputIds.get(r.itemId)!] ??= []).push(r.quantity / ha);
    out.set(r.farmId, h);
  }
  return out;
}

const band = (q: { point: number; p5: number; p95: number }): DemandBand => ({ point: q.point, p5: q.p5, p95: q.p95 });

/** Co-op demand per input on both bases: the outlook's base projection, and contracting farms held to their contracts. */
function demandBasis(view: Omit<ContractedView, 'demandBasis'>, projection: ProjectionTables | null): ContractedView['demandBasis'] {
  if (!projection) return null;
  const base = (q: Record<string, { point: number; p5: number; p95: number }>) => q['base'] ?? Object.values(q)[0];
  const evaluated = new Map(view.evaluation.farms.filter((f) => f.evaluated).map((f) => [f.farm, f]));
  const rows: DemandBasisRow[] = [];
  for (const it of view.items.filter((i) => i.role === 'input')) {
    const coop = projection.coop.items.find((x) => x.item === it.code);
    if (!coop) continue;
    const contracted = { point: 0, p5: 0, p95: 0 };
    for (const f of projection.farms) {
      const held = evaluated.get(f.code)?.inputs[it.code];
      const q = held ?? base(f.items.find((x) => x.item === it.code)?.scenarios ?? {});
      if (!q) continue;
      contracted.point += q.point;
      contracted.p5 += q.p5;
      contracted.p95 += q.p95;
    }
    rows.push({ item: it.code, name: it.name, unit: it.unit, outlook: band(base(coop.scenarios)), contracted });
  }
  return {
    rows,
    note: 'Contract basis: farms with signed contracts at their committed output (conditional demand, cost-minimising), every other farm as the outlook projects it. Outlook basis: every farm free to choose its output (unconditional demand). Both at the outlook’s base prices; the contract basis band adds the farms’ 5 % and 95 % points, as if all farms came in high or low together.',
  };
}

/** The job: gather, evaluate in a worker thread, store the view on the job row. */
export function contractedJobHandler(db: Db, pool: WorkerPool): JobHandler {
  return async (job, { signal }) => {
    const set = (p: JobPayload) => setJobPayload(db, job.id, p);
    const o = await outlookRow(db, job.refId!);
    await set({ progress: 0.02, stage: 'Gathering contracts, farms and prices' });
    const inputs = await gatherProjectionInputs(db, o);
    if (!inputs.forecast) throw new AppError(422, 'unprocessable', 'The outlook’s model run has no forecasting model: fit the model again to evaluate contracts');
    const all = await listContracts(db, { seasonIds: [o.seasonId] });
    const binding = all.filter((c) => BINDING_STATUSES.includes(c.status));
    const modelItems = new Set(inputs.fit.layout.items.map((i) => i.name));
    const farmCodes = new Map(inputs.farms.map((f) => [f.id, f]));
    const byFarm = new Map<number, ContractRow[]>();
    for (const c of binding) {
      if (!modelItems.has(c.itemCode) || !farmCodes.has(c.farmId)) continue;
      byFarm.set(c.farmId, [...(byFarm.get(c.farmId) ?? []), c]);
    }
    if (!byFarm.size) throw new AppError(422, 'unprocessable', 'No signed contract is for an output of the outlook’s model and a farm the model covers');
    const outputIds = new Map(inputs.itemRows.filter((i) => i.role === 'output').map((i) => [i.id, i.code]));
    const hist = await historyPerHa(db, [...byFarm.keys()], outputIds, inputs.season.startYear);
    const specs: ContractedFarmSpec[] = [...byFarm.entries()].map(([farmId, cs]) => {
      const f = farmCodes.get(farmId)!;
      const contracted: Record<string, number> = {};
      const value: Record<string, number> = {};
      for (const c of cs) {
        contracted[c.itemCode] = (contracted[c.itemCode] ?? 0) + c.quantity;
        value[c.itemCode] = (value[c.itemCode] ?? 0) + c.quantity * c.price;
      }
      // Several contracts of one output: their quantity-weighted mean price.
      const contractPrices = Object.fromEntries(Object.entries(value).map(([k, v]) => [k, v / contracted[k]!]));
      return { farm: f.code, fixed: f.fixed, contracted, contractPrices, history: hist.get(farmId) ?? {} };
    });
    const basePrices = inputs.scenarios.find((s) => s.name === 'base')?.prices ?? inputs.scenarios[0]!.prices;
    await set({ progress: 0.1, stage: `Evaluating ${specs.length} contracting farms, ${DRAWS.toLocaleString('en-GB')} draws` });
    let lastWrite = 0;
    const answer = await pool.runContracted(
      {
        model: inputs.forecast,
        options: { farms: specs, prices: basePrices, season: inputs.season.startYear, draws: DRAWS, seed: o.seed, level: 0.9, units: Object.fromEntries(inputs.itemRows.map((i) => [i.code, i.unit])) },
      },
      (share, stage) => {
        const now = Date.now();
        if (now - lastWrite < 400) return;
        lastWrite = now;
        void set({ progress: 0.1 + 0.85 * share, stage });
      },
      signal,
    );
    if (!answer.ok) throw new AppError(422, 'unprocessable', `The contracts could not be evaluated: ${answer.error.message}`);
    const settings = await getSettings(db);
    const codes = new Set([...byFarm.values()].flat().map((c) => c.farmCode));
    const farmRows = await allFarmNames(db);
    const itemRows = await itemsByCode(db, [...modelItems]);
    const partial: Omit<ContractedView, 'demandBasis'> = {
      outlookId: o.id,
      season: inputs.season.label,
      modelRunId: o.modelRunId!,
      computedAt: new Date().toISOString(),
      inputsHash: await currentHash(db, o, binding),
      currency: settings.currency,
      items: inputs.fit.layout.items.map((li) => {
        const row = itemRows.find((r) => r.code === li.name);
        return { code: li.name, name: row?.name ?? li.name, unit: row?.unit ?? '', role: li.role, category: row?.category ?? 'other' };
      }),
      contracts: binding,
      leftOut: { offered: all.filter((c) => c.status === 'offered').length, cancelled: all.filter((c) => c.status === 'cancelled').length },
      farms: Object.fromEntries(farmRows.filter((f) => codes.has(f.code)).map((f) => [f.code, { farmId: f.id, name: f.name }])),
      evaluation: answer.result,
    };
    const projection = o.projectionStatus === 'succeeded' && o.projectionInputsHash === draftInputsHash(o) ? (o.projection as ProjectionTables) : null;
    await set({ progress: 1, stage: 'Done', view: { ...partial, demandBasis: demandBasis(partial, projection) } });
  };
}

/** A finished evaluation of an outlook: the one given by job id, else the latest; null when there is none. */
export async function finishedView(db: Db, outlookId: number, jobId?: number): Promise<{ jobId: number; view: ContractedView } | null> {
  const done = await latestDoneJobOf(db, CONTRACTED_JOB, outlookId, jobId);
  const view = (done?.payload as JobPayload | undefined)?.view;
  return done && view ? { jobId: done.id, view } : null;
}

/** Whether a view still matches the outlook's inputs and the season's binding contracts. */
export async function viewIsStale(db: Db, view: ContractedView): Promise<boolean> {
  return view.inputsHash !== (await currentHash(db, await outlookRow(db, view.outlookId)));
}

/** The latest finished view for a season (any outlook of it), or null. */
export async function latestViewForSeason(db: Db, seasonId: number): Promise<ContractedView | null> {
  const o = await findOutlookOfSeason(db, seasonId);
  if (!o) return null;
  const done = await latestDoneJobOf(db, CONTRACTED_JOB, o.id);
  return (done?.payload as JobPayload | undefined)?.view ?? null;
}

const NUTRIENT_CATEGORY = 'fertiliser';

/** A member's contracts and their farm's figures (held to the member's own farm in the repository query). */
export async function myContracts(db: Db, reader: Reader, seasonLabel?: string): Promise<MyContracts> {
  const rows = (await listContracts(db, {}, reader)).filter((r) => seasonLabel === undefined || r.season === seasonLabel);
  const farm = reader.farmId ? await farmNameAndCode(db, reader.farmId) : undefined;
  const figures: MyContracts['figures'] = {};
  const nutrients: MyContracts['nutrients'] = [];
  const issues: string[] = [];
  let computedAt: string | null = null;
  for (const seasonId of [...new Set(rows.map((r) => r.seasonId))]) {
    const view = await latestViewForSeason(db, seasonId);
    const mine = farm && view?.evaluation.farms.find((f) => f.farm === farm.code);
    if (!view || !mine) continue;
    computedAt = view.computedAt;
    for (const c of rows.filter((r) => r.seasonId === seasonId && view.contracts.some((v) => v.id === r.id))) {
      const out = mine.outputs[c.itemCode];
      figures[c.id] = out ? { marginalCost: out.marginalCost ? band(out.marginalCost) : null, margin: out.margin ? band(out.margin) : null } : undefined;
    }
    const ferts = view.items.filter((i) => i.role === 'input' && i.category === NUTRIENT_CATEGORY);
    if (mine.evaluated)
      nutrients.push({ season: view.season, items: ferts.filter((i) => mine.inputs[i.code]).map((i) => ({ item: i.code, name: i.name, unit: i.unit, band: band(mine.inputs[i.code]!) })) });
    issues.push(...mine.issues.map((i) => i.text));
  }
  return { farmName: farm?.name ?? null, contracts: rows, figures, nutrients, issues, computedAt, caution: CONTRACTED_CAUTION };
}
