/**
 * Price writes from the grid, the add dialog and pasted blocks. Every write is checked against the
 * item's own history (shared/plausibility.ts) and refused with 422 `needs_confirmation` unless the
 * request confirms it, so a script cannot store a slip silently either; an edit names the version it
 * started from, and a stale one is refused with 409 `stale` and the stored row.
 */
import type { Response } from 'express';
import type { PriceRow } from '../../shared/api-types.js';
import type { PriceInput } from '../../shared/data-schemas.js';
import { historyAt, implausiblePrice } from '../../shared/plausibility.js';
import type { PriceQuery, PriceSortColumn } from '../../shared/price-query.js';
import { AppError } from '../core/app-error.js';
import type { AppContext } from '../context.js';
import type { Db } from '../db/client.js';
import { recordAudit } from '../audit/audit-repository.js';
import { getSettings } from '../settings/settings-service.js';
import { PRICE_COLUMNS, priceExportChunks, streamSpreadsheet, type ExportFormat } from '../exports/data-exports.js';
import { countPrices, deletePriceRows, filterOf, getPrice, insertPrices, itemsAndSeasons, listPrices, lockPrice, pagePrices, priceHistories, priceIdsInTableOrder, writePrice, type PriceFilter } from './prices-repository.js';
import type { ChangeTracker } from '../db/change-tracker.js';

export { getPrice } from './prices-repository.js';
export { priceSeries } from './prices-repository.js';

/**
 * The order of the price table for one filter and sort, as ids (PGlite only, where this process sees
 * every write): built once from small index reads (priceIdsInTableOrder) and sorted here, then kept
 * until a table it was read from is written. A window at any depth is then a slice of ids and one
 * lookup by primary key, instead of a statement sorting 238,000 rows on the request thread for
 * every block the grid asks for. Ties keep the table's order (the sort is stable).
 */
const ORDER_TABLES = ['price_observations', 'items', 'seasons', 'delivery_points'];
const MAX_ORDERS = 12;
interface Order {
  ids: Int32Array;
  since: number;
}
const orders = new WeakMap<ChangeTracker, Map<string, Order>>();
const building = new WeakMap<ChangeTracker, Map<string, Promise<Int32Array>>>();

function compareKeys(a: number | string, b: number | string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

async function orderedIds(db: Db, tracker: ChangeTracker, f: PriceFilter, sort: PriceSortColumn | undefined, dir: 'asc' | 'desc'): Promise<Int32Array> {
  let mine = orders.get(tracker);
  if (!mine) orders.set(tracker, (mine = new Map()));
  let inFlight = building.get(tracker);
  if (!inFlight) building.set(tracker, (inFlight = new Map()));
  const key = JSON.stringify([f, sort ?? null, sort ? dir : null]);
  const hit = mine.get(key);
  if (hit && tracker.unchangedSince(ORDER_TABLES, hit.since)) {
    mine.delete(key);
    mine.set(key, hit);
    return hit.ids;
  }
  const pending = inFlight.get(key);
  if (pending) return pending;
  const since = tracker.now();
  const build = (async () => {
    const { ids, keys } = await priceIdsInTableOrder(db, f, sort);
    let order: Int32Array;
    if (!sort) {
      order = Int32Array.from(ids);
    } else {
      const sign = dir === 'desc' ? -1 : 1;
      const idx = Array.from(ids, (_, i) => i);
      idx.sort((a, b) => sign * compareKeys(keys[a], keys[b]));
      order = Int32Array.from(idx, (i) => ids[i]);
    }
    if (tracker.unchangedSince(ORDER_TABLES, since)) {
      mine.set(key, { ids: order, since });
      while (mine.size > MAX_ORDERS) mine.delete(mine.keys().next().value!);
    }
    return order;
  })();
  inFlight.set(key, build);
  try {
    return await build;
  } finally {
    inFlight.delete(key);
  }
}

/** One window of the price table, sorted and narrowed on the server, and how many rows match in all. */
export async function pricePage(ctx: Pick<AppContext, 'db' | 'changes'>, q: PriceQuery): Promise<{ rows: PriceRow[]; total: number }> {
  const f = filterOf(q);
  if (!ctx.changes) {
    // A PostgreSQL server runs the statement in its own process: it sorts and cuts the window itself.
    const total = await countPrices(ctx.db, f);
    const rows = q.offset >= total ? [] : await pagePrices(ctx.db, f, { offset: q.offset, limit: q.limit, sort: q.sort, dir: q.dir });
    return { rows, total };
  }
  const ids = await orderedIds(ctx.db, ctx.changes, f, q.sort, q.dir);
  const window = Array.from(ids.subarray(q.offset, q.offset + q.limit));
  if (window.length === 0) return { rows: [], total: ids.length };
  const byId = new Map((await listPrices(ctx.db, { ids: window })).map((r) => [r.id, r]));
  // A row deleted since the order was built is left out of its window (the next read rebuilds the order).
  return { rows: window.flatMap((id) => byId.get(id) ?? []), total: ids.length };
}

/** The whole price table as a download, streamed in chunks (in the import's columns and the co-op's decimal mark). */
export async function exportPrices(db: Db, res: Response, format: ExportFormat): Promise<void> {
  const { decimalMark } = await getSettings(db);
  await streamSpreadsheet(res, format, priceExportChunks(db), PRICE_COLUMNS, 'prices', { decimalMark });
}

/** Deletes the chosen prices, all or none: an id that is gone refuses the lot (404 naming it). */
export async function deletePrices(db: Db, ids: number[], actorUserId: number): Promise<void> {
  await db.transaction(async (tx) => {
    const before = await listPrices(tx, { ids });
    const found = new Set(before.map((r) => r.id));
    const missing = ids.filter((id) => !found.has(id));
    if (missing.length) {
      const list = `${missing.slice(0, 10).join(', ')}${missing.length > 10 ? ', …' : ''}`;
      throw new AppError(404, 'not_found', `${missing.length === 1 ? `Price ${list} was` : `Prices ${list} were`} not found (deleted meanwhile?); nothing was deleted`);
    }
    await deletePriceRows(tx, ids);
    await recordAudit(tx, { actorUserId, action: 'price.delete', entity: 'price', entityId: ids.join(','), before });
  });
}

export async function deletePrice(db: Db, id: number, actorUserId: number): Promise<void> {
  await db.transaction(async (tx) => {
    const before = await getPrice(tx, id);
    await deletePriceRows(tx, [id]);
    await recordAudit(tx, { actorUserId, action: 'price.delete', entity: 'price', entityId: id, before });
  });
}

/** The rows' prices that are far from their item's history, as `{ path, message }` (path `<prefix>.<i>.price`). */
export async function implausibleRows(db: Db, rows: readonly PriceInput[], pathOf: (i: number) => string) {
  const itemIds = [...new Set(rows.map((r) => r.itemId))];
  const seasonIds = [...new Set(rows.map((r) => r.seasonId))];
  const [{ itemRows, seasonRows }, histories] = await Promise.all([itemsAndSeasons(db, itemIds, seasonIds), priceHistories(db, itemIds)]);
  const item = new Map(itemRows.map((i) => [i.id, i]));
  const year = new Map(seasonRows.map((s) => [s.id, s.startYear]));
  const out: { path: string; message: string }[] = [];
  rows.forEach((r, i) => {
    const it = item.get(r.itemId);
    const y = year.get(r.seasonId);
    if (!it || y === undefined) return;
    const doubt = implausiblePrice(r.price, it, r.currency, historyAt(histories.get(r.itemId), y));
    if (doubt) out.push({ path: pathOf(i), message: doubt });
  });
  return out;
}

function needsConfirmation(doubts: { path: string; message: string }[]): AppError {
  const first = doubts[0].message;
  const more = doubts.length > 1 ? ` (and ${doubts.length - 1} more)` : '';
  // The API flag that confirms is `confirmImplausible: true` (screens: "save anyway").
  return AppError.needsConfirmation(`Check before saving: ${first}${more}. Save again to store it as it is`, doubts);
}

/** Inserts a block of prices, all or none. */
export async function createPrices(db: Db, rows: PriceInput[], actorUserId: number, confirmed: boolean): Promise<PriceRow[]> {
  if (!confirmed) {
    const doubts = await implausibleRows(db, rows, (i) => `body.rows.${i}.price`);
    if (doubts.length) throw needsConfirmation(doubts);
  }
  const created = await db.transaction(async (tx) => {
    const ids = await insertPrices(tx, rows);
    await recordAudit(tx, { actorUserId, action: 'price.create', entity: 'price', entityId: ids.join(','), after: rows });
    return ids;
  });
  return listPrices(db, { ids: created });
}

/**
 * Changes one price if it is still at `version`. The row is locked (FOR UPDATE) before it is read,
 * so the audit's "before" is the value this update replaced even with other servers writing, and
 * the update itself is conditional on the version.
 */
export async function updatePrice(db: Db, id: number, body: PriceInput, version: number, actorUserId: number, confirmed: boolean): Promise<PriceRow> {
  await db.transaction(async (tx) => {
    if ((await lockPrice(tx, id)) === null) throw AppError.notFound('The price');
    const before = await getPrice(tx, id);
    if (before.version !== version) {
      throw AppError.stale(`Someone else changed this price meanwhile (now ${before.price} ${before.currency}/${before.unit}, from ${before.source}); keep yours or take theirs`, before);
    }
    const changesPrice = before.price !== body.price || before.itemId !== body.itemId || before.seasonId !== body.seasonId || before.currency !== body.currency;
    if (!confirmed && changesPrice) {
      const doubts = await implausibleRows(tx, [body], () => 'body.price');
      if (doubts.length) throw needsConfirmation(doubts);
    }
    await writePrice(tx, id, body, version + 1);
    // Both sides in the same joined shape, so the audit page shows only what changed.
    const after = await getPrice(tx, id);
    await recordAudit(tx, { actorUserId, action: 'price.update', entity: 'price', entityId: id, before, after });
  });
  return getPrice(db, id);
}
