/**
 * Farm record files: farm, season, item, quantity, unit, land_ha, one row per farm, season and item.
 * land_ha, repeated on the farm's rows of a season, goes to farm_season_factors; a row may carry land
 * only.
 */
import type { Item } from './row-checker.js';
import { quote } from '../../shared/cell-parsers.js';
import { sameUnit } from '../../shared/unit-names.js';
import { checkQuantity, FarmFactors } from './farm-figures.js';
import type { CheckContext, RowChecker } from './row-checker.js';

export class RecordRows implements RowChecker {
  private headerUnit: string | null = null;
  private readonly factors: FarmFactors;

  constructor(private readonly ctx: CheckContext) {
    this.factors = new FarmFactors(ctx);
  }

  header(n: number) {
    const ctx = this.ctx;
    const hasItem = Boolean(ctx.mapping.item);
    const hasQty = Boolean(ctx.mapping.quantity);
    if (hasItem !== hasQty) {
      ctx.error(n, null, hasItem ? 'no column is mapped to quantity (Quantity): an item needs its quantity' : 'no column is mapped to item (Item): a quantity needs its item');
      ctx.blockRows();
    }
    if (!hasItem && !hasQty && !ctx.mapping.land_ha) {
      ctx.error(n, null, 'map item and quantity, or land_ha: the file has nothing to import');
      ctx.blockRows();
    }
    this.headerUnit = ctx.unitFromHeader('quantity').unit;
    const landUnit = ctx.unitFromHeader('land_ha').unit;
    if (landUnit && !sameUnit(landUnit, 'ha')) ctx.error(n, ctx.columnOf('land_ha'), `land is recorded in ha, not ${quote(landUnit)}`);
  }

  row(n: number, raw: string[]) {
    const ctx = this.ctx;
    const farm = ctx.required(n, 'farm', ctx.text(raw, 'farm'), ctx.farm);
    const season = ctx.seasonOf(n, ctx.text(raw, 'season'));
    const itemText = ctx.text(raw, 'item');
    const qtyText = ctx.text(raw, 'quantity');
    const landText = ctx.text(raw, 'land_ha') ?? '';
    let item: Item | null = null;
    let quantity: number | null = null;
    const landOnly = (itemText ?? '') === '' && (qtyText ?? '') === '' && landText !== '';
    if (itemText !== undefined && !landOnly) {
      item = ctx.required(n, 'item', itemText, ctx.item);
      if (qtyText === '') ctx.error(n, ctx.columnOf('quantity'), 'empty cell: quantity is required');
      else if (qtyText !== undefined) quantity = ctx.numberIn(n, ctx.columnOf('quantity'), qtyText, 'quantity');
      if (item) ctx.checkUnit(n, item, this.headerUnit, ctx.text(raw, 'unit') || undefined, 'quantity');
    }
    const land = landText === '' ? null : ctx.numberIn(n, ctx.columnOf('land_ha'), landText, 'land');
    if ((itemText ?? '') === '' && (qtyText ?? '') === '' && landText === '') ctx.error(n, null, 'the row has no item, quantity or land_ha');
    const repeated = Boolean(farm && season && item) && !ctx.firstTime(`${farm!.id}|${season!.id}|${item!.id}`, n, 'farm, season and item');
    if (ctx.rowHasError || repeated || !farm || !season) return;
    if (item && quantity !== null) {
      ctx.writes.records.push({ row: n, farmId: farm.id, seasonId: season.id, itemId: item.id, quantity });
      checkQuantity(ctx, n, farm, season.id, item, quantity, land, ctx.columnOf('quantity'));
    }
    if (land !== null) this.factors.add(n, farm.id, season.id, 'land_ha', land, ctx.columnOf('land_ha'));
  }
}
