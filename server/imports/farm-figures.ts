/**
 * What the two kinds that carry farm figures (record-rows.ts, observation-rows.ts) share: a farm's
 * factors (land_ha and fixed:<name>) written once per farm and season, and the warning for a
 * quantity far from the farm's own history.
 */
import type { FactorWrite } from './import-types.js';
import { implausibleQuantity } from '../../shared/plausibility.js';
import { fmt, type CheckContext, type FarmRef, type Item } from './row-checker.js';

/** A farm's factor for a season, from the first row that gives it; a later row must give the same value. */
export class FarmFactors {
  private readonly first = new Map<string, { row: number; value: number }>();

  constructor(private readonly ctx: CheckContext) {}

  add(n: number, farmId: number, seasonId: number, factor: string, value: number, column: string) {
    const key = `${farmId}|${seasonId}|${factor}`;
    const before = this.first.get(key);
    if (before) {
      if (before.value !== value) this.ctx.error(n, column, `${fmt(value)} differs from ${fmt(before.value)} on row ${before.row} for the same farm and season`);
      return;
    }
    this.first.set(key, { row: n, value });
    const w: FactorWrite = { row: n, farmId, seasonId, factor, value };
    this.ctx.writes.factors.push(w);
  }
}

/** A warning (accepted before the commit) when the quantity is far from the farm's own history per hectare. */
export function checkQuantity(ctx: CheckContext, n: number, farm: FarmRef, seasonId: number, item: Item, quantity: number, rowLand: number | null, column: string) {
  const land = rowLand ?? ctx.lookups.land?.[`${farm.id}|${seasonId}`] ?? null;
  const doubt = implausibleQuantity(quantity, land, item, farm.code, ctx.lookups.recordHistory?.[`${farm.id}|${item.id}`]);
  if (doubt) ctx.warning(n, column, doubt);
}
