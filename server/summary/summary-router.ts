import { ACCESS } from '../../shared/roles.js';
import { asc, count, countDistinct, eq } from 'drizzle-orm';
import type { CoopSummary } from '../../shared/api-types.js';
import type { RouteDef } from '../core/routes.js';
import type { AppContext } from '../context.js';
import type { Db } from '../db/client.js';
import { farmRecords, farms, items, priceObservations, seasons, users } from '../db/schema/index.js';
import { getSettings } from '../settings/settings-service.js';

export async function coopSummary(db: Db): Promise<CoopSummary> {
  const [{ farmCount }] = await db.select({ farmCount: count() }).from(farms);
  const [{ members }] = await db.select({ members: count() }).from(users).where(eq(users.role, 'member'));
  const roleCounts = await db.select({ role: items.role, n: count() }).from(items).groupBy(items.role);
  const seasonRows = await db.select({ id: seasons.id, label: seasons.label }).from(seasons).orderBy(asc(seasons.startYear));
  const [{ prices }] = await db.select({ prices: count() }).from(priceObservations);
  const [{ records }] = await db.select({ records: count() }).from(farmRecords);
  const perSeason = await db
    .select({ seasonId: farmRecords.seasonId, farmsWithRecords: countDistinct(farmRecords.farmId) })
    .from(farmRecords)
    .groupBy(farmRecords.seasonId);
  const withRecords = new Map(perSeason.map((r) => [r.seasonId, Number(r.farmsWithRecords)]));
  const priced = new Set((await db.selectDistinct({ seasonId: priceObservations.seasonId }).from(priceObservations)).map((r) => r.seasonId));
  const withData = seasonRows.filter((s) => priced.has(s.id) || withRecords.has(s.id));
  const lastWithData = seasonRows.findIndex((s) => s.id === withData.at(-1)?.id);
  // Seasons after the newest one with any record have not been recorded yet: not gaps.
  const lastRecorded = seasonRows.reduce((last, s, i) => (withRecords.has(s.id) ? i : last), -1);
  const recordGaps = seasonRows
    .slice(0, lastRecorded + 1)
    .map((s) => ({ season: s.label, farmsMissing: Number(farmCount) - (withRecords.get(s.id) ?? 0) }))
    .filter((g) => g.farmsMissing > 0)
    .reverse();
  const { coopName } = await getSettings(db);
  return {
    coopName,
    farms: Number(farmCount),
    members: Number(members),
    items: {
      outputs: Number(roleCounts.find((r) => r.role === 'output')?.n ?? 0),
      inputs: Number(roleCounts.find((r) => r.role === 'input')?.n ?? 0),
    },
    seasons: {
      count: withData.length,
      first: withData[0]?.label ?? null,
      last: withData.at(-1)?.label ?? null,
      opened: seasonRows.slice(lastWithData + 1).map((s) => s.label),
    },
    priceObservations: Number(prices),
    farmRecords: Number(records),
    recordGaps,
  };
}

export function summaryRoutes(ctx: AppContext): RouteDef[] {
  return [{ method: 'get', path: '/', access: ACCESS.coopSummary, cache: true, handler: async (_req, res) => res.json(await coopSummary(ctx.db)) }];
}

