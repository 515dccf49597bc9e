/**
 * Writes to farm records and fixed factors: each runs in one transaction with its audit entry, and a
 * record edit that names the version it started from is refused with 409 `stale` when someone else
 * has changed it since.
 */
import type { z } from 'zod';
import type { FarmRecordRow } from '../../shared/api-types.js';
import type { factorKeySchema, factorValueSchema, landSchema, recordSchema } from '../../shared/data-schemas.js';
import { AppError } from '../core/app-error.js';
import type { Db } from '../db/client.js';
import { recordAudit } from '../audit/audit-repository.js';
import type { SessionUser } from '../auth/session.js';
import * as repo from './records-repository.js';

type RecordInput = z.infer<typeof recordSchema>;
/**
 * `version`: the version of the stored quantity the edit started from (GET /api/records), or null
 * when the cell was empty. Left out, the row is written whatever is stored (pasted blocks of new seasons).
 */
export type VersionedRecord = RecordInput & { version?: number | null };

/** Inserts or replaces quantities (a cell edited in the grid or a pasted block), all or nothing; answers the touched farms' and seasons' records. */
export async function saveRecords(db: Db, rows: VersionedRecord[], actor: SessionUser): Promise<FarmRecordRow[]> {
  await db.transaction(async (tx) => {
    for (const { version, ...row } of rows) {
      // Locked before it is read: the audit's "before" is the value this write replaces.
      const before = await repo.lockRecord(tx, row);
      if (version !== undefined && (before?.version ?? null) !== version) {
        const current = before ? (await repo.listRecords(tx, actor, { farmIds: [row.farmId], seasonIds: [row.seasonId] })).find((r) => r.itemId === row.itemId) : undefined;
        const now = current ? `now ${current.quantity} ${current.unit}` : 'it has been deleted';
        throw AppError.stale(`Someone else changed this farm record meanwhile (${now}); keep yours or take theirs`, current ?? null);
      }
      await repo.upsertRecord(tx, row);
      await recordAudit(tx, {
        actorUserId: actor.id,
        action: before ? 'record.update' : 'record.create',
        entity: 'farm-record',
        entityId: `${row.farmId}/${row.seasonId}/${row.itemId}`,
        before: before ?? null,
        after: row,
      });
    }
  });
  return repo.listRecords(db, actor, { farmIds: [...new Set(rows.map((r) => r.farmId))], seasonIds: [...new Set(rows.map((r) => r.seasonId))] });
}

export async function deleteRecord(db: Db, key: Omit<RecordInput, 'quantity'>, actor: SessionUser): Promise<void> {
  await db.transaction(async (tx) => {
    const deleted = await repo.deleteRecord(tx, key);
    if (!deleted) throw AppError.notFound('The farm record');
    await recordAudit(tx, { actorUserId: actor.id, action: 'record.delete', entity: 'farm-record', entityId: `${key.farmId}/${key.seasonId}/${key.itemId}`, before: deleted });
  });
}

/** Sets one farm's level of one fixed factor in one season (a grid cell); answers that farm's factors. */
export async function setFactor(db: Db, value: z.infer<typeof factorValueSchema>, actor: SessionUser) {
  if (value.factor === 'land_ha' && !(value.value > 0)) throw AppError.invalid('Land must be more than 0 ha', [{ path: 'body.value', message: 'Land must be more than 0 ha' }]);
  await db.transaction(async (tx) => {
    const before = await repo.getFactor(tx, value);
    await repo.upsertFactor(tx, value);
    await recordAudit(tx, { actorUserId: actor.id, action: before ? 'factor.update' : 'factor.create', entity: 'farm-factor', entityId: `${value.farmId}/${value.seasonId}/${value.factor}`, before: before ?? null, after: value });
  });
  return repo.listFactors(db, actor, [value.farmId]);
}

export async function deleteFactor(db: Db, key: z.infer<typeof factorKeySchema>, actor: SessionUser): Promise<void> {
  await db.transaction(async (tx) => {
    const deleted = await repo.deleteFactor(tx, key);
    if (!deleted) throw AppError.notFound('The fixed factor value');
    await recordAudit(tx, { actorUserId: actor.id, action: 'factor.delete', entity: 'farm-factor', entityId: `${key.farmId}/${key.seasonId}/${key.factor}`, before: deleted });
  });
}

/** Sets a farm's land in a season; answers that farm's land. */
export async function setLand(db: Db, land: z.infer<typeof landSchema>, actor: SessionUser) {
  await db.transaction(async (tx) => {
    const value = { farmId: land.farmId, seasonId: land.seasonId, factor: 'land_ha', value: land.landHa };
    const before = await repo.getFactor(tx, value);
    await repo.upsertFactor(tx, value);
    await recordAudit(tx, { actorUserId: actor.id, action: 'land.update', entity: 'farm-land', entityId: `${land.farmId}/${land.seasonId}`, before: before ?? null, after: land });
  });
  return repo.listLand(db, actor, [land.farmId]);
}
