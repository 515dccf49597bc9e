/**
 * Demo step: a few invented forward delivery contracts (issue 19) for the season after the demo's
 * last recorded one — the season an outlook is made for. A contract commits the farm's whole crop of
 * the item (the engine holds that output fixed), about what it grew on average over its last three
 * seasons, at last season's mean price plus a small premium, so the contracted view has figures to
 * show. Invented for the demo only.
 */
import { and, avg, eq, gte, inArray } from 'drizzle-orm';
import type { Db } from '../server/db/client.js';
import { contracts, farmRecords, farms, items, priceObservations, seasons } from '../server/db/schema/index.js';
import { FIRST_SEASON, SEASON_COUNT, seasonLabel } from './demo-coop.js';
import { priceToCents, type ContractStatus } from '../shared/contract-schemas.js';

/** Farm, item, share of its recent mean output, price premium over last season, status. */
const DEMO_CONTRACTS: { farm: string; item: string; share: number; premium: number; status: ContractStatus }[] = [
  { farm: 'F01', item: 'wheat', share: 1.0, premium: 0.04, status: 'signed' },
  { farm: 'F01', item: 'canola', share: 0.95, premium: 0.03, status: 'offered' },
  { farm: 'F02', item: 'wheat', share: 1.05, premium: 0.03, status: 'signed' },
  { farm: 'F03', item: 'wheat', share: 0.95, premium: 0.05, status: 'signed' },
  { farm: 'F03', item: 'canola', share: 1.0, premium: 0.02, status: 'signed' },
  { farm: 'F05', item: 'wheat', share: 0.9, premium: 0.01, status: 'cancelled' },
  { farm: 'F07', item: 'wheat', share: 1.1, premium: 0.02, status: 'signed' },
];

/** The season contracts are made for; created here when the calendar does not have it yet. */
export const DEMO_CONTRACT_SEASON = seasonLabel(FIRST_SEASON + SEASON_COUNT);

export async function seedDemoContracts(tx: Db) {
  const startYear = FIRST_SEASON + SEASON_COUNT;
  let [season] = await tx.select().from(seasons).where(eq(seasons.label, DEMO_CONTRACT_SEASON));
  if (!season) {
    [season] = await tx
      .insert(seasons)
      .values({ label: DEMO_CONTRACT_SEASON, startYear, startMonth: 7, startsOn: `${startYear}-07-01` })
      .returning();
  }
  const farmRows = await tx.select({ id: farms.id, code: farms.code }).from(farms);
  const itemRows = await tx.select({ id: items.id, code: items.code }).from(items).where(inArray(items.code, ['wheat', 'canola']));
  const recent = await tx.select({ id: seasons.id, startYear: seasons.startYear }).from(seasons).where(gte(seasons.startYear, startYear - 3));
  const recentIds = recent.filter((s) => s.startYear < startYear).map((s) => s.id);
  const last = recent.find((s) => s.startYear === startYear - 1);
  const farmId = new Map(farmRows.map((f) => [f.code, f.id]));
  const itemId = new Map(itemRows.map((i) => [i.code, i.id]));
  const rows = [];
  let n = 1;
  for (const c of DEMO_CONTRACTS) {
    const f = farmId.get(c.farm);
    const i = itemId.get(c.item);
    if (!f || !i || !last) continue;
    const [{ mean }] = await tx
      .select({ mean: avg(farmRecords.quantity).mapWith(Number) })
      .from(farmRecords)
      .where(and(eq(farmRecords.farmId, f), eq(farmRecords.itemId, i), inArray(farmRecords.seasonId, recentIds)));
    const [{ price }] = await tx
      .select({ price: avg(priceObservations.price).mapWith(Number) })
      .from(priceObservations)
      .where(and(eq(priceObservations.itemId, i), eq(priceObservations.seasonId, last.id)));
    if (!(mean > 0) || !(price > 0)) continue;
    rows.push({
      reference: `LG-${startYear}-${String(n++).padStart(3, '0')}`,
      farmId: f,
      seasonId: season.id,
      itemId: i,
      quantity: Math.max(10, Math.round((mean * c.share) / 10) * 10),
      priceCents: priceToCents(Math.round(price * (1 + c.premium))),
      currency: 'EUR',
      deliveryFrom: `${startYear}-08`,
      deliveryTo: c.item === 'canola' ? `${startYear}-09` : `${startYear}-10`,
      status: c.status,
    });
  }
  if (rows.length) await tx.insert(contracts).values(rows);
}
