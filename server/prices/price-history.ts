import { sql } from 'drizzle-orm';
import type { SeasonPrices } from '../../shared/plausibility.js';
import type { Db } from '../db/client.js';

/**
 * Each item's median price season by season (all delivery points and dates of a season together;
 * the co-op keeps one currency in practice), oldest first: what shared/plausibility.ts judges a new
 * price against. `itemIds` limits the items (all when absent). One grouped statement; the medians
 * come from PostgreSQL's percentile_cont.
 */
export async function priceHistories(db: Db, itemIds?: number[]): Promise<Map<number, SeasonPrices>> {
  if (itemIds && itemIds.length === 0) return new Map();
  const only = itemIds ? sql`where p.item_id = any(${`{${itemIds.join(',')}}`}::int[])` : sql``;
  const res = (await db.execute(sql`
    select p.item_id as "itemId", s.start_year as "startYear",
           percentile_cont(0.5) within group (order by p.price) as median, count(*)::int as count
    from price_observations p join seasons s on s.id = p.season_id
    ${only}
    group by p.item_id, s.start_year
    order by p.item_id, s.start_year`)) as unknown as { rows: { itemId: number; startYear: number; median: number | string; count: number | string }[] };
  const out = new Map<number, { startYear: number; median: number; count: number }[]>();
  for (const r of res.rows) {
    const id = Number(r.itemId);
    if (!out.has(id)) out.set(id, []);
    out.get(id)!.push({ startYear: Number(r.startYear), median: Number(r.median), count: Number(r.count) });
  }
  return out;
}
