/** Futures quote writes: each in one transaction with its audit entry, its item and season checked first. */
import { AppError } from '../core/app-error.js';
import type { Db } from '../db/client.js';
import { recordAudit } from '../audit/audit-repository.js';
import * as repo from './futures-repository.js';

export const listQuotes = repo.listQuotes;

async function getQuote(db: Db, id: number) {
  const row = await repo.findQuote(db, id);
  if (!row) throw AppError.notFound('The futures quote');
  return row;
}

async function checkRefs(db: Db, quote: repo.FuturesQuoteInput) {
  const found = await repo.refsExist(db, quote.itemId, quote.seasonId);
  if (!found.item) throw AppError.invalid('The item does not exist', [{ path: 'body.itemId', message: 'No item has this id' }]);
  if (!found.season) throw AppError.invalid('The season does not exist', [{ path: 'body.seasonId', message: 'No season has this id' }]);
}

export async function createQuote(db: Db, quote: repo.FuturesQuoteInput, actorUserId: number) {
  return db.transaction(async (tx) => {
    await checkRefs(tx, quote);
    const id = await repo.insertQuote(tx, quote, actorUserId);
    await recordAudit(tx, { actorUserId, action: 'futures-quote.create', entity: 'futures-quote', entityId: id, after: quote });
    return getQuote(tx, id);
  });
}

export async function updateQuote(db: Db, id: number, quote: repo.FuturesQuoteInput, actorUserId: number) {
  return db.transaction(async (tx) => {
    const before = await getQuote(tx, id);
    await checkRefs(tx, quote);
    await repo.updateQuote(tx, id, quote);
    await recordAudit(tx, { actorUserId, action: 'futures-quote.update', entity: 'futures-quote', entityId: id, before, after: quote });
    return getQuote(tx, id);
  });
}

export async function deleteQuote(db: Db, id: number, actorUserId: number): Promise<void> {
  await db.transaction(async (tx) => {
    const before = await getQuote(tx, id);
    await repo.deleteQuote(tx, id);
    await recordAudit(tx, { actorUserId, action: 'futures-quote.delete', entity: 'futures-quote', entityId: id, before });
  });
}
