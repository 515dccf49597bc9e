/**
 * Staging, validating and committing imports. A file is read and checked in a worker thread, stored
 * with its outcome, and committed in the background in ONE transaction (all rows or none), written in
 * chunks with the progress kept in memory; the final status goes to the database.
 */
import { createHash, randomUUID } from 'node:crypto';
import { sql } from 'drizzle-orm';
import type pg from 'pg';
import { AppError } from '../core/app-error.js';
import type { AppContext } from '../context.js';
import type { Db } from '../db/client.js';
import type { DecimalMark } from '../../shared/cell-parsers.js';
import { recordAudit } from '../audit/audit-repository.js';
import type {
  CommitCounts,
  ImportKind,
  ImportResult,
  ImportSummary,
  ImportView,
  Lookups,
  OnExisting,
  TableCounts,
  TableName,
  ValidationOptions,
} from './import-types.js';
import { IMPORT_LIMITS } from './import-limits.js';
import {
  ChunkWriteError,
  claimForCommit,
  countExisting,
  existingKeys,
  getImportContent,
  getImportMeta,
  insertImport,
  listImportMeta,
  loadLookups,
  ReferenceGoneError,
  unchangedPriceRows,
  updateImport,
  writeRows,
  type ImportMeta,
} from './imports-repository.js';
import { validateInWorker, type CheckedFile } from './validation-pool.js';
import type { WriteSet } from './packed-rows.js';

/** This server process; a commit started by another process on PGlite (one process only) died with it. */
const PROCESS_ID = randomUUID();

/** First key of the advisory lock a commit holds on a PostgreSQL server (the second is the import id). */
const COMMIT_LOCK = 0x4e50_494d; // "NPIM"

interface CommitLock {
  release(): Promise<void>;
}

/**
 * PostgreSQL server only: takes the import's advisory lock on a connection of its own, held from
 * the claim until the commit has ended. A lock dies with its connection, so when the server
 * holding it stops, the lock is free at once. Null when another instance holds it.
 */
async function takeCommitLock(ctx: AppContext, id: number): Promise<CommitLock | null> {
  const pool = (ctx.db as unknown as { $client: pg.Pool }).$client;
  const client = await pool.connect();
  try {
    const { rows } = await client.query<{ ok: boolean }>('select pg_try_advisory_lock($1, $2) as ok', [COMMIT_LOCK, id]);
    if (!rows[0]!.ok) {
      client.release();
      return null;
    }
  } catch (err) {
    client.release(err as Error);
    throw err;
  }
  return {
    async release() {
      try {
        await client.query('select pg_advisory_unlock($1, $2)', [COMMIT_LOCK, id]);
        client.release();
      } catch (err) {
        // A broken connection is dropped, and its lock with it.
        client.release(err as Error);
      }
    },
  };
}

/**
 * True when a `committing` import is not being committed by anyone: the server that started it
 * stopped, and the database rolled its transaction back. On PGlite only one process opens the
 * data, so a commit started by an earlier process is dead. On a PostgreSQL server the committing
 * instance holds the import's advisory lock (takeCommitLock) from before its claim to after its
 * end; when the lock is free, nobody is committing it.
 */
async function commitIsDead(ctx: AppContext, jobs: ImportJobs, meta: ImportMeta): Promise<boolean> {
  if (meta.status !== 'committing' || jobs.get(meta.id)) return false;
  const result = meta.result as ImportResult;
  if (ctx.dbKind === 'pglite') return result.commitProcess !== PROCESS_ID;
  return ctx.db.transaction(async (tx) => {
    const r = (await tx.execute(sql`select pg_try_advisory_xact_lock(${COMMIT_LOCK}, ${meta.id}) as free`)) as unknown as { rows: { free: boolean }[] };
    return r.rows[0]!.free;
  });
}

/** Records a dead commit as failed (nothing was written) and answers the import as it now is. */
async function settleDeadCommit(ctx: AppContext, meta: ImportMeta): Promise<ImportMeta> {
  const failed: ImportResult = { ...(meta.result as ImportResult), failure: 'The server stopped during the commit; nothing was written. Commit again.' };
  await updateImport(ctx.db, meta.id, { status: 'failed', result: failed });
  return { ...meta, status: 'failed', result: failed };
}

const TABLE_LABEL: Record<TableName, string> = { prices: 'prices', records: 'farm records', factors: 'farm factors (land)', contracts: 'delivery contracts' };

/** Checked rows are kept this long for the commit, so it need not read the file again. */
const WRITES_TTL_MS = 30 * 60_000;
const WRITES_KEPT = 3;

interface RunningCommit {
  view: ImportView;
  promise: Promise<void>;
}

const allJobs = new Set<WeakRef<ImportJobs>>();

/** Resolves once no import commit runs in this process: call it before closing the database at shutdown. */
export async function importCommitsIdle(): Promise<void> {
  for (const ref of allJobs) {
    const jobs = ref.deref();
    if (jobs) await jobs.idle();
    else allJobs.delete(ref);
  }
}

/**
 * Per app (and test): the commits running in this process, and the rows of the last few checked
 * files, kept for their commit while the reference data and the mapping stay as they were.
 */
export class ImportJobs {
  private readonly running = new Map<number, RunningCommit>();
  private readonly checked = new Map<number, { key: string; writes: WriteSet; at: number }>();

  constructor() {
    allJobs.add(new WeakRef(this));
  }

  remember(id: number, key: string, writes: WriteSet) {
    this.checked.delete(id);
    this.checked.set(id, { key, writes, at: Date.now() });
    while (this.checked.size > WRITES_KEPT) this.checked.delete(this.checked.keys().next().value!);
  }

  /** The rows checked for this import under the same key, or null (then the file is read again). */
  recall(id: number, key: string): WriteSet | null {
    const hit = this.checked.get(id);
    this.checked.delete(id);
    return hit && hit.key === key && Date.now() - hit.at < WRITES_TTL_MS ? hit.writes : null;
  }

  get(id: number): RunningCommit | undefined {
    return this.running.get(id);
  }

  start(id: number, view: ImportView, run: (view: ImportView) => Promise<void>) {
    const job: RunningCommit = { view, promise: Promise.resolve() };
    this.running.set(id, job);
    job.promise = run(view).finally(() => this.running.delete(id));
  }

  /** Resolves once no commit is running (tests; a graceful shutdown). */
  async idle(): Promise<void> {
    while (this.running.size) await Promise.allSettled([...this.running.values()].map((j) => j.promise));
  }
}

const sum = (c: TableCounts) => c.prices + c.records + c.factors + c.contracts;
const tableCounts = (w: WriteSet): TableCounts => ({ prices: w.prices.length, records: w.records.length, factors: w.factors.length, contracts: w.contracts.length });

function toResult(outcome: CheckedFile, existing: TableCounts, deliveryPoint: string | null): ImportResult {
  const { writes, ...rest } = outcome;
  return {
    ...rest,
    errorsNotShown: outcome.errorCount - outcome.errors.length,
    toWrite: tableCounts(writes),
    existing,
    existingRows: sum(existing),
    deliveryPoint,
    onExisting: null,
    counts: null,
    countsByTable: null,
    failure: null,
    commitStartedAt: null,
  };
}

/** What the checked rows depend on besides the file: the reference data, the kind, the mapping and the delivery point. */
function writesKey(lookups: Lookups, kind: ImportKind, mapping: Record<string, string>, deliveryPoint: string | null, decimalMark: DecimalMark): string {
  // Sorted: jsonb does not keep the key order of the mapping it stores.
  const fields = Object.entries(mapping).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return createHash('sha256').update(JSON.stringify([lookups, kind, fields, deliveryPoint, decimalMark])).digest('hex');
}

/** Reads and checks the bytes (worker thread), then counts the rows already in the database. */
async function evaluate(db: Db, bytes: Uint8Array, options: ValidationOptions) {
  const lookups = await loadLookups(db);
  const outcome = await validateInWorker(bytes, options, lookups, IMPORT_LIMITS);
  if (outcome.warningCount > 0) {
    // A price already stored as it is (an export uploaded again) was confirmed when it was stored.
    const unchanged = await unchangedPriceRows(db, outcome.writes);
    const kept = outcome.warnings.filter((w) => w.row === null || !unchanged.has(w.row));
    outcome.warningCount -= outcome.warnings.length - kept.length;
    outcome.warnings = kept;
  }
  const existing = countExisting(outcome.writes, await existingKeys(db, outcome.writes));
  const key = writesKey(lookups, options.kind, outcome.mapping, options.deliveryPoint ?? null, outcome.decimalMark);
  return { outcome, key, result: toResult(outcome, existing, options.deliveryPoint ?? null) };
}

function viewOf(meta: ImportMeta, result: ImportResult, progress?: { done: number; total: number }): ImportView {
  const total = sum(result.toWrite);
  return {
    ...result,
    id: meta.id,
    kind: meta.kind,
    fileName: meta.fileName,
    fileSize: meta.fileSize,
    status: meta.status,
    createdAt: meta.createdAt.toISOString(),
    createdBy: meta.createdByName,
    committedAt: meta.committedAt?.toISOString() ?? null,
    progress: progress ?? { done: meta.status === 'committed' ? total : 0, total },
  };
}

/** A file name fit to store and show: no folders, no control characters, at most 200 characters. */
export function cleanFileName(name: string): string {
  const base = name.split(/[/\\]/).pop() ?? '';
  // eslint-disable-next-line no-control-regex
  const clean = base.replace(/[\u0000-\u001f\u007f]/g, '').trim().slice(0, 200);
  return clean || 'upload';
}

export interface StageInput {
  bytes: Buffer;
  fileName: string;
  kind: ImportKind;
  mapping?: Record<string, string | null>;
  deliveryPoint?: string;
  decimalMark?: DecimalMark;
}

/** Checks an uploaded file and stores it with its preview; an unreadable file is refused and not stored. */
export async function stageImport(ctx: AppContext, jobs: ImportJobs, input: StageInput, userId: number): Promise<ImportView> {
  const fileName = cleanFileName(input.fileName);
  const { outcome, key, result } = await evaluate(ctx.db, input.bytes, { kind: input.kind, fileName, mapping: input.mapping, deliveryPoint: input.deliveryPoint, decimalMark: input.decimalMark });
  const id = await insertImport(ctx.db, {
    kind: input.kind,
    fileName,
    fileSize: input.bytes.length,
    format: outcome.format,
    content: input.bytes,
    mapping: outcome.mapping,
    deliveryPoint: input.deliveryPoint ?? null,
    status: 'validated',
    result,
    createdBy: userId,
  });
  if (outcome.errorCount === 0) jobs.remember(id, key, outcome.writes);
  return viewOf((await getImportMeta(ctx.db, id))!, result);
}

async function metaOrThrow(db: Db, id: number): Promise<ImportMeta> {
  const meta = await getImportMeta(db, id);
  if (!meta) throw AppError.notFound('The import');
  return meta;
}

/** Re-reads the stored file with another mapping or delivery point. */
export async function revalidateImport(
  ctx: AppContext,
  jobs: ImportJobs,
  id: number,
  body: { mapping?: Record<string, string | null>; deliveryPoint?: string | null; decimalMark?: DecimalMark },
): Promise<ImportView> {
  const meta = await metaOrThrow(ctx.db, id);
  if (jobs.get(id) || meta.status === 'committing') throw AppError.conflict('This import is being committed; wait until it has finished');
  if (meta.status === 'committed') throw AppError.conflict('This import has been committed; upload the file again to import it anew');
  const bytes = (await getImportContent(ctx.db, id))!;
  const deliveryPoint = body.deliveryPoint === undefined ? (meta.deliveryPoint ?? undefined) : (body.deliveryPoint ?? undefined);
  const mapping = body.mapping ?? meta.mapping;
  // The decimal mark chosen for this file stays with it (the last validation's), unless chosen anew.
  const decimalMark = body.decimalMark ?? (meta.result as ImportResult).decimalMark;
  const { outcome, key, result } = await evaluate(ctx.db, bytes, { kind: meta.kind, fileName: meta.fileName, mapping, deliveryPoint, decimalMark });
  await updateImport(ctx.db, id, { mapping: outcome.mapping, deliveryPoint: deliveryPoint ?? null, status: 'validated', result });
  if (outcome.errorCount === 0) jobs.remember(id, key, outcome.writes);
  return viewOf({ ...meta, status: 'validated', deliveryPoint: deliveryPoint ?? null }, result);
}

/** The message stored for a failed commit: what the database said, without SQL or parameters. */
function failureMessage(err: unknown): string {
  if (err instanceof ChunkWriteError) {
    return `The database refused the ${TABLE_LABEL[err.table]} from file rows ${err.firstRow}–${err.lastRow}: ${databaseMessage(err.cause)}. Nothing was written.`;
  }
  if (err instanceof ReferenceGoneError) return `${err.what} named in the file was deleted after the check; validate the file again. Nothing was written.`;
  if (err instanceof AppError) return `${err.message}. Nothing was written.`;
  return `The commit failed: ${databaseMessage(err)}. Nothing was written.`;
}

/** The database's own words (an error with a SQLSTATE code, somewhere in the cause chain); else a plain note. */
function databaseMessage(err: unknown): string {
  for (let e = err as { message?: string; cause?: unknown; code?: unknown } | undefined, depth = 0; e && depth < 5; e = e.cause as typeof e, depth++) {
    if (typeof e.code === 'string' && /^[0-9A-Z]{5}$/.test(e.code) && e.message) return e.message.slice(0, 300);
  }
  return 'an unexpected error on the server (it has been logged)';
}

/** Starts the commit in the background and answers at once; GET /api/imports/:id follows it. */
export async function startCommit(
  ctx: AppContext,
  jobs: ImportJobs,
  id: number,
  onExisting: OnExisting,
  userId: number,
  log: (err: unknown) => void,
  acceptWarnings = false,
): Promise<ImportView> {
  let meta = await metaOrThrow(ctx.db, id);
  if (await commitIsDead(ctx, jobs, meta)) meta = await settleDeadCommit(ctx, meta);
  const result = meta.result as ImportResult;
  if (jobs.get(id) || meta.status === 'committing') throw AppError.conflict('This import is already being committed');
  if (meta.status === 'committed') throw AppError.conflict(`This import was committed on ${meta.committedAt?.toISOString().slice(0, 10)}; upload the file again to import it anew`);
  if (result.errorCount > 0) {
    throw AppError.conflict(`The file has ${result.errorCount.toLocaleString('en-GB')} error(s); fix them (or the column mapping) and validate again before committing`);
  }
  if (result.warningCount > 0 && !acceptWarnings) {
    throw new AppError(
      409,
      'needs_confirmation',
      `The file has ${result.warningCount.toLocaleString('en-GB')} warning(s) (values far from their history); check them and accept them to commit`,
    );
  }
  const started: ImportResult = { ...result, onExisting, failure: null, commitStartedAt: new Date().toISOString(), commitProcess: PROCESS_ID };
  const lock = ctx.dbKind === 'postgres' ? await takeCommitLock(ctx, id) : null;
  if (ctx.dbKind === 'postgres' && !lock) throw AppError.conflict('This import is already being committed');
  if (!(await claimForCommit(ctx.db, id, started))) {
    await lock?.release();
    throw AppError.conflict('This import is already being committed');
  }
  const view = viewOf({ ...meta, status: 'committing' }, started, { done: 0, total: sum(result.toWrite) });
  jobs.start(id, view, (v) => runCommit(ctx, jobs, meta, v, onExisting, userId, log).finally(() => lock?.release()));
  return view;
}

async function runCommit(ctx: AppContext, jobs: ImportJobs, meta: ImportMeta, view: ImportView, onExisting: OnExisting, userId: number, log: (err: unknown) => void) {
  // `failure: null`: this attempt starts clean; the note of an earlier attempt that stopped (a crash) is not carried into it.
  let result: ImportResult = { ...(meta.result as ImportResult), onExisting, commitStartedAt: view.commitStartedAt, failure: null };
  try {
    // The rows checked for the preview serve if the reference data is unchanged; otherwise the file is
    // read and checked again against the database as it is now.
    const lookups = await loadLookups(ctx.db);
    const decimalMark = (meta.result as ImportResult).decimalMark;
    let writes = jobs.recall(meta.id, writesKey(lookups, meta.kind, meta.mapping, meta.deliveryPoint, decimalMark));
    if (!writes) {
      const bytes = (await getImportContent(ctx.db, meta.id))!;
      const options: ValidationOptions = { kind: meta.kind, fileName: meta.fileName, mapping: meta.mapping, deliveryPoint: meta.deliveryPoint ?? undefined, decimalMark };
      const outcome = await validateInWorker(bytes, options, lookups, IMPORT_LIMITS);
      if (outcome.errorCount > 0) {
        result = { ...toResult(outcome, result.existing, meta.deliveryPoint), onExisting, commitStartedAt: result.commitStartedAt };
        throw AppError.conflict(`The file no longer passes the checks (${outcome.errorCount} error(s)): reference data changed since the preview`);
      }
      writes = outcome.writes;
    }
    const rows = writes;
    const total = sum(tableCounts(rows));
    view.progress = { done: 0, total };
    await ctx.db.transaction(async (tx) => {
      const byTable = await writeRows(tx, rows, onExisting, (done) => (view.progress = { done, total }), ctx.dbKind);
      const counts: CommitCounts = { inserted: 0, updated: 0, skipped: 0 };
      for (const c of Object.values(byTable)) {
        counts.inserted += c.inserted;
        counts.updated += c.updated;
        counts.skipped += c.skipped;
      }
      const existing: TableCounts = { prices: byTable.prices.updated + byTable.prices.skipped, records: byTable.records.updated + byTable.records.skipped, factors: byTable.factors.updated + byTable.factors.skipped, contracts: byTable.contracts.updated + byTable.contracts.skipped };
      result = { ...result, existing, existingRows: sum(existing), onExisting, counts, countsByTable: byTable };
      await recordAudit(tx, {
        actorUserId: userId,
        action: 'import.commit',
        entity: 'import',
        entityId: meta.id,
        after: { kind: meta.kind, fileName: meta.fileName, onExisting, counts, byTable },
      });
      // Prices → Change history lists imported prices too: one compact entry per import and table,
      // not one per row (a file may hold 200,000 prices; the file itself is kept with the import).
      const entries: [TableName, string][] = [
        ['prices', 'price'],
        ['records', 'farm-record'],
        ['factors', 'farm-land'],
        ['contracts', 'contract'],
      ];
      for (const [table, entity] of entries) {
        const c = byTable[table];
        if (c.inserted + c.updated === 0) continue;
        await recordAudit(tx, {
          actorUserId: userId,
          action: `${entity}.import`,
          entity,
          entityId: `import ${meta.id}`,
          after: { import: meta.id, fileName: meta.fileName, inserted: c.inserted, updated: c.updated, skipped: c.skipped, onExisting },
        });
      }
      await updateImport(tx, meta.id, { status: 'committed', committedAt: new Date(), result });
    });
    Object.assign(view, result, { status: 'committed', committedAt: new Date().toISOString() });
  } catch (err) {
    if (!(err instanceof ChunkWriteError) && !(err instanceof AppError) && !(err instanceof ReferenceGoneError)) log(err);
    result = { ...result, counts: null, countsByTable: null, failure: failureMessage(err) };
    Object.assign(view, result, { status: 'failed', progress: { done: 0, total: view.progress.total } });
    try {
      await updateImport(ctx.db, meta.id, { status: 'failed', result });
    } catch (err2) {
      log(err2);
    }
  }
}

/** One import, live while its commit runs in this process. */
export async function getImport(ctx: AppContext, jobs: ImportJobs, id: number): Promise<ImportView> {
  const running = jobs.get(id);
  if (running) return { ...running.view, progress: { ...running.view.progress } };
  let meta = await metaOrThrow(ctx.db, id);
  if (await commitIsDead(ctx, jobs, meta)) meta = await settleDeadCommit(ctx, meta);
  return viewOf(meta, meta.result as ImportResult);
}

export async function listImports(ctx: AppContext, jobs: ImportJobs, limit: number): Promise<ImportSummary[]> {
  const rows = await listImportMeta(ctx.db, limit);
  const dead = new Set<number>();
  for (const m of rows) if (await commitIsDead(ctx, jobs, m)) dead.add((await settleDeadCommit(ctx, m)).id);
  return rows.map((m) => {
    const r = m.result as ImportResult;
    const live = jobs.get(m.id)?.view;
    return {
      id: m.id,
      kind: m.kind,
      fileName: m.fileName,
      fileSize: m.fileSize,
      format: m.format,
      status: live?.status ?? (dead.has(m.id) ? 'failed' : m.status),
      createdAt: m.createdAt.toISOString(),
      createdBy: m.createdByName,
      committedAt: m.committedAt?.toISOString() ?? null,
      totalRows: r.totalRows,
      errorCount: r.errorCount,
      counts: live?.counts ?? r.counts,
    };
  });
}
