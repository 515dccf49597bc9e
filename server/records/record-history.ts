import { and, eq, gt, sql } from 'drizzle-orm';
import type { QuantityHistory } from '../../shared/plausibility.js';
import type { Db } from '../db/client.js';
import { farmSeasonFactors } from '../db/schema/index.js';

/**
 * Each farm's land by season (`farmId|seasonId` → ha) and its quantity per hectare of each item over
 * its own seasons (`farmId|itemId`): what shared/plausibility.ts judges a new farm record against.
 */
export async function recordHistories(db: Db): Promise<{ land: Record<string, number>; history: Record<string, QuantityHistory> }> {
  const landRows = await db
    .select({ farmId: farmSeasonFactors.farmId, seasonId: farmSeasonFactors.seasonId, value: farmSeasonFactors.value })
    .from(farmSeasonFactors)
    .where(and(eq(farmSeasonFactors.factor, 'land_ha'), gt(farmSeasonFactors.value, 0)));
  const land: Record<string, number> = {};
  for (const l of landRows) land[`${l.farmId}|${l.seasonId}`] = l.value;
  // The median per hectare in the database (percentile_cont), not every record in this process.
  const res = (await db.execute(sql`
    select r.farm_id as "farmId", r.item_id as "itemId",
           percentile_cont(0.5) within group (order by r.quantity / f.value) as "perHa", count(*)::int as seasons
    from farm_records r
    join farm_season_factors f on f.farm_id = r.farm_id and f.season_id = r.season_id and f.factor = 'land_ha' and f.value > 0
    group by r.farm_id, r.item_id`)) as unknown as { rows: { farmId: number; itemId: number; perHa: number | string; seasons: number | string }[] };
  const history: Record<string, QuantityHistory> = {};
  for (const r of res.rows) history[`${r.farmId}|${r.itemId}`] = { perHa: Number(r.perHa), seasons: Number(r.seasons) };
  return { land, history };
}
