/**
 * Price writes from the grid, the add dialog and pasted blocks. Every write is checked against the
 * item's own history (shared/plausibility.ts) and refused with 422 `needs_confirmation` unless the
 * request confirms it, so a script cannot store a slip silently either; an edit names the version it
 * started from, and a stale one is refused with 409 `stale` and the stored row.
 */
import { eq, inArray } from 'drizzle-orm';
import type { PriceRow } from '../../shared/api-types.js';
import type { PriceInput } from '../../shared/data-schemas.js';
import { historyAt, implausiblePrice } from '../../shared/plausibility.js';
import { AppError } from '../core/app-error.js';
import type { Db } from '../db/client.js';
import { items, priceObservations, seasons } from '../db/schema/index.js';
import { recordAudit } from '../audit/audit-repository.js';
import { getPrice, listPrices } from './prices-repository.js';
import { priceHistories } from './price-history.js';

/** The rows' prices that are far from their item's history, as `{ path, message }` (path `<prefix>.<i>.price`). */
export async function implausibleRows(db: Db, rows: readonly PriceInput[], pathOf: (i: number) => string) {
  const itemIds = [...new Set(rows.map((r) => r.itemId))];
  const seasonIds = [...new Set(rows.map((r) => r.seasonId))];
  const [itemRows, seasonRows, histories] = await Promise.all([
    db.select({ id: items.id, name: items.name, unit: items.unit }).from(items).where(inArray(items.id, itemIds)),
    db.select({ id: seasons.id, startYear: seasons.startYear }).from(seasons).where(inArray(seasons.id, seasonIds)),
    priceHistories(db, itemIds),
  ]);
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
    const out = await tx.insert(priceObservations).values(rows).returning({ id: priceObservations.id });
    await recordAudit(tx, { actorUserId, action: 'price.create', entity: 'price', entityId: out.map((o) => o.id).join(','), after: rows });
    return out;
  });
  return listPrices(db, { ids: created.map((c) => c.id) });
}

/**
 * Changes one price if it is still at `version`. The row is locked (FOR UPDATE) before it is read,
 * so the audit's "before" is the value this update replaced even with other servers writing, and
 * the update itself is conditional on the version.
 */
export async function updatePrice(db: Db, id: number, body: PriceInput, version: number, actorUserId: number, confirmed: boolean): Promise<PriceRow> {
  await db.transaction(async (tx) => {
    const locked = await tx.select({ version: priceObservations.version }).from(priceObservations).where(eq(priceObservations.id, id)).for('update');
    if (!locked.length) throw AppError.notFound('The price');
    const before = await getPrice(tx, id);
    if (before.version !== version) {
      throw AppError.stale(`Someone else changed this price meanwhile (now ${before.price} ${before.currency}/${before.unit}, from ${before.source}); keep yours or take theirs`, before);
    }
    const changesPrice = before.price !== body.price || before.itemId !== body.itemId || before.seasonId !== body.seasonId || before.currency !== body.currency;
    if (!confirmed && changesPrice) {
      const doubts = await implausibleRows(tx, [body], () => 'body.price');
      if (doubts.length) throw needsConfirmation(doubts);
    }
    await tx
      .update(priceObservations)
      .set({ ...body, version: version + 1 })
      .where(eq(priceObservations.id, id));
    // Both sides in the same joined shape, so the audit page shows only what changed.
    const after = await getPrice(tx, id);
    await recordAudit(tx, { actorUserId, action: 'price.update', entity: 'price', entityId: id, before, after });
  });
  return getPrice(db, id);
}
