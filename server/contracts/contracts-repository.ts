/**
 * Contract reads. A member's queries are held to their own farm here, whatever filter they send
 * (`reader`, through core/farm-scope.ts); server-side callers without a reader read every farm.
 */
import { and, asc, desc, eq, inArray, type SQL } from 'drizzle-orm';
import type { ContractRow, ContractStatus } from '../../shared/contract-schemas.js';
import { priceFromCents } from '../../shared/contract-schemas.js';
import { AppError } from '../core/app-error.js';
import type { Db } from '../db/client.js';
import { contracts, farmRecords, farms, farmSeasonFactors, items, jobs, seasons } from '../db/schema/index.js';
import { readableFarmIds, type Reader } from '../core/farm-scope.js';
import { inAny, onlyIn } from '../db/conditions.js';

export interface ContractFilter {
  ids?: number[];
  farmIds?: number[];
  seasonIds?: number[];
  itemIds?: number[];
  statuses?: readonly ContractStatus[];
}

const columns = {
  id: contracts.id,
  reference: contracts.reference,
  farmId: contracts.farmId,
  farmCode: farms.code,
  farmName: farms.name,
  seasonId: contracts.seasonId,
  season: seasons.label,
  itemId: contracts.itemId,
  itemCode: items.code,
  itemName: items.name,
  unit: items.unit,
  quantity: contracts.quantity,
  priceCents: contracts.priceCents,
  currency: contracts.currency,
  deliveryFrom: contracts.deliveryFrom,
  deliveryTo: contracts.deliveryTo,
  status: contracts.status,
  version: contracts.version,
};

function where(f: ContractFilter): SQL | undefined {
  return and(
    onlyIn(contracts.id, f.ids),
    onlyIn(contracts.farmId, f.farmIds),
    inAny(contracts.seasonId, f.seasonIds),
    inAny(contracts.itemId, f.itemIds),
    onlyIn(contracts.status, f.statuses),
  );
}

function toRow({ priceCents, ...r }: { priceCents: number } & Omit<ContractRow, 'price'>): ContractRow {
  return { ...r, price: priceFromCents(priceCents) };
}

export async function listContracts(db: Db, filter: ContractFilter = {}, reader?: Reader): Promise<ContractRow[]> {
  const f = reader ? { ...filter, farmIds: readableFarmIds(reader, filter.farmIds) } : filter;
  const rows = await db
    .select(columns)
    .from(contracts)
    .innerJoin(farms, eq(farms.id, contracts.farmId))
    .innerJoin(seasons, eq(seasons.id, contracts.seasonId))
    .innerJoin(items, eq(items.id, contracts.itemId))
    .where(where(f))
    .orderBy(asc(seasons.startYear), asc(farms.code), asc(items.id), asc(contracts.reference));
  return rows.map(toRow);
}

/** One contract the caller may see (a member asking for another farm's gets 404, as for a missing one). */
export async function getContract(db: Db, id: number, reader?: Reader): Promise<ContractRow> {
  const [row] = await listContracts(db, { ids: [id] }, reader);
  if (!row) throw AppError.notFound('The contract');
  return row;
}

/** A contract as stored (the price in cents), without its id and version. */
export type StoredContract = Omit<typeof contracts.$inferInsert, 'id' | 'version' | 'createdAt' | 'updatedAt'>;

/** The farm, season and item a contract body names, and any contract already holding its number. */
export async function contractReferences(db: Db, body: { farmId: number; seasonId: number; itemId: number; reference: string }) {
  const [[farm], [season], [item], [dup]] = await Promise.all([
    db.select({ id: farms.id }).from(farms).where(eq(farms.id, body.farmId)),
    db.select({ id: seasons.id }).from(seasons).where(eq(seasons.id, body.seasonId)),
    db.select({ role: items.role, code: items.code }).from(items).where(eq(items.id, body.itemId)),
    db.select({ id: contracts.id }).from(contracts).where(eq(contracts.reference, body.reference)),
  ]);
  return { farm, season, item, dup };
}

/** Inside the caller's transaction. */
export async function insertContract(tx: Db, row: StoredContract): Promise<{ id: number }> {
  const [r] = await tx.insert(contracts).values(row).returning({ id: contracts.id });
  return r!;
}

/** Locks one contract row for the caller's transaction; false when there is none. */
export async function lockContract(tx: Db, id: number): Promise<boolean> {
  const locked = await tx.select({ version: contracts.version }).from(contracts).where(eq(contracts.id, id)).for('update');
  return locked.length > 0;
}

/** Inside the caller's transaction. */
export async function writeContract(tx: Db, id: number, row: StoredContract, version: number): Promise<void> {
  await tx
    .update(contracts)
    .set({ ...row, version, updatedAt: new Date() })
    .where(eq(contracts.id, id));
}

/** Inside the caller's transaction. */
export async function deleteContractRow(tx: Db, id: number): Promise<void> {
  await tx.delete(contracts).where(eq(contracts.id, id));
}

// The contracted view's reads (contracted-service.ts): its job rows, the farms' past output and land.

/** The newest job of `kind` for a row (`refId`), any status. */
export async function latestJobOf(db: Db, kind: string, refId: number) {
  const [row] = await db
    .select()
    .from(jobs)
    .where(and(eq(jobs.kind, kind), eq(jobs.refId, refId)))
    .orderBy(desc(jobs.id))
    .limit(1);
  return row;
}

/** The newest finished job of `kind` for a row (the one given by `jobId` when given), its id and payload. */
export async function latestDoneJobOf(db: Db, kind: string, refId: number, jobId?: number): Promise<{ id: number; payload: unknown } | undefined> {
  const where = [eq(jobs.kind, kind), eq(jobs.refId, refId), eq(jobs.status, 'done')];
  if (jobId !== undefined) where.push(eq(jobs.id, jobId));
  const [done] = await db
    .select({ id: jobs.id, payload: jobs.payload })
    .from(jobs)
    .where(and(...where))
    .orderBy(desc(jobs.id))
    .limit(1);
  return done;
}

export async function setJobPayload(db: Db, jobId: number, payload: unknown): Promise<void> {
  await db.update(jobs).set({ payload }).where(eq(jobs.id, jobId));
}

/** These farms' recorded quantities of these items with each season's start year, and their land by season. */
export async function pastOutputAndLand(db: Db, farmIds: number[], itemIds: number[]) {
  const recs = await db
    .select({ farmId: farmRecords.farmId, seasonId: farmRecords.seasonId, itemId: farmRecords.itemId, quantity: farmRecords.quantity, startYear: seasons.startYear })
    .from(farmRecords)
    .innerJoin(seasons, eq(seasons.id, farmRecords.seasonId))
    .where(and(inArray(farmRecords.farmId, farmIds), inArray(farmRecords.itemId, itemIds)));
  const land = await db
    .select({ farmId: farmSeasonFactors.farmId, seasonId: farmSeasonFactors.seasonId, value: farmSeasonFactors.value })
    .from(farmSeasonFactors)
    .where(and(inArray(farmSeasonFactors.farmId, farmIds), eq(farmSeasonFactors.factor, 'land_ha')));
  return { recs, land };
}

/** Every farm's id, code and name (the planner's job; no member reads this). */
export async function allFarmNames(db: Db) {
  return db.select({ id: farms.id, code: farms.code, name: farms.name }).from(farms);
}

/** One farm's name and code: the caller passes the member's own farm id from the session. */
export async function farmNameAndCode(db: Db, farmId: number): Promise<{ name: string; code: string } | undefined> {
  const [farm] = await db.select({ name: farms.name, code: farms.code }).from(farms).where(eq(farms.id, farmId));
  return farm;
}

export async function itemsByCode(db: Db, codes: string[]) {
  return db.select().from(items).where(inArray(items.code, codes));
}
