import { and, asc, eq, inArray, sql, type SQL } from 'drizzle-orm';
import type { PriceRow, PriceSeries } from '../../shared/api-types.js';
import type { Db } from '../db/client.js';
import { deliveryPoints, items, priceIndexes, priceIndexValues, priceObservations, seasons } from '../db/schema/index.js';
import { AppError } from '../core/app-error.js';

export interface PriceFilter {
  /** Only these rows (an empty list matches none). */
  ids?: number[];
  itemIds?: number[];
  seasonIds?: number[];
  deliveryPointIds?: number[];
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
  const parts: SQL[] = [];
  if (f.ids) parts.push(f.ids.length ? inArray(priceObservations.id, f.ids) : sql`false`);
  if (f.itemIds?.length) parts.push(inArray(priceObservations.itemId, f.itemIds));
  if (f.seasonIds?.length) parts.push(inArray(priceObservations.seasonId, f.seasonIds));
  if (f.deliveryPointIds?.length) parts.push(inArray(priceObservations.deliveryPointId, f.deliveryPointIds));
  return parts.length ? and(...parts) : undefined;
}

export async function listPrices(db: Db, f: PriceFilter = {}): Promise<PriceRow[]> {
  return db
    .select(rowColumns)
    .from(priceObservations)
    .innerJoin(items, eq(items.id, priceObservations.itemId))
    .innerJoin(seasons, eq(seasons.id, priceObservations.seasonId))
    .innerJoin(deliveryPoints, eq(deliveryPoints.id, priceObservations.deliveryPointId))
    .where(where(f))
    .orderBy(asc(seasons.startYear), asc(items.id), asc(deliveryPoints.name), asc(priceObservations.observedOn));
}

export async function getPrice(db: Db, id: number): Promise<PriceRow> {
  const [row] = await db
    .select(rowColumns)
    .from(priceObservations)
    .innerJoin(items, eq(items.id, priceObservations.itemId))
    .innerJoin(seasons, eq(seasons.id, priceObservations.seasonId))
    .innerJoin(deliveryPoints, eq(deliveryPoints.id, priceObservations.deliveryPointId))
    .where(eq(priceObservations.id, id));
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
    .where(itemIds.length ? inArray(priceObservations.itemId, itemIds) : undefined)
    .groupBy(priceObservations.itemId, priceObservations.seasonId, priceObservations.currency);
  const itemRows = await db.select().from(items).where(itemIds.length ? inArray(items.id, itemIds) : undefined).orderBy(asc(items.id));
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
