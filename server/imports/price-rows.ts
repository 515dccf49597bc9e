/**
 * Price files: item, season, delivery_point, price, unit, currency, source, observed_on (the columns
 * of shared/price-columns.ts), one row per price observation; natural key item + season + delivery
 * point + observed date.
 */
import type { PriceWrite } from './import-types.js';
import { parseCurrency, parseIsoDate, quote } from '../../shared/cell-parsers.js';
import { historyAt, implausiblePrice } from '../../shared/plausibility.js';
import { priceUnitParts } from '../../shared/unit-names.js';
import { MAX_SOURCE_CHARS, type CheckContext, type RowChecker } from './row-checker.js';

export class PriceRows implements RowChecker {
  private readonly defaultSource: string;
  private headerUnit: string | null = null;
  private headerCurrency: string | null = null;

  constructor(private readonly ctx: CheckContext) {
    this.defaultSource = `Import of ${ctx.options.fileName}`.slice(0, MAX_SOURCE_CHARS);
  }

  header() {
    const { unit, currency } = this.ctx.unitFromHeader('price');
    this.headerUnit = unit;
    this.headerCurrency = currency;
  }

  row(n: number, raw: string[]) {
    const ctx = this.ctx;
    const item = ctx.required(n, 'item', ctx.text(raw, 'item'), ctx.item);
    const season = ctx.seasonOf(n, ctx.text(raw, 'season'));
    const dpText = ctx.text(raw, 'delivery_point');
    const chosenDp = ctx.chosenDeliveryPoint;
    const dp = dpText === undefined || (dpText === '' && chosenDp) ? chosenDp : ctx.required(n, 'delivery_point', dpText, ctx.deliveryPoint);
    const priceText = ctx.text(raw, 'price') ?? '';
    const price = priceText === '' ? (ctx.error(n, ctx.columnOf('price'), 'empty cell: price is required'), null) : ctx.numberIn(n, ctx.columnOf('price'), priceText, 'price');
    const observedOn = ctx.required(n, 'observed_on', ctx.text(raw, 'observed_on'), (s) => ctx.cached('date', s, () => parseIsoDate(s)));
    const unitText = ctx.text(raw, 'unit');
    if (item) ctx.checkUnit(n, item, this.headerUnit, unitText || undefined, 'price');
    // "EUR/t", as the prices grid shows the unit, names the currency as well.
    const unitCurrency = unitText ? priceUnitParts(unitText).currency : null;
    const fileCurrency = this.headerCurrency ?? unitCurrency;
    if (this.headerCurrency && unitCurrency && unitCurrency !== this.headerCurrency) {
      ctx.error(n, ctx.columnOf('unit'), `${unitCurrency} differs from the currency in the column ${quote(ctx.columnOf('price'))} (${this.headerCurrency})`);
    }
    let currency = fileCurrency ?? ctx.lookups.currency;
    const currencyText = ctx.text(raw, 'currency');
    if (currencyText) {
      const c = ctx.cached('currency', currencyText, () => parseCurrency(currencyText));
      if (!c.ok) ctx.error(n, ctx.columnOf('currency'), c.message);
      else if (fileCurrency && c.value !== fileCurrency) {
        const where = this.headerCurrency ? `the column ${quote(ctx.columnOf('price'))}` : `the unit ${quote(unitText ?? '')}`;
        ctx.error(n, ctx.columnOf('currency'), `${c.value} differs from the currency in ${where} (${fileCurrency})`);
      } else currency = c.value;
    }
    let source = ctx.text(raw, 'source') || this.defaultSource;
    if (source.length > MAX_SOURCE_CHARS) {
      ctx.error(n, ctx.columnOf('source'), `the source is ${source.length} characters long; at most ${MAX_SOURCE_CHARS} are kept`);
      source = '';
    }
    // A repeated row is named even when the row (or the one it repeats) has other problems, so one
    // pass lists every problem of the file.
    const key = item && season && dp && observedOn ? `${item.id}|${season.id}|${dp.id}|${observedOn}` : null;
    const repeated = key !== null && !ctx.firstTime(key, n, 'item, season, delivery point and observed date');
    if (ctx.rowHasError || repeated || !item || !season || !dp || price === null || !observedOn) return;
    const doubt = implausiblePrice(price, item, currency, historyAt(ctx.lookups.priceHistory?.[item.id], season.startYear));
    if (doubt) ctx.warning(n, ctx.columnOf('price'), doubt);
    const w: PriceWrite = { row: n, itemId: item.id, seasonId: season.id, deliveryPointId: dp.id, price, currency, source, observedOn };
    ctx.writes.prices.push(w);
  }
}
