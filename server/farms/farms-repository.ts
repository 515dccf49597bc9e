import { asc, eq } from 'drizzle-orm';
import type { FarmSummary, MyFarm } from '../../shared/api-types.js';
import type { Db } from '../db/client.js';
import { farmRecords, farms, items, seasons, users } from '../db/schema/index.js';
import { AppError } from '../core/app-error.js';

const columns = {
  id: farms.id,
  code: farms.code,
  name: farms.name,
  region: farms.region,
  landHa: farms.landHa,
  ownerUserId: farms.ownerUserId,
  ownerName: users.name,
};

/** Every farm, or only `onlyFarmId` (a member sees their own farm and nothing else). */
export async function listFarms(db: Db, onlyFarmId?: number | null): Promise<FarmSummary[]> {
  const q = db.select(columns).from(farms).leftJoin(users, eq(users.id, farms.ownerUserId));
  if (onlyFarmId === null) return [];
  const rows = onlyFarmId === undefined ? await q.orderBy(asc(farms.code)) : await q.where(eq(farms.id, onlyFarmId));
  return rows;
}

export async function myFarm(db: Db, farmId: number | null): Promise<MyFarm> {
  if (farmId === null) throw AppError.notFound('A farm linked to your account');
  const [farm] = await listFarms(db, farmId);
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
