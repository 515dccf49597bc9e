/**
 * Reference rows: items, seasons, delivery points and farms, one statement each. None of these rows
 * holds one farm's figures, so nothing here narrows by reader: members read items and seasons whole,
 * and the farm list with its members (narrowed to a member's own farm) is read through
 * farms/farms-repository.ts, not here.
 */
import { asc, eq } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { deliveryPoints, farms, items, seasons } from '../db/schema/index.js';

/** Each kind's table and the order its list is read in. */
const TABLES = {
  item: { table: items, orderBy: items.id },
  season: { table: seasons, orderBy: seasons.startYear },
  'delivery-point': { table: deliveryPoints, orderBy: deliveryPoints.name },
  farm: { table: farms, orderBy: farms.code },
};
type Tables = typeof TABLES;
export type ReferenceKind = keyof Tables;
export type ReferenceRow<K extends ReferenceKind> = Tables[K]['table']['$inferSelect'];
export type ReferenceValues<K extends ReferenceKind> = Tables[K]['table']['$inferInsert'];

/** Drizzle's table types do not narrow through `kind`: the queries take the table untyped and each names its row type. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
const tableOf = (kind: ReferenceKind): any => TABLES[kind].table;

export async function listReference<K extends ReferenceKind>(db: Db, kind: K): Promise<ReferenceRow<K>[]> {
  return (await db.select().from(tableOf(kind)).orderBy(asc(TABLES[kind].orderBy))) as ReferenceRow<K>[];
}

export async function findReference<K extends ReferenceKind>(db: Db, kind: K, id: number): Promise<ReferenceRow<K> | undefined> {
  const [row] = (await db.select().from(tableOf(kind)).where(eq(TABLES[kind].table.id, id))) as ReferenceRow<K>[];
  return row;
}

export async function insertReference<K extends ReferenceKind>(db: Db, kind: K, values: ReferenceValues<K>): Promise<ReferenceRow<K>> {
  const [row] = (await db.insert(tableOf(kind)).values(values).returning()) as ReferenceRow<K>[];
  return row;
}

export async function updateReference<K extends ReferenceKind>(db: Db, kind: K, id: number, values: ReferenceValues<K>): Promise<ReferenceRow<K>> {
  const [row] = (await db.update(tableOf(kind)).set(values).where(eq(TABLES[kind].table.id, id)).returning()) as ReferenceRow<K>[];
  return row;
}

export async function deleteReference(db: Db, kind: ReferenceKind, id: number): Promise<void> {
  await db.delete(tableOf(kind)).where(eq(TABLES[kind].table.id, id));
}
