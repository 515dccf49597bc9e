/**
 * Contract writes from the form and the grid. Each names an output item of a farm and season that
 * exist (400 naming the field otherwise) and a contract number no other contract has (409); an edit
 * names the version it started from, and a stale one is refused with 409 `stale` and the stored row.
 * Every write is audited in the same transaction.
 */
import { eq } from 'drizzle-orm';
import { priceToCents, type ContractInput, type ContractRow } from '../../shared/contract-schemas.js';
import { AppError } from '../core/app-error.js';
import type { Db } from '../db/client.js';
import { contracts, farms, items, seasons } from '../db/schema/index.js';
import { recordAudit } from '../audit/audit-repository.js';
import { getContract } from './contracts-repository.js';

/** The stored shape of a contract body (the price in cents). */
function stored(body: ContractInput) {
  const { price, ...rest } = body;
  return { ...rest, priceCents: priceToCents(price) };
}

/** The audited snapshot: the ids the audit page names, and the price per unit as people read it. */
function snapshot(r: ContractRow) {
  return { reference: r.reference, farmId: r.farmId, seasonId: r.seasonId, itemId: r.itemId, quantity: r.quantity, price: r.price, currency: r.currency, deliveryFrom: r.deliveryFrom, deliveryTo: r.deliveryTo, status: r.status };
}

async function checkReferences(db: Db, body: ContractInput, excludeId?: number) {
  const details: { path: string; message: string }[] = [];
  const [[farm], [season], [item], [dup]] = await Promise.all([
    db.select({ id: farms.id }).from(farms).where(eq(farms.id, body.farmId)),
    db.select({ id: seasons.id }).from(seasons).where(eq(seasons.id, body.seasonId)),
    db.select({ role: items.role, code: items.code }).from(items).where(eq(items.id, body.itemId)),
    db.select({ id: contracts.id }).from(contracts).where(eq(contracts.reference, body.reference)),
  ]);
  if (!farm) details.push({ path: 'body.farmId', message: 'No farm has this id' });
  if (!season) details.push({ path: 'body.seasonId', message: 'No season has this id' });
  if (!item) details.push({ path: 'body.itemId', message: 'No item has this id' });
  else if (item.role !== 'output') details.push({ path: 'body.itemId', message: `${item.code} is an input; a contract commits an output` });
  if (details.length) throw AppError.invalid(details.map((d) => d.message).join('; '), details);
  if (dup && dup.id !== excludeId) throw AppError.conflict(`Another contract already has the number “${body.reference}”; use a number of its own`);
}

export async function createContract(db: Db, body: ContractInput, actorUserId: number): Promise<ContractRow> {
  const id = await db.transaction(async (tx) => {
    await checkReferences(tx, body);
    const [row] = await tx.insert(contracts).values(stored(body)).returning({ id: contracts.id });
    await recordAudit(tx, { actorUserId, action: 'contract.create', entity: 'contract', entityId: row.id, after: snapshot(await getContract(tx, row.id)) });
    return row.id;
  });
  return getContract(db, id);
}

/** Changes one contract if it is still at `version` (the row is locked first, so "before" is what this replaced). */
export async function updateContract(db: Db, id: number, body: ContractInput, version: number, actorUserId: number): Promise<ContractRow> {
  await db.transaction(async (tx) => {
    const locked = await tx.select({ version: contracts.version }).from(contracts).where(eq(contracts.id, id)).for('update');
    if (!locked.length) throw AppError.notFound('The contract');
    const before = await getContract(tx, id);
    if (before.version !== version) {
      throw AppError.stale(
        `Someone else changed contract ${before.reference} meanwhile (now ${before.quantity} ${before.unit} of ${before.itemName} at ${before.price} ${before.currency}/${before.unit}, ${before.status}); keep yours or take theirs`,
        before,
      );
    }
    await checkReferences(tx, body, id);
    await tx
      .update(contracts)
      .set({ ...stored(body), version: version + 1, updatedAt: new Date() })
      .where(eq(contracts.id, id));
    const after = await getContract(tx, id);
    await recordAudit(tx, { actorUserId, action: 'contract.update', entity: 'contract', entityId: id, before: snapshot(before), after: snapshot(after) });
  });
  return getContract(db, id);
}

export async function deleteContract(db: Db, id: number, actorUserId: number): Promise<void> {
  await db.transaction(async (tx) => {
    const before = await getContract(tx, id);
    await tx.delete(contracts).where(eq(contracts.id, id));
    await recordAudit(tx, { actorUserId, action: 'contract.delete', entity: 'contract', entityId: id, before: snapshot(before) });
  });
}
