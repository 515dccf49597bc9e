/**
 * Reference writes: create, replace and delete one item, season, delivery point or farm, each
 * audited in its transaction (`<kind>.create`, `.update`, `.delete`, with the whole row before and
 * after). A row that is gone answers 404; deleting one still in use answers 409 `in_use` (the
 * foreign key refuses it; core/error-handler.ts).
 */
import { DateTime } from 'luxon';
import type { z } from 'zod';
import type { deliveryPointSchema, farmSchema, ItemInput, seasonSchema } from '../../shared/data-schemas.js';
import { AppError } from '../core/app-error.js';
import type { Db } from '../db/client.js';
import { recordAudit } from '../audit/audit-repository.js';
import {
  deleteReference,
  findReference,
  insertReference,
  updateReference,
  type ReferenceKind,
  type ReferenceRow,
  type ReferenceValues,
} from './reference-repository.js';

export type { ReferenceKind } from './reference-repository.js';

/** What a form sends for each kind (validated by the schemas in shared/data-schemas.ts). */
export interface ReferenceInput {
  item: ItemInput;
  season: z.infer<typeof seasonSchema>;
  'delivery-point': z.infer<typeof deliveryPointSchema>;
  farm: z.infer<typeof farmSchema>;
}

const LABELS: Record<ReferenceKind, string> = { item: 'item', season: 'season', 'delivery-point': 'delivery point', farm: 'farm' };

/** The stored columns of each kind: an item without an analysis stores nulls; a season stores its first day. */
const VALUES: { [K in ReferenceKind]: (input: ReferenceInput[K]) => ReferenceValues<K> } = {
  item: (v) => ({ ...v, nPct: v.nPct ?? null, p2o5Pct: v.p2o5Pct ?? null, k2oPct: v.k2oPct ?? null }),
  season: (v) => ({ ...v, startsOn: DateTime.utc(v.startYear, v.startMonth, 1).toISODate()! }),
  'delivery-point': (v) => v,
  farm: (v) => v,
};

async function existing<K extends ReferenceKind>(db: Db, kind: K, id: number): Promise<ReferenceRow<K>> {
  const row = await findReference(db, kind, id);
  if (!row) throw AppError.notFound(`The ${LABELS[kind]}`);
  return row;
}

export async function createReference<K extends ReferenceKind>(db: Db, kind: K, input: ReferenceInput[K], actorUserId: number): Promise<ReferenceRow<K>> {
  return db.transaction(async (tx) => {
    const created = await insertReference(tx, kind, VALUES[kind](input));
    await recordAudit(tx, { actorUserId, action: `${kind}.create`, entity: kind, entityId: created.id, after: created });
    return created;
  });
}

export async function replaceReference<K extends ReferenceKind>(db: Db, kind: K, id: number, input: ReferenceInput[K], actorUserId: number): Promise<ReferenceRow<K>> {
  return db.transaction(async (tx) => {
    const before = await existing(tx, kind, id);
    const after = await updateReference(tx, kind, id, VALUES[kind](input));
    await recordAudit(tx, { actorUserId, action: `${kind}.update`, entity: kind, entityId: id, before, after });
    return after;
  });
}

export async function removeReference(db: Db, kind: ReferenceKind, id: number, actorUserId: number): Promise<void> {
  await db.transaction(async (tx) => {
    const before = await existing(tx, kind, id);
    await deleteReference(tx, kind, id);
    await recordAudit(tx, { actorUserId, action: `${kind}.delete`, entity: kind, entityId: id, before });
  });
}
