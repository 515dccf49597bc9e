import { and, asc, desc, eq, gt, ilike, inArray, not, or, sql, type AnyColumn, type SQL } from 'drizzle-orm';
import type { PriceRow, PriceSeries } from '../../shared/api-types.js';
import type { PriceInput } from '../../shared/data-schemas.js';
import type { NumberCondition, PriceQuery, PriceSortColumn, TextCondition } from '../../shared/price-query.js';
import type { Db } from '../db/client.js';
import { deliveryPoints, items, priceIndexes, priceIndexValues, priceObservations, seasons } from '../db/schema/index.js';
import { AppError } from '../core/app-error.js';
import { inAny, onlyIn } from '../db/conditions.js';
import type { SeasonPrices } from '../../shared/plausibility.js';

export interface PriceFilter {
  /** Only these rows (an empty list matches none). */
  ids?: number[];
  itemIds?: number[];
  seasonIds?: number[];
  deliveryPointIds?: number[];
  /** Each word is in the item name or code, season label, delivery point name, source, currency or date (any case). */
  search?: string;
  item?: TextCondition;
  season?: TextCondition;
  deliveryPoint?: TextCondition;
  source?: TextCondition;
  currency?: TextCondition;
  price?: NumberCondition;
}

/** `%`, `_` and `\` taken literally in a LIKE pattern. */
const likeText = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

function textCondition(column: SQL | AnyColumn, c: TextCondition): SQL {
  const v = likeText(c.value);
  switch (c.op) {
    case 'contains':
      return ilike(column, `%${v}%`);
    case 'notContains':
      return not(ilike(column, `%${v}%`));
    case 'equals':
      return sql`lower(${column}) = lower(${c.value})`;
    case 'notEqual':
      return sql`lower(${column}) <> lower(${c.value})`;
    case 'startsWith':
      return ilike(column, `${v}%`);
    case 'endsWith':
      return ilike(column, `%${v}`);
  }
}

function numberCondition(column: AnyColumn, c: NumberCondition): SQL {
  switch (c.op) {
    case 'equals':
      return sql`${column} = ${c.value}`;
    case 'notEqual':
      return sql`${column} <> ${c.value}`;
    case 'lessThan':
      return sql`${column} < ${c.value}`;
    case 'lessThanOrEqual':
      return sql`${column} <= ${c.value}`;
    case 'greaterThan':
      return sql`${column} > ${c.value}`;
    case 'greaterThanOrEqual':
      return sql`${column} >= ${c.value}`;
    case 'inRange':
      return sql`${column} between ${Math.min(c.value, c.to ?? c.value)} and ${Math.max(c.value, c.to ?? c.value)}`;
  }
}

const rowColumns = {
  id: priceObservations.id,
  itemId: priceObservations.itemId,
  itemCode: items.code,
  itemName: items.name,
  unit: items.unit,
  seasonId: priceObservations.seasonId,
  season: seasons.label,
  deliveryPointId: priceObservations.deliveryPointId,
  deliveryPoint: deliveryPoints.name,
  price: priceObservations.price,
  currency: priceObservations.currency,
  source: priceObservations.source,
  observedOn: priceObservations.observedOn,
  version: priceObservations.version,
};

function where(f: PriceFilter): SQL | undefined {
  const parts: (SQL | undefined)[] = [
    onlyIn(priceObservations.id, f.ids),
    inAny(priceObservations.itemId, f.itemIds),
    inAny(priceObservations.seasonId, f.seasonIds),
    inAny(priceObservations.deliveryPointId, f.deliveryPointIds),
  ];
  // Every word of the search somewhere in the row (as the grid's own quick filter did).
  for (const word of (f.search ?? '').split(/\s+/).filter(Boolean).slice(0, 12)) {
    const like = `%${likeText(word)}%`;
    parts.push(
      sql`(${ilike(items.name, like)} or ${ilike(items.code, like)} or ${ilike(seasons.label, like)} or ${ilike(deliveryPoints.name, like)} or ${ilike(priceObservations.source, like)} or ${ilike(priceObservations.currency, like)} or ${priceObservations.observedOn}::text like ${like})`,
    );
  }
  if (f.item) parts.push(sql`(${textCondition(items.name, f.item)} ${f.item.op.startsWith('not') ? sql`and` : sql`or`} ${textCondition(items.code, f.item)})`);
  if (f.season) parts.push(textCondition(seasons.label, f.season));
  if (f.deliveryPoint) parts.push(textCondition(deliveryPoints.name, f.deliveryPoint));
  if (f.source) parts.push(textCondition(priceObservations.source, f.source));
  if (f.currency) parts.push(textCondition(priceObservations.currency, f.currency));
  if (f.price) parts.push(numberCondition(priceObservations.price, f.price));
  return and(...parts);
}

/** The table's own order: season (oldest first), item, delivery point, date; the id settles ties so pages never overlap. */
const DEFAULT_ORDER = [asc(seasons.startYear), asc(items.id), asc(deliveryPoints.name), asc(priceObservations.observedOn), asc(priceObservations.id)];

const SORT_KEY: Record<PriceSortColumn, AnyColumn> = {
  itemId: items.name,
  seasonId: seasons.startYear,
  deliveryPointId: deliveryPoints.name,
  price: priceObservations.price,
  currency: priceObservations.currency,
  source: priceObservations.source,
  observedOn: priceObservations.observedOn,
};

const joined = (db: Db) =>
  db
    .select(rowColumns)
    .from(priceObservations)
    .innerJoin(items, eq(items.id, priceObservations.itemId))
    .innerJoin(seasons, eq(seasons.id, priceObservations.seasonId))
    .innerJoin(deliveryPoints, eq(deliveryPoints.id, priceObservations.deliveryPointId));

/** Every price the filter matches, in the table's order: for small sets (ids just written, one item's season). */
export async function listPrices(db: Db, f: PriceFilter = {}): Promise<PriceRow[]> {
  return joined(db).where(where(f)).orderBy(...DEFAULT_ORDER);
}

/** One window of the matching prices, sorted by one column (then the table's order). */
export async function pagePrices(db: Db, f: PriceFilter, page: { offset: number; limit: number; sort?: PriceSortColumn; dir: 'asc' | 'desc' }): Promise<PriceRow[]> {
  const first = page.sort ? [page.dir === 'desc' ? desc(SORT_KEY[page.sort]) : asc(SORT_KEY[page.sort])] : [];
  return joined(db)
    .where(where(f))
    .orderBy(...first, ...DEFAULT_ORDER)
    .limit(page.limit)
    .offset(page.offset);
}

/** How many prices the filter matches (the joins only when a condition reads a joined table). */
export async function countPrices(db: Db, f: PriceFilter): Promise<number> {
  const needsJoins = Boolean(f.search || f.item || f.season || f.deliveryPoint);
  const base = db.select({ n: sql<number>`count(*)::int`.mapWith(Number) }).from(priceObservations);
  const [row] = needsJoins
    ? await base
        .innerJoin(items, eq(items.id, priceObservations.itemId))
        .innerJoin(seasons, eq(seasons.id, priceObservations.seasonId))
        .innerJoin(deliveryPoints, eq(deliveryPoints.id, priceObservations.deliveryPointId))
        .where(where(f))
    : await base.where(where(f));
  return row?.n ?? 0;
}

/**
 * The ids of every price the filter matches, in the table's order, with each one's value of the
 * `key` column when one is named: read one season and item at a time (seasons oldest first, items
 * by id) through the unique index on (item, season, point, date), so no statement reads or sorts
 * more than one item's season (PGlite runs each statement on the request thread).
 */
export async function priceIdsInTableOrder(db: Db, f: PriceFilter, key?: PriceSortColumn): Promise<{ ids: number[]; keys: (number | string)[] }> {
  const seasonRows = await db.select({ id: seasons.id }).from(seasons).orderBy(asc(seasons.startYear), asc(seasons.id));
  const itemRows = await db.select({ id: items.id }).from(items).orderBy(asc(items.id));
  const onlySeasons = f.seasonIds?.length ? new Set(f.seasonIds) : null;
  const onlyItems = f.itemIds?.length ? new Set(f.itemIds) : null;
  const ids: number[] = [];
  const keys: (number | string)[] = [];
  const keyColumn = sql<number | string>`${key ? SORT_KEY[key] : priceObservations.id}`;
  for (const s of seasonRows) {
    if (onlySeasons && !onlySeasons.has(s.id)) continue;
    for (const it of itemRows) {
      if (onlyItems && !onlyItems.has(it.id)) continue;
      const rows = await db
        .select({ id: priceObservations.id, key: keyColumn })
        .from(priceObservations)
        .innerJoin(items, eq(items.id, priceObservations.itemId))
        .innerJoin(seasons, eq(seasons.id, priceObservations.seasonId))
        .innerJoin(deliveryPoints, eq(deliveryPoints.id, priceObservations.deliveryPointId))
        .where(and(eq(priceObservations.itemId, it.id), eq(priceObservations.seasonId, s.id), where(f)))
        .orderBy(asc(deliveryPoints.name), asc(priceObservations.observedOn), asc(priceObservations.id));
      for (const r of rows) {
        ids.push(r.id as number);
        keys.push(r.key);
      }
    }
  }
  return { ids, keys };
}

/** The filter a PriceQuery names. */
export function filterOf(q: PriceQuery): PriceFilter {
  return {
    itemIds: q.items,
    seasonIds: q.seasons,
    deliveryPointIds: q.deliveryPoints,
    search: q.q?.trim() || undefined,
    item: q.item,
    season: q.season,
    deliveryPoint: q.deliveryPoint,
    source: q.source,
    currency: q.currency,
    price: q.price,
  };
}

export async function insertPrices(db: Db, rows: PriceInput[]): Promise<number[]> {
  const out = await db.insert(priceObservations).values(rows).returning({ id: priceObservations.id });
  return out.map((o) => o.id);
}

/** Locks the price row (FOR UPDATE) and answers its version, or null when it is gone. */
export async function lockPrice(db: Db, id: number): Promise<number | null> {
  const [row] = await db.select({ version: priceObservations.version }).from(priceObservations).where(eq(priceObservations.id, id)).for('update');
  return row?.version ?? null;
}

export async function writePrice(db: Db, id: number, body: PriceInput, version: number): Promise<void> {
  await db.update(priceObservations).set({ ...body, version }).where(eq(priceObservations.id, id));
}

export async function deletePriceRows(db: Db, ids: number[]): Promise<void> {
  await db.delete(priceObservations).where(inArray(priceObservations.id, ids));
}

/** Item name and unit, and season start year, of the rows a write names (for the plausibility check). */
export async function itemsAndSeasons(db: Db, itemIds: number[], seasonIds: number[]) {
  const [itemRows, seasonRows] = await Promise.all([
    db.select({ id: items.id, name: items.name, unit: items.unit }).from(items).where(inArray(items.id, itemIds)),
    db.select({ id: seasons.id, startYear: seasons.startYear }).from(seasons).where(inArray(seasons.id, seasonIds)),
  ]);
  return { itemRows, seasonRows };
}

export async function getPrice(db: Db, id: number): Promise<PriceRow> {
  const [row] = await joined(db).where(eq(priceObservations.id, id));
  if (!row) throw AppError.notFound('The price');
  return row;
}

/**
 * One price per item and season: the mean over delivery points and dates; deflated (price / index × 100)
 * when an index is named. A season the index does not cover is null rather than a guess.
 */
export async function priceSeries(db: Db, itemIds: number[], deflatorId?: number): Promise<PriceSeries> {
  const seasonRows = await db.select({ id: seasons.id, label: seasons.label }).from(seasons).orderBy(asc(seasons.startYear));
  const means = await db
    .select({
      itemId: priceObservations.itemId,
      seasonId: priceObservations.seasonId,
      currency: priceObservations.currency,
      mean: sql<number>`avg(${priceObservations.price})`.mapWith(Number),
    })
    .from(priceObservations)
    .where(inAny(priceObservations.itemId, itemIds))
    .groupBy(priceObservations.itemId, priceObservations.seasonId, priceObservations.currency);
  const itemRows = await db.select().from(items).where(inAny(items.id, itemIds)).orderBy(asc(items.id));
  let deflator: PriceSeries['deflator'] = null;
  let index = new Map<number, number>();
  if (deflatorId) {
    const [ix] = await db.select().from(priceIndexes).where(eq(priceIndexes.id, deflatorId));
    if (!ix) throw AppError.notFound('The price index');
    deflator = { name: ix.name, base: ix.base };
    const values = await db.select().from(priceIndexValues).where(eq(priceIndexValues.indexId, deflatorId));
    index = new Map(values.map((v) => [v.seasonId, v.value]));
  }
  // The seasons from the first to the last with a price of these items (seasons opened ahead stay out).
  const pricedSeasons = new Set(means.map((m) => m.seasonId));
  const priced = seasonRows.map((s) => pricedSeasons.has(s.id));
  const shown = seasonRows.slice(Math.max(0, priced.indexOf(true)), priced.lastIndexOf(true) + 1);
  return {
    deflator,
    seasons: shown.map((s) => s.label),
    series: itemRows.map((it) => {
      const mine = means.filter((m) => m.itemId === it.id);
      return {
        itemCode: it.code,
        itemName: it.name,
        unit: it.unit,
        currency: mine[0]?.currency ?? '',
        values: shown.map((s) => {
          const m = mine.find((x) => x.seasonId === s.id);
          if (!m) return null;
          if (!deflatorId) return m.mean;
          const ix = index.get(s.id);
          return ix ? (m.mean / ix) * 100 : null;
        }),
      };
    }),
  };
}

/**
 * Each item's median price season by season (all delivery points and dates of a season together;
 * the co-op keeps one currency in practice), oldest first: what shared/plausibility.ts judges a new
 * price against. `itemIds` limits the items (all when absent). One grouped statement; the medians
 * come from PostgreSQL's percentile_cont.
 */
export async function priceHistories(db: Db, itemIds?: number[]): Promise<Map<number, SeasonPrices>> {
  if (itemIds && itemIds.length === 0) return new Map();
  const only = itemIds ? sql`where p.item_id = any(${`{${itemIds.join(',')}}`}::int[])` : sql``;
  const res = (await db.execute(sql`
    select p.item_id as "itemId", s.start_year as "startYear",
           percentile_cont(0.5) within group (order by p.price) as median, count(*)::int as count
    from price_observations p join seasons s on s.id = p.season_id
    ${only}
    group by p.item_id, s.start_year
    order by p.item_id, s.start_year`)) as unknown as { rows: { itemId: number; startYear: number; median: number | string; count: number | string }[] };
  const out = new Map<number, { startYear: number; median: number; count: number }[]>();
  for (const r of res.rows) {
    const id = Number(r.itemId);
    if (!out.has(id)) out.set(id, []);
    out.get(id)!.push({ startYear: Number(r.startYear), median: Number(r.median), count: Number(r.count) });
  }
  return out;
}

// The price export's reads (exports/data-exports.ts reads the table chunk by chunk through these).

export interface PriceExportRow {
  item: string;
  season: string;
  deliveryPoint: string;
  price: number;
  unit: string;
  currency: string;
  source: string;
  observedOn: string;
  [key: string]: unknown;
}

/** Season ids oldest first and item ids in id order: the order the export walks the prices in. */
export async function priceExportOrder(db: Db): Promise<{ seasonIds: number[]; itemIds: number[] }> {
  const seasonRows = await db.select({ id: seasons.id }).from(seasons).orderBy(asc(seasons.startYear), asc(seasons.id));
  const itemRows = await db.select({ id: items.id }).from(items).orderBy(asc(items.id));
  return { seasonIds: seasonRows.map((s) => s.id), itemIds: itemRows.map((i) => i.id) };
}

/**
 * At most `limit` prices of one item and season by delivery point and date, after the point and date
 * given (through the unique index on item, season, point and date).
 */
export async function priceExportChunk(db: Db, itemId: number, seasonId: number, after: { point: string; on: string } | null, limit: number): Promise<PriceExportRow[]> {
  return db
    .select({
      item: items.code,
      season: seasons.label,
      deliveryPoint: deliveryPoints.name,
      price: priceObservations.price,
      unit: items.unit,
      currency: priceObservations.currency,
      source: priceObservations.source,
      observedOn: priceObservations.observedOn,
    })
    .from(priceObservations)
    .innerJoin(items, eq(items.id, priceObservations.itemId))
    .innerJoin(seasons, eq(seasons.id, priceObservations.seasonId))
    .innerJoin(deliveryPoints, eq(deliveryPoints.id, priceObservations.deliveryPointId))
    .where(
      and(
        eq(priceObservations.itemId, itemId),
        eq(priceObservations.seasonId, seasonId),
        after ? or(gt(deliveryPoints.name, after.point), and(eq(deliveryPoints.name, after.point), gt(priceObservations.observedOn, after.on))) : undefined,
      ),
    )
    .orderBy(asc(deliveryPoints.name), asc(priceObservations.observedOn))
    .limit(limit);
}
