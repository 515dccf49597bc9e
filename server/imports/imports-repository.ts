import { promisify } from 'node:util';
import zlib from 'node:zlib';
import { and, asc, desc, eq, inArray, sql } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { contracts, deliveryPoints, farmRecords, farms, farmSeasonFactors, imports, items, priceObservations, seasons, users } from '../db/schema/index.js';
import { getSettings } from '../settings/settings-repository.js';
import { recordHistories } from '../records/records-repository.js';
import { priceHistories } from '../prices/prices-repository.js';
import type { CommitCounts, ContractWrite, FactorWrite, Lookups, OnExisting, PriceWrite, RecordWrite, TableCounts, TableName } from './import-types.js';
import { forEachRow, type RowSource, type WriteSet } from './packed-rows.js';

export type ImportRow = typeof imports.$inferSelect;
export type ImportMeta = Omit<ImportRow, 'content'> & { createdByName: string | null };

/** Rows per INSERT statement during a commit; progress moves once per chunk. */
export const WRITE_CHUNK = 2000;
/** A pause after each chunk of a commit, inside its transaction (crash tests only: IMPORT_CHUNK_DELAY_MS). */
const CHUNK_DELAY_MS = Number(process.env.IMPORT_CHUNK_DELAY_MS ?? 0) || 0;

export async function loadLookups(db: Db): Promise<Lookups> {
  const [itemRows, seasonRows, farmRows, dpRows, settings] = await Promise.all([
    db.select({ id: items.id, code: items.code, name: items.name, unit: items.unit, role: items.role }).from(items).orderBy(asc(items.id)),
    db.select({ id: seasons.id, label: seasons.label, startYear: seasons.startYear, startsOn: seasons.startsOn }).from(seasons).orderBy(asc(seasons.startYear)),
    db.select({ id: farms.id, code: farms.code }).from(farms).orderBy(asc(farms.code)),
    db.select({ id: deliveryPoints.id, name: deliveryPoints.name }).from(deliveryPoints).orderBy(asc(deliveryPoints.name)),
    getSettings(db),
  ]);
  const history = await priceHistories(db);
  const records = await recordHistories(db);
  return {
    items: itemRows,
    seasons: seasonRows,
    farms: farmRows,
    deliveryPoints: dpRows,
    currency: settings.currency,
    decimalMark: settings.decimalMark,
    priceHistory: Object.fromEntries(history),
    recordHistory: records.history,
    land: records.land,
  };
}

const metaColumns = {
  id: imports.id,
  kind: imports.kind,
  fileName: imports.fileName,
  fileSize: imports.fileSize,
  format: imports.format,
  mapping: imports.mapping,
  deliveryPoint: imports.deliveryPoint,
  status: imports.status,
  result: imports.result,
  createdBy: imports.createdBy,
  createdAt: imports.createdAt,
  committedAt: imports.committedAt,
  createdByName: users.name,
};

const gzip = promisify(zlib.gzip);
const gunzip = promisify(zlib.gunzip);

/**
 * Stores an import with the file gzip-compressed (a CSV shrinks five to ten times; zlib runs on
 * libuv's thread pool, off the request thread). The bytes travel as base64 text that PostgreSQL
 * decodes: PGlite's own bytea parameter encoding converts byte by byte in JavaScript, seconds for a
 * few megabytes.
 */
export async function insertImport(db: Db, values: Omit<typeof imports.$inferInsert, 'content'> & { content: Buffer }): Promise<number> {
  const { content, ...rest } = values;
  const packed = await gzip(content, { level: 6 });
  const [row] = await db
    .insert(imports)
    .values({ ...rest, content: sql`decode(${packed.toString('base64')}, 'base64')` as unknown as Buffer })
    .returning({ id: imports.id });
  return row.id;
}

export async function getImportMeta(db: Db, id: number): Promise<ImportMeta | null> {
  const [row] = await db.select(metaColumns).from(imports).leftJoin(users, eq(users.id, imports.createdBy)).where(eq(imports.id, id));
  return row ?? null;
}

export async function getImportContent(db: Db, id: number): Promise<Buffer | null> {
  const [row] = await db.select({ content: sql<string>`encode(${imports.content}, 'base64')` }).from(imports).where(eq(imports.id, id));
  return row ? gunzip(Buffer.from(row.content.replace(/\s+/g, ''), 'base64')) : null;
}

export async function listImportMeta(db: Db, limit: number): Promise<ImportMeta[]> {
  return db.select(metaColumns).from(imports).leftJoin(users, eq(users.id, imports.createdBy)).orderBy(desc(imports.createdAt), desc(imports.id)).limit(limit);
}

export async function updateImport(db: Db, id: number, set: Partial<typeof imports.$inferInsert>) {
  await db.update(imports).set(set).where(eq(imports.id, id));
}

/** Moves a validated (or failed) import to `committing`; false when another request got there first. */
export async function claimForCommit(db: Db, id: number, result: unknown): Promise<boolean> {
  const claimed = await db
    .update(imports)
    .set({ status: 'committing', result })
    .where(and(eq(imports.id, id), inArray(imports.status, ['validated', 'failed'])))
    .returning({ id: imports.id });
  return claimed.length > 0;
}

const uniq = (xs: number[]) => [...new Set(xs)];

/** The distinct values of one field over all rows. */
function distinct<T>(rows: RowSource<T>, field: (r: T) => number): number[] {
  const out = new Set<number>();
  forEachRow(rows, (r) => out.add(field(r)));
  return [...out];
}

/** Natural keys already in the database, for the rows a file would write. */
export async function existingKeys(db: Db, writes: WriteSet): Promise<Record<TableName, Set<string>>> {
  const out: Record<TableName, Set<string>> = { prices: new Set(), records: new Set(), factors: new Set(), contracts: new Set() };
  if (writes.prices.length) {
    const rows = await db
      .select({ i: priceObservations.itemId, s: priceObservations.seasonId, d: priceObservations.deliveryPointId, o: priceObservations.observedOn })
      .from(priceObservations)
      .where(and(inArray(priceObservations.itemId, distinct(writes.prices, (p) => p.itemId)), inArray(priceObservations.seasonId, distinct(writes.prices, (p) => p.seasonId))));
    for (const r of rows) out.prices.add(`${r.i}|${r.s}|${r.d}|${r.o}`);
  }
  if (writes.records.length) {
    const rows = await db
      .select({ f: farmRecords.farmId, s: farmRecords.seasonId, i: farmRecords.itemId })
      .from(farmRecords)
      .where(and(inArray(farmRecords.farmId, distinct(writes.records, (r) => r.farmId)), inArray(farmRecords.seasonId, distinct(writes.records, (r) => r.seasonId))));
    for (const r of rows) out.records.add(`${r.f}|${r.s}|${r.i}`);
  }
  if (writes.factors.length) {
    const rows = await db
      .select({ f: farmSeasonFactors.farmId, s: farmSeasonFactors.seasonId, k: farmSeasonFactors.factor })
      .from(farmSeasonFactors)
      .where(and(inArray(farmSeasonFactors.farmId, distinct(writes.factors, (r) => r.farmId)), inArray(farmSeasonFactors.seasonId, distinct(writes.factors, (r) => r.seasonId))));
    for (const r of rows) out.factors.add(`${r.f}|${r.s}|${r.k}`);
  }
  if (writes.contracts.length) {
    const refs = new Set<string>();
    forEachRow(writes.contracts, (c) => refs.add(c.reference));
    const rows = await db.select({ r: contracts.reference }).from(contracts).where(inArray(contracts.reference, [...refs]));
    for (const r of rows) out.contracts.add(r.r);
  }
  return out;
}

/** The file rows whose price is already stored, unchanged, under the same key (a re-imported export). */
export async function unchangedPriceRows(db: Db, writes: WriteSet): Promise<Set<number>> {
  const out = new Set<number>();
  if (!writes.prices.length) return out;
  const rows = await db
    .select({ i: priceObservations.itemId, s: priceObservations.seasonId, d: priceObservations.deliveryPointId, o: priceObservations.observedOn, p: priceObservations.price })
    .from(priceObservations)
    .where(and(inArray(priceObservations.itemId, distinct(writes.prices, (p) => p.itemId)), inArray(priceObservations.seasonId, distinct(writes.prices, (p) => p.seasonId))));
  const stored = new Map(rows.map((r) => [`${r.i}|${r.s}|${r.d}|${r.o}`, r.p]));
  forEachRow(writes.prices, (w) => {
    if (stored.get(keyOf.prices(w)) === w.price) out.add(w.row);
  });
  return out;
}

export const keyOf = {
  prices: (p: PriceWrite) => `${p.itemId}|${p.seasonId}|${p.deliveryPointId}|${p.observedOn}`,
  records: (r: RecordWrite) => `${r.farmId}|${r.seasonId}|${r.itemId}`,
  factors: (r: FactorWrite) => `${r.farmId}|${r.seasonId}|${r.factor}`,
  contracts: (c: ContractWrite) => c.reference,
};

export function countExisting(writes: WriteSet, keys: Record<TableName, Set<string>>): TableCounts {
  const count = <T>(rows: RowSource<T>, key: (r: T) => string, set: Set<string>) => {
    let n = 0;
    if (set.size) forEachRow(rows, (r) => (n += set.has(key(r)) ? 1 : 0));
    return n;
  };
  return { prices: count(writes.prices, keyOf.prices, keys.prices), records: count(writes.records, keyOf.records, keys.records), factors: count(writes.factors, keyOf.factors, keys.factors), contracts: count(writes.contracts, keyOf.contracts, keys.contracts) };
}

/** A failed chunk, with the file rows it held, so the message can say where. */
export class ChunkWriteError extends Error {
  constructor(
    readonly table: TableName,
    readonly firstRow: number,
    readonly lastRow: number,
    cause: unknown,
  ) {
    super(`writing ${table} from rows ${firstRow}–${lastRow} failed`, { cause });
  }
}

/** An item, season, farm or delivery point the rows name was deleted after the file was checked. */
export class ReferenceGoneError extends Error {
  constructor(readonly what: string) {
    super(`${what} named in the file no longer exists`);
  }
}

/**
 * A PostgreSQL array literal ("{...}") of the values, every text element quoted so that commas,
 * braces and the word NULL stay data (PostgreSQL manual, "Array Value Input"). Numbers are written in
 * JavaScript's shortest round-trip form, which float8 input reads back exactly.
 */
export function arrayLiteral(values: readonly (string | number)[]): string {
  const parts = new Array<string>(values.length);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    parts[i] = typeof v === 'number' ? String(v) : `"${v.replace(/[\\"]/g, '\\$&')}"`;
  }
  return `{${parts.join(',')}}`;
}

const ints = (xs: number[]) => sql`${arrayLiteral(xs)}::text::int[]`;
const floats = (xs: number[]) => sql`${arrayLiteral(xs)}::text::float8[]`;
const texts = (xs: string[]) => sql`${arrayLiteral(xs)}::text::text[]`;
const dates = (xs: string[]) => sql`${arrayLiteral(xs)}::text::date[]`;

/**
 * Locks the rows the writes refer to FOR KEY SHARE — the lock PostgreSQL's own foreign-key check
 * takes — and checks that every one exists. While this transaction runs, none of them can be
 * deleted, so the per-row foreign-key triggers would find exactly what this found.
 */
async function lockReferences(tx: Db, writes: WriteSet) {
  const need: [string, string, number[]][] = [
    ['items', 'An item', uniq([...distinct(writes.prices, (p) => p.itemId), ...distinct(writes.records, (r) => r.itemId), ...distinct(writes.contracts, (c) => c.itemId)])],
    ['seasons', 'A season', uniq([...distinct(writes.prices, (p) => p.seasonId), ...distinct(writes.records, (r) => r.seasonId), ...distinct(writes.factors, (r) => r.seasonId), ...distinct(writes.contracts, (c) => c.seasonId)])],
    ['delivery_points', 'A delivery point', distinct(writes.prices, (p) => p.deliveryPointId)],
    ['farms', 'A farm', uniq([...distinct(writes.records, (r) => r.farmId), ...distinct(writes.factors, (r) => r.farmId), ...distinct(writes.contracts, (c) => c.farmId)])],
  ];
  for (const [table, what, ids] of need) {
    if (!ids.length) continue;
    const res = (await tx.execute(sql`select id from ${sql.identifier(table)} where id = any(${ints(ids)}) for key share`)) as unknown as { rows: unknown[] };
    if (res.rows.length !== ids.length) throw new ReferenceGoneError(what);
  }
}

/**
 * Turns off the per-row foreign-key triggers for the rest of the transaction
 * (`SET LOCAL session_replication_role = replica`, as pg_restore --disable-triggers does); they
 * cost PGlite about 60 µs a row, most of a large commit. Only done after lockReferences has checked
 * and locked every referenced row, and only where the role may set it (PGlite always; PostgreSQL for
 * a superuser); elsewhere the triggers run as usual. Check constraints and unique indexes are not
 * triggers and always apply.
 */
async function skipForeignKeyTriggers(tx: Db): Promise<boolean> {
  try {
    await tx.transaction(async (sp) => {
      await sp.execute(sql`set local session_replication_role = replica`);
    });
    return true;
  } catch {
    return false;
  }
}

/** One CSV field for COPY (PostgreSQL manual, COPY, "CSV Format"): text always quoted, so never NULL. */
function csvField(v: string | number): string {
  return typeof v === 'number' ? String(v) : `"${v.replace(/"/g, '""')}"`;
}

type CopyFn = (statement: string, csv: string) => Promise<void>;

/**
 * PGlite reads COPY FROM '/dev/blob' from a Blob passed with the query; inside a drizzle
 * transaction the PGlite transaction is the session's client (drizzle-orm 0.45). About twice as
 * fast as INSERT … SELECT unnest for new rows. Null when the client is not PGlite's.
 */
function pgliteCopy(tx: Db): CopyFn | null {
  const client = (tx as unknown as { session?: { client?: { query?: unknown; exec?: unknown } } }).session?.client;
  if (!client || typeof client.query !== 'function' || typeof client.exec !== 'function') return null;
  const query = client.query as (q: string, params: unknown[], options: { blob: Blob }) => Promise<unknown>;
  return async (statement, csv) => {
    await query.call(client, statement, [], { blob: new Blob([csv]) });
  };
}

const COPY_COLUMNS: Record<TableName, string> = {
  prices: 'price_observations (item_id, season_id, delivery_point_id, price, currency, source, observed_on)',
  records: 'farm_records (farm_id, season_id, item_id, quantity)',
  factors: 'farm_season_factors (farm_id, season_id, factor, value)',
  contracts: 'contracts (reference, farm_id, season_id, item_id, quantity, price_cents, currency, delivery_from, delivery_to, status)',
};

/**
 * Writes the rows inside the caller's transaction, WRITE_CHUNK rows a statement, and reports the rows
 * done after each chunk. Rows whose key is new are inserted (COPY on PGlite; INSERT … SELECT unnest,
 * each column one array, elsewhere); existing keys are updated with INSERT … ON CONFLICT DO UPDATE
 * or left alone (`onExisting`). The counts come from the keys read in the same transaction just
 * before.
 */
export async function writeRows(
  tx: Db,
  writes: WriteSet,
  onExisting: OnExisting,
  onProgress: (done: number) => void,
  dbKind: 'pglite' | 'postgres' = 'postgres',
): Promise<Record<TableName, CommitCounts>> {
  const keys = await existingKeys(tx, writes);
  await lockReferences(tx, writes);
  const fast = await skipForeignKeyTriggers(tx);
  const copy = dbKind === 'pglite' ? pgliteCopy(tx) : null;
  const counts: Record<TableName, CommitCounts> = {
    prices: { inserted: 0, updated: 0, skipped: 0 },
    records: { inserted: 0, updated: 0, skipped: 0 },
    factors: { inserted: 0, updated: 0, skipped: 0 },
    contracts: { inserted: 0, updated: 0, skipped: 0 },
  };
  const update = onExisting === 'update';
  let done = 0;
  const run = async <T extends { row: number }>(
    table: TableName,
    rows: RowSource<T>,
    key: (r: T) => string,
    fields: (r: T) => (string | number)[],
    upsert: (chunk: T[], conflict: 'update' | 'nothing') => Promise<unknown>,
  ) => {
    for (let i = 0; i < rows.length; i += WRITE_CHUNK) {
      const chunk = rows.slice(i, i + WRITE_CHUNK);
      const fresh: T[] = [];
      const existing: T[] = [];
      const known = keys[table];
      for (const r of chunk) {
        if (known.size === 0 || !known.has(key(r))) fresh.push(r);
        else if (update) existing.push(r);
      }
      counts[table].inserted += fresh.length;
      counts[table].updated += existing.length;
      counts[table].skipped += chunk.length - fresh.length - existing.length;
      const attempt = async (part: T[], write: () => Promise<unknown>) => {
        if (!part.length) return;
        try {
          await write();
        } catch (err) {
          let first = Infinity;
          let last = -Infinity;
          for (const r of part) {
            first = Math.min(first, r.row);
            last = Math.max(last, r.row);
          }
          throw new ChunkWriteError(table, first, last, err);
        }
      };
      await attempt(fresh, () =>
        copy
          ? copy(`copy ${COPY_COLUMNS[table]} from '/dev/blob' with (format csv)`, `${fresh.map((r) => fields(r).map(csvField).join(',')).join('\n')}\n`)
          : upsert(fresh, update ? 'update' : 'nothing'),
      );
      await attempt(existing, () => upsert(existing, 'update'));
      done += chunk.length;
      onProgress(done);
      // PGlite runs in this process and its promises settle as microtasks: without a macrotask
      // between chunks a 200,000-row commit would hold every request (issue 15 item 10). The
      // transaction stays one: the pause is inside it.
      await new Promise((r) => setImmediate(r));
      if (CHUNK_DELAY_MS) await new Promise((r) => setTimeout(r, CHUNK_DELAY_MS));
    }
  };
  const onConflict = (conflict: 'update' | 'nothing', set: ReturnType<typeof sql>) => (conflict === 'update' ? sql`do update set ${set}` : sql`do nothing`);
  await run(
    'prices',
    writes.prices,
    keyOf.prices,
    (p) => [p.itemId, p.seasonId, p.deliveryPointId, p.price, p.currency, p.source, p.observedOn],
    (c, conflict) =>
      tx.execute(sql`
        insert into ${priceObservations} (item_id, season_id, delivery_point_id, price, currency, source, observed_on)
        select * from unnest(${ints(c.map((p) => p.itemId))}, ${ints(c.map((p) => p.seasonId))}, ${ints(c.map((p) => p.deliveryPointId))},
          ${floats(c.map((p) => p.price))}, ${texts(c.map((p) => p.currency))}, ${texts(c.map((p) => p.source))}, ${dates(c.map((p) => p.observedOn))})
        on conflict (item_id, season_id, delivery_point_id, observed_on)
        ${onConflict(conflict, sql`price = excluded.price, currency = excluded.currency, source = excluded.source, version = ${priceObservations}.version + 1`)}`),
  );
  await run(
    'records',
    writes.records,
    keyOf.records,
    (r) => [r.farmId, r.seasonId, r.itemId, r.quantity],
    (c, conflict) =>
      tx.execute(sql`
        insert into ${farmRecords} (farm_id, season_id, item_id, quantity)
        select * from unnest(${ints(c.map((r) => r.farmId))}, ${ints(c.map((r) => r.seasonId))}, ${ints(c.map((r) => r.itemId))}, ${floats(c.map((r) => r.quantity))})
        on conflict (farm_id, season_id, item_id) ${onConflict(conflict, sql`quantity = excluded.quantity, version = ${farmRecords}.version + 1`)}`),
  );
  await run(
    'factors',
    writes.factors,
    keyOf.factors,
    (r) => [r.farmId, r.seasonId, r.factor, r.value],
    (c, conflict) =>
      tx.execute(sql`
        insert into ${farmSeasonFactors} (farm_id, season_id, factor, value)
        select * from unnest(${ints(c.map((r) => r.farmId))}, ${ints(c.map((r) => r.seasonId))}, ${texts(c.map((r) => r.factor))}, ${floats(c.map((r) => r.value))})
        on conflict (farm_id, season_id, factor) ${onConflict(conflict, sql`value = excluded.value`)}`),
  );
  await run(
    'contracts',
    writes.contracts,
    keyOf.contracts,
    (c) => [c.reference, c.farmId, c.seasonId, c.itemId, c.quantity, c.priceCents, c.currency, c.deliveryFrom, c.deliveryTo, c.status],
    (c, conflict) =>
      tx.execute(sql`
        insert into ${contracts} (reference, farm_id, season_id, item_id, quantity, price_cents, currency, delivery_from, delivery_to, status)
        select * from unnest(${texts(c.map((r) => r.reference))}, ${ints(c.map((r) => r.farmId))}, ${ints(c.map((r) => r.seasonId))}, ${ints(c.map((r) => r.itemId))},
          ${floats(c.map((r) => r.quantity))}, ${ints(c.map((r) => r.priceCents))}, ${texts(c.map((r) => r.currency))}, ${texts(c.map((r) => r.deliveryFrom))},
          ${texts(c.map((r) => r.deliveryTo))}, ${texts(c.map((r) => r.status))})
        on conflict (reference) ${onConflict(
          conflict,
          sql`farm_id = excluded.farm_id, season_id = excluded.season_id, item_id = excluded.item_id, quantity = excluded.quantity, price_cents = excluded.price_cents,
            currency = excluded.currency, delivery_from = excluded.delivery_from, delivery_to = excluded.delivery_to, status = excluded.status,
            version = ${contracts}.version + 1, updated_at = now()`,
        )}`),
  );
  if (fast) await tx.execute(sql`set local session_replication_role = origin`);
  return counts;
}
