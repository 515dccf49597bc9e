import { asc, eq, isNotNull } from 'drizzle-orm';
import type { FarmMember, FarmSummary, MyFarm } from '../../shared/api-types.js';
import type { Db } from '../db/client.js';
import { farmRecords, farms, items, seasons, users } from '../db/schema/index.js';
import { AppError } from '../core/app-error.js';
import { readableFarmIds, type Reader } from '../core/farm-scope.js';

const columns = {
  id: farms.id,
  code: farms.code,
  name: farms.name,
  region: farms.region,
  landHa: farms.landHa,
};

/** Every farm `reader` may see: all of them, or a member's own farm and nothing else. */
export async function listFarms(db: Db, reader: Reader): Promise<FarmSummary[]> {
  const scope = readableFarmIds(reader);
  if (scope && scope.length === 0) return [];
  const onlyFarmId = scope?.[0];
  const q = db.select(columns).from(farms);
  const rows = onlyFarmId === undefined ? await q.orderBy(asc(farms.code)) : await q.where(eq(farms.id, onlyFarmId));
  const memberRows = await db
    .select({ id: users.id, name: users.name, farmId: users.farmId })
    .from(users)
    .where(onlyFarmId === undefined ? isNotNull(users.farmId) : eq(users.farmId, onlyFarmId))
    .orderBy(asc(users.name));
  const members = new Map<number, FarmMember[]>();
  for (const m of memberRows) members.set(m.farmId!, [...(members.get(m.farmId!) ?? []), { id: m.id, name: m.name }]);
  return rows.map((r) => ({ ...r, members: members.get(r.id) ?? [] }));
}

export async function myFarm(db: Db, farmId: number | null): Promise<MyFarm> {
  if (farmId === null) throw AppError.notFound('A farm linked to your account');
  const [farm] = await listFarms(db, { role: 'member', farmId });
  if (!farm) throw AppError.notFound('Your farm');
  const records = await db
    .select({ season: seasons.label, item: items.name, role: items.role, unit: items.unit, quantity: farmRecords.quantity })
    .from(farmRecords)
    .innerJoin(seasons, eq(seasons.id, farmRecords.seasonId))
    .innerJoin(items, eq(items.id, farmRecords.itemId))
    .where(eq(farmRecords.farmId, farmId))
    .orderBy(asc(seasons.startYear), asc(items.role), asc(items.id));
  return { farm, records };
}
