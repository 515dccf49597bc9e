/**
 * Contract writes from the form and the grid. Each names an output item of a farm and season that
 * exist (400 naming the field otherwise) and a contract number no other contract has (409); an edit
 * names the version it started from, and a stale one is refused with 409 `stale` and the stored row.
 * Every write is audited in the same transaction.
 */
import { priceToCents, type ContractInput, type ContractRow } from '../../shared/contract-schemas.js';
import { AppError } from '../core/app-error.js';
import type { Db } from '../db/client.js';
import { recordAudit } from '../audit/audit-repository.js';
import { contractReferences, deleteContractRow, getContract, insertContract, lockContract, writeContract, type StoredContract } from './contracts-repository.js';

/** The stored shape of a contract body (the price in cents). */
function stored(body: ContractInput): StoredContract {
  const { price, ...rest } = body;
  return { ...rest, priceCents: priceToCents(price) };
}

/** The audited snapshot: the ids the audit page names, and the price per unit as people read it. */
function snapshot(r: ContractRow) {
  return { reference: r.reference, farmId: r.farmId, seasonId: r.seasonId, itemId: r.itemId, quantity: r.quantity, price: r.price, currency: r.currency, deliveryFrom: r.deliveryFrom, deliveryTo: r.deliveryTo, status: r.status };
}

async function checkReferences(db: Db, body: ContractInput, excludeId?: number) {
  const details: { path: string; message: string }[] = [];
  const { farm, season, item, dup } = await contractReferences(db, body);
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
    const row = await insertContract(tx, stored(body));
    await recordAudit(tx, { actorUserId, action: 'contract.create', entity: 'contract', entityId: row.id, after: snapshot(await getContract(tx, row.id)) });
    return row.id;
  });
  return getContract(db, id);
}

/** Changes one contract if it is still at `version` (the row is locked first, so "before" is what this replaced). */
export async function updateContract(db: Db, id: number, body: ContractInput, version: number, actorUserId: number): Promise<ContractRow> {
  await db.transaction(async (tx) => {
    if (!(await lockContract(tx, id))) throw AppError.notFound('The contract');
    const before = await getContract(tx, id);
    if (before.version !== version) {
      throw AppError.stale(
        `Someone else changed contract ${before.reference} meanwhile (now ${before.quantity} ${before.unit} of ${before.itemName} at ${before.price} ${before.currency}/${before.unit}, ${before.status}); keep yours or take theirs`,
        before,
      );
    }
    await checkReferences(tx, body, id);
    await writeContract(tx, id, stored(body), version + 1);
    const after = await getContract(tx, id);
    await recordAudit(tx, { actorUserId, action: 'contract.update', entity: 'contract', entityId: id, before: snapshot(before), after: snapshot(after) });
  });
  return getContract(db, id);
}

export async function deleteContract(db: Db, id: number, actorUserId: number): Promise<void> {
  await db.transaction(async (tx) => {
    const before = await getContract(tx, id);
    await deleteContractRow(tx, id);
    await recordAudit(tx, { actorUserId, action: 'contract.delete', entity: 'contract', entityId: id, before: snapshot(before) });
  });
}
