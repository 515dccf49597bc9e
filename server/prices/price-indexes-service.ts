/** Price indexes (deflators): every change in one transaction with its audit entry. */
import type { PriceIndexInput } from '../../shared/data-schemas.js';
import { AppError } from '../core/app-error.js';
import type { Db } from '../db/client.js';
import { recordAudit } from '../audit/audit-repository.js';
import { deletePriceIndex, insertPriceIndex, loadPriceIndexes, replacePriceIndex, type StoredPriceIndex } from './price-indexes-repository.js';

export const listPriceIndexes = (db: Db) => loadPriceIndexes(db);

async function oneOrThrow(db: Db, id: number): Promise<StoredPriceIndex> {
  const [ix] = await loadPriceIndexes(db, id);
  if (!ix) throw AppError.notFound('The price index');
  return ix;
}

export async function createPriceIndex(db: Db, body: PriceIndexInput, actorUserId: number): Promise<StoredPriceIndex> {
  const id = await db.transaction(async (tx) => {
    const id = await insertPriceIndex(tx, body);
    await recordAudit(tx, { actorUserId, action: 'price-index.create', entity: 'price-index', entityId: id, after: body });
    return id;
  });
  return oneOrThrow(db, id);
}

export async function updatePriceIndex(db: Db, id: number, body: PriceIndexInput, actorUserId: number): Promise<StoredPriceIndex> {
  await db.transaction(async (tx) => {
    const before = await oneOrThrow(tx, id);
    await replacePriceIndex(tx, id, body);
    await recordAudit(tx, { actorUserId, action: 'price-index.update', entity: 'price-index', entityId: id, before, after: await oneOrThrow(tx, id) });
  });
  return oneOrThrow(db, id);
}

export async function removePriceIndex(db: Db, id: number, actorUserId: number): Promise<void> {
  await db.transaction(async (tx) => {
    const before = await oneOrThrow(tx, id);
    await deletePriceIndex(tx, id);
    await recordAudit(tx, { actorUserId, action: 'price-index.delete', entity: 'price-index', entityId: id, before });
  });
}
