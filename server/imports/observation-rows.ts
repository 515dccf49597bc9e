/**
 * Observation files, the fit command's wide layout (docs/fit-command.md §2): season, farm,
 * price:<item>, output:<item> or input:<item>, fixed:<name>. Quantities and fixed factors become farm
 * records and farm_season_factors. Prices are co-op level: one price per item and season, stored at
 * one delivery point (the one chosen, else DEFAULT_DELIVERY_POINT), dated the season's first day,
 * in the co-op's currency; where farm rows of a season disagree the stored price is their mean,
 * and a note says so. Empty cells are "not recorded" and write nothing.
 */
import type { RecordWrite } from './import-types.js';
import { FACTOR_NAME, fixedFactorName, normalHeader } from './import-fields.js';
import { quote, unescapeFormula } from '../../shared/cell-parsers.js';
import { headerParts, sameUnit } from '../../shared/unit-names.js';
import { checkQuantity, FarmFactors } from './farm-figures.js';
import { fmt, MAX_SOURCE_CHARS, type CheckContext, type DeliveryPointRef, type Item, type RowChecker } from './row-checker.js';

/** Where co-op level prices of an observation file go unless the planner names another point. */
export const DEFAULT_DELIVERY_POINT = 'Co-op input depot';

interface PriceSum {
  itemId: number;
  seasonId: number;
  sum: number;
  n: number;
  min: number;
  max: number;
  row: number;
}

export class ObservationRows implements RowChecker {
  private readonly factors: FarmFactors;
  /** Where the file's prices are stored: the point chosen for the file, else DEFAULT_DELIVERY_POINT once a price column is seen. */
  private dp: DeliveryPointRef | null;
  private priceCols: { col: number; item: Item }[] = [];
  private qtyCols: { col: number; item: Item }[] = [];
  private fixedCols: { col: number; factor: string }[] = [];
  private readonly priceSums = new Map<string, PriceSum>();

  constructor(private readonly ctx: CheckContext) {
    this.factors = new FarmFactors(ctx);
    this.dp = ctx.chosenDeliveryPoint;
  }

  header(n: number) {
    const ctx = this.ctx;
    const mappedColumns = new Set(Object.values(ctx.mapping));
    for (const [field, source] of Object.entries(ctx.mapping)) {
      const i = ctx.col.get(field)!;
      const m = /^(price|output|input|fixed):(.+)$/.exec(field);
      if (!m) continue;
      const { unit, currency } = headerParts(source);
      if (m[1] === 'price' && currency && currency !== ctx.lookups.currency) {
        ctx.error(n, source, `the column is in ${currency}; an observation file's prices are stored in the co-op's currency, ${ctx.lookups.currency}`);
      }
      if (m[1] === 'fixed') {
        if (m[2] === 'land_ha' && unit && !sameUnit(unit, 'ha')) ctx.error(n, source, `land is recorded in ha, not ${quote(unit)}`);
        this.fixedCols.push({ col: i, factor: m[2] });
        continue;
      }
      const item = ctx.lookups.items.find((it) => it.code === m[2])!;
      if (unit && !sameUnit(unit, item.unit)) ctx.error(n, source, `the column's unit ${quote(unit)} is not ${item.code}'s unit ${quote(item.unit)}`);
      if (m[1] === 'price') this.priceCols.push({ col: i, item });
      else this.qtyCols.push({ col: i, item });
    }
    // Columns in the layout's own form that name nothing known are errors, not silently dropped; a
    // known one left unmapped (the planner's choice) is only ignored.
    ctx.columns.forEach((c) => {
      if (mappedColumns.has(c)) return;
      const m = /^(price|output|input|fixed):(.*)$/.exec(normalHeader(c));
      if (!m) return;
      if (m[1] === 'fixed') {
        if (!FACTOR_NAME.test(fixedFactorName(m[2]))) ctx.error(n, c, `${quote(m[2])} is not a factor name: use letters, digits and _ (e.g. fixed:land_ha)`);
        return;
      }
      const item = ctx.item(m[2]);
      if (!item.ok) ctx.error(n, c, item.message);
      else if (m[1] !== 'price' && m[1] !== item.value.role) ctx.error(n, c, `${item.value.code} is an ${item.value.role}: name the column ${item.value.role}:${item.value.code}`);
    });
    if (!this.priceCols.length && !this.qtyCols.length && !this.fixedCols.length) {
      ctx.error(n, null, 'no price:, output:, input: or fixed: column: the file has nothing to import');
      ctx.blockRows();
    }
    if (this.priceCols.length) {
      const dp = this.dp ?? ctx.deliveryPointNamed(DEFAULT_DELIVERY_POINT);
      if (!dp) {
        ctx.error(n, null, `there is no delivery point ${quote(DEFAULT_DELIVERY_POINT)} for the prices; choose one for the whole file`);
        ctx.blockRows();
      } else {
        this.dp = dp;
        ctx.note(`Prices are stored as co-op prices at ${dp.name}, dated the first day of their season, in ${ctx.lookups.currency}.`);
      }
    }
  }

  row(n: number, raw: string[]) {
    const ctx = this.ctx;
    const season = ctx.seasonOf(n, ctx.text(raw, 'season'));
    const farmText = ctx.text(raw, 'farm') ?? '';
    const farm = farmText === '' ? null : ctx.required(n, 'farm', farmText, ctx.farm);
    const prices: { item: Item; value: number }[] = [];
    const quantities: { item: Item; value: number; column: string }[] = [];
    const fixed: { factor: string; value: number; column: string }[] = [];
    for (const { col, item } of this.priceCols) {
      const s = cellAt(raw, col);
      const v = s === '' ? null : ctx.numberIn(n, ctx.columns[col], s, 'price');
      if (v !== null) prices.push({ item, value: v });
    }
    for (const { col, item } of this.qtyCols) {
      const s = this.farmCell(n, raw, col, farmText, 'quantity');
      const v = s === null ? null : ctx.numberIn(n, ctx.columns[col], s, 'quantity');
      if (v !== null) quantities.push({ item, value: v, column: ctx.columns[col] });
    }
    for (const { col, factor } of this.fixedCols) {
      const s = this.farmCell(n, raw, col, farmText, 'fixed factor');
      const v = s === null ? null : ctx.numberIn(n, ctx.columns[col], s, factor === 'land_ha' ? 'land' : 'factor');
      if (v !== null) fixed.push({ factor, value: v, column: ctx.columns[col] });
    }
    const keyed = Boolean(season) && (farmText === '' || Boolean(farm));
    const repeated = keyed && !ctx.firstTime(`${farm?.id ?? '-'}|${season!.id}`, n, farm ? 'farm and season' : 'season, with no farm');
    if (ctx.rowHasError || repeated || !season || (farmText !== '' && !farm)) return;
    for (const p of prices) {
      const key = `${p.item.id}|${season.id}`;
      const acc = this.priceSums.get(key);
      if (acc) {
        acc.sum += p.value;
        acc.n++;
        acc.min = Math.min(acc.min, p.value);
        acc.max = Math.max(acc.max, p.value);
      } else this.priceSums.set(key, { itemId: p.item.id, seasonId: season.id, sum: p.value, n: 1, min: p.value, max: p.value, row: n });
    }
    if (farm) {
      const land = fixed.find((x) => x.factor === 'land_ha')?.value ?? null;
      for (const q of quantities) {
        ctx.writes.records.push({ row: n, farmId: farm.id, seasonId: season.id, itemId: q.item.id, quantity: q.value } satisfies RecordWrite);
        checkQuantity(ctx, n, farm, season.id, q.item, q.value, land, q.column);
      }
      for (const x of fixed) this.factors.add(n, farm.id, season.id, x.factor, x.value, x.column);
    }
  }

  /** A quantity's or fixed factor's cell: null when empty, or (with an error) when the row names no farm. */
  private farmCell(n: number, raw: string[], col: number, farmText: string, what: 'quantity' | 'fixed factor'): string | null {
    const s = cellAt(raw, col);
    if (s === '') return null;
    if (farmText === '') {
      this.ctx.error(n, this.ctx.columns[col], `a ${what} needs a farm: this row has no farm`);
      return null;
    }
    return s;
  }

  /** Each item's co-op price per season: the mean of the season's rows, with a note where they disagree. */
  finish() {
    const dp = this.dp;
    if (!dp) return;
    const ctx = this.ctx;
    const seasonById = new Map(ctx.lookups.seasons.map((s) => [s.id, s]));
    const spread = new Map<number, { seasons: number; widest: { min: number; max: number; season: string } | null }>();
    for (const acc of this.priceSums.values()) {
      const season = seasonById.get(acc.seasonId)!;
      ctx.writes.prices.push({
        row: acc.row,
        itemId: acc.itemId,
        seasonId: acc.seasonId,
        deliveryPointId: dp.id,
        price: acc.sum / acc.n,
        currency: ctx.lookups.currency,
        source: `Observation import: ${ctx.options.fileName}`.slice(0, MAX_SOURCE_CHARS),
        observedOn: season.startsOn,
      });
      if (acc.max > acc.min) {
        const s = spread.get(acc.itemId) ?? { seasons: 0, widest: null };
        s.seasons++;
        if (!s.widest || acc.max - acc.min > s.widest.max - s.widest.min) s.widest = { min: acc.min, max: acc.max, season: season.label };
        spread.set(acc.itemId, s);
      }
    }
    for (const [itemId, s] of spread) {
      const code = ctx.lookups.items.find((i) => i.id === itemId)!.code;
      ctx.note(`price:${code}: the rows of ${s.seasons} season(s) disagree; each season's co-op price is the mean of its rows (widest: ${fmt(s.widest!.min)} to ${fmt(s.widest!.max)} in ${s.widest!.season}).`);
    }
  }
}

/** A cell by column index, trimmed, formula escape removed. */
function cellAt(raw: string[], col: number): string {
  return unescapeFormula((raw[col] ?? '').trim());
}
