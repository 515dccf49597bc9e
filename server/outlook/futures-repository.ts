/** Futures quotes, the history the futures-plus-basis expectation reads. */
import { and, asc, eq, inArray, type SQL } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { futuresQuotes, items, seasons } from '../db/schema/index.js';

export type FuturesQuoteInput = Omit<typeof futuresQuotes.$inferInsert, 'id' | 'createdBy'>;

const quoteColumns = {
  id: futuresQuotes.id,
  itemId: futuresQuotes.itemId,
  itemCode: items.code,
  seasonId: futuresQuotes.seasonId,
  season: seasons.label,
  contract: futuresQuotes.contract,
  quote: futuresQuotes.quote,
  currency: futuresQuotes.currency,
  quotedOn: futuresQuotes.quotedOn,
  source: futuresQuotes.source,
};

const withNames = (db: Db) =>
  db
    .select(quoteColumns)
    .from(futuresQuotes)
    .innerJoin(items, eq(items.id, futuresQuotes.itemId))
    .innerJoin(seasons, eq(seasons.id, futuresQuotes.seasonId));

/** The quotes, by item, season and quote date; `itemId`/`seasonId` narrow them. */
export async function listQuotes(db: Db, filter: { itemId?: number; seasonId?: number } = {}) {
  const parts: SQL[] = [];
  if (filter.itemId) parts.push(eq(futuresQuotes.itemId, filter.itemId));
  if (filter.seasonId) parts.push(eq(futuresQuotes.seasonId, filter.seasonId));
  return withNames(db)
    .where(parts.length ? and(...parts) : undefined)
    .orderBy(asc(items.id), asc(seasons.startYear), asc(futuresQuotes.quotedOn));
}

export async function findQuote(db: Db, id: number) {
  const [row] = await withNames(db).where(eq(futuresQuotes.id, id));
  return row;
}

export async function insertQuote(db: Db, quote: FuturesQuoteInput, createdBy: number): Promise<number> {
  const [created] = await db.insert(futuresQuotes).values({ ...quote, createdBy }).returning({ id: futuresQuotes.id });
  return created!.id;
}

export async function updateQuote(db: Db, id: number, quote: FuturesQuoteInput): Promise<void> {
  await db.update(futuresQuotes).set(quote).where(eq(futuresQuotes.id, id));
}

export async function deleteQuote(db: Db, id: number): Promise<void> {
  await db.delete(futuresQuotes).where(eq(futuresQuotes.id, id));
}

/** The quotes of these items (none asked: none read), by quote date. */
export async function quotesOfItems(db: Db, itemIds: number[]) {
  if (!itemIds.length) return [];
  return db
    .select({ itemId: futuresQuotes.itemId, seasonId: futuresQuotes.seasonId, contract: futuresQuotes.contract, quote: futuresQuotes.quote, quotedOn: futuresQuotes.quotedOn, id: futuresQuotes.id })
    .from(futuresQuotes)
    .where(inArray(futuresQuotes.itemId, itemIds))
    .orderBy(asc(futuresQuotes.quotedOn), asc(futuresQuotes.id));
}

/** Whether the item and the season a quote names exist. */
export async function refsExist(db: Db, itemId: number, seasonId: number) {
  const [it] = await db.select({ id: items.id }).from(items).where(eq(items.id, itemId));
  const [s] = await db.select({ id: seasons.id }).from(seasons).where(eq(seasons.id, seasonId));
  return { item: Boolean(it), season: Boolean(s) };
}
