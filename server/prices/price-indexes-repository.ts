import { asc, eq } from 'drizzle-orm';
import type { PriceIndexInput } from '../../shared/data-schemas.js';
import type { Db } from '../db/client.js';
import { priceIndexes, priceIndexValues, seasons } from '../db/schema/index.js';

export interface StoredPriceIndex {
  id: number;
  name: string;
  base: string;
  source: string;
  values: { seasonId: number; season: string; value: number }[];
}

/** Every price index, or the one with `id`, each with its values oldest season first (only that index's values are read). */
export async function loadPriceIndexes(db: Db, id?: number): Promise<StoredPriceIndex[]> {
  const ixs = await (id ? db.select().from(priceIndexes).where(eq(priceIndexes.id, id)) : db.select().from(priceIndexes).orderBy(asc(priceIndexes.id)));
  if (ixs.length === 0) return [];
  const values = await db
    .select({ indexId: priceIndexValues.indexId, seasonId: priceIndexValues.seasonId, season: seasons.label, value: priceIndexValues.value })
    .from(priceIndexValues)
    .innerJoin(seasons, eq(seasons.id, priceIndexValues.seasonId))
    .where(id ? eq(priceIndexValues.indexId, id) : undefined)
    .orderBy(asc(seasons.startYear));
  return ixs.map((ix) => ({
    ...ix,
    values: values.filter((v) => v.indexId === ix.id).map(({ seasonId, season, value }) => ({ seasonId, season, value })),
  }));
}

export async function insertPriceIndex(db: Db, body: PriceIndexInput): Promise<number> {
  const [ix] = await db.insert(priceIndexes).values({ name: body.name, base: body.base, source: body.source }).returning({ id: priceIndexes.id });
  if (body.values.length) await db.insert(priceIndexValues).values(body.values.map((v) => ({ indexId: ix.id, ...v })));
  return ix.id;
}

/** Name, base, source and every value replaced together. */
export async function replacePriceIndex(db: Db, id: number, body: PriceIndexInput): Promise<void> {
  await db.update(priceIndexes).set({ name: body.name, base: body.base, source: body.source }).where(eq(priceIndexes.id, id));
  await db.delete(priceIndexValues).where(eq(priceIndexValues.indexId, id));
  if (body.values.length) await db.insert(priceIndexValues).values(body.values.map((v) => ({ indexId: id, ...v })));
}

export async function deletePriceIndex(db: Db, id: number): Promise<void> {
  await db.delete(priceIndexes).where(eq(priceIndexes.id, id));
}
