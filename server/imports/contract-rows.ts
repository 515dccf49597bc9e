/**
 * Forward delivery contract files (issue 19): reference (the contract number, the natural key), farm,
 * season, item (an output), quantity, price (stored in cents), currency, delivery_from, delivery_to
 * (months) and status, one row per contract.
 */
import { parseCurrency, quote } from '../../shared/cell-parsers.js';
import { CONTRACT_STATUSES, MONTH_PATTERN, priceToCents, MINOR_PER_MAJOR, type ContractStatus } from '../../shared/contract-schemas.js';
import { TEXT_MAX } from '../../shared/field-limits.js';
import type { CheckContext, RowChecker } from './row-checker.js';

const STATUS_NOTE = 'Contracts without a status are stored as signed.';
const MAX_REFERENCE_CHARS = TEXT_MAX.contractReference;

export class ContractRows implements RowChecker {
  private headerUnit: string | null = null;
  private headerCurrency: string | null = null;

  constructor(private readonly ctx: CheckContext) {}

  header() {
    const price = this.ctx.unitFromHeader('price');
    this.headerCurrency = price.currency;
    this.headerUnit = this.ctx.unitFromHeader('quantity').unit ?? price.unit;
    if (!this.ctx.mapping.status) this.ctx.note(STATUS_NOTE);
  }

  /** A delivery contract: its number, an output item of a farm and season, quantity, price in cents, window and status. */
  row(n: number, raw: string[]) {
    const ctx = this.ctx;
    const refText = ctx.text(raw, 'reference') ?? '';
    let reference: string | null = refText;
    if (refText === '') reference = (ctx.error(n, ctx.columnOf('reference'), 'empty cell: the contract number is required'), null);
    else if (refText.length > MAX_REFERENCE_CHARS) {
      reference = (ctx.error(n, ctx.columnOf('reference'), `the contract number is ${refText.length} characters long; at most ${MAX_REFERENCE_CHARS} are kept`), null);
    }
    const farm = ctx.required(n, 'farm', ctx.text(raw, 'farm'), ctx.farm);
    const season = ctx.seasonOf(n, ctx.text(raw, 'season'));
    const item = ctx.required(n, 'item', ctx.text(raw, 'item'), ctx.item);
    if (item && item.role !== 'output') ctx.error(n, ctx.columnOf('item'), `${item.code} is an input; a contract commits an output`);
    else if (item) ctx.checkUnit(n, item, this.headerUnit, undefined, 'quantity');
    const qtyText = ctx.text(raw, 'quantity') ?? '';
    let quantity = qtyText === '' ? (ctx.error(n, ctx.columnOf('quantity'), 'empty cell: quantity is required'), null) : ctx.numberIn(n, ctx.columnOf('quantity'), qtyText, 'contractQuantity');
    if (quantity === 0) quantity = (ctx.error(n, ctx.columnOf('quantity'), 'a contract commits more than 0'), null);
    const priceText = ctx.text(raw, 'price') ?? '';
    let price = priceText === '' ? (ctx.error(n, ctx.columnOf('price'), 'empty cell: the contract price is required'), null) : ctx.numberIn(n, ctx.columnOf('price'), priceText, 'contractPrice');
    if (price !== null && Math.abs(priceToCents(price) - price * MINOR_PER_MAJOR) > 1e-6) price = (ctx.error(n, ctx.columnOf('price'), `${quote(priceText)} has more than two decimals (cents)`), null);
    let currency = this.headerCurrency ?? ctx.lookups.currency;
    const currencyText = ctx.text(raw, 'currency');
    if (currencyText) {
      const c = ctx.cached('currency', currencyText, () => parseCurrency(currencyText));
      if (!c.ok) ctx.error(n, ctx.columnOf('currency'), c.message);
      else if (this.headerCurrency && c.value !== this.headerCurrency) ctx.error(n, ctx.columnOf('currency'), `${c.value} differs from the currency in the column ${quote(ctx.columnOf('price'))} (${this.headerCurrency})`);
      else currency = c.value;
    }
    const month = (field: 'delivery_from' | 'delivery_to'): string | null => {
      const s = ctx.text(raw, field) ?? '';
      const label = field === 'delivery_from' ? 'first delivery month' : 'last delivery month';
      if (s === '') return ctx.error(n, ctx.columnOf(field), `empty cell: the ${label} is required`), null;
      // 2026-08, or a date in that month (2026-08-01).
      const m = /^(\d{4}-\d{2})(-\d{2})?$/.exec(s);
      if (!m || !MONTH_PATTERN.test(m[1])) return ctx.error(n, ctx.columnOf(field), `${quote(s)} is not a month: write the ${label} as YYYY-MM, e.g. 2026-08`), null;
      return m[1];
    };
    const from = month('delivery_from');
    const to = month('delivery_to');
    if (from && to && from > to) ctx.error(n, ctx.columnOf('delivery_to'), `the last delivery month ${to} is before the first, ${from}`);
    const statusText = (ctx.text(raw, 'status') ?? '').toLowerCase();
    let status: ContractStatus | null = 'signed';
    if (statusText === '' && ctx.mapping.status) ctx.note(STATUS_NOTE);
    if (statusText !== '') {
      status = (CONTRACT_STATUSES as readonly string[]).includes(statusText) ? (statusText as ContractStatus) : null;
      if (!status) ctx.error(n, ctx.columnOf('status'), `unknown status ${quote(statusText)} (statuses: ${CONTRACT_STATUSES.join(', ')})`);
    }
    const repeated = reference !== null && !ctx.firstTime(`contract|${reference.toLowerCase()}`, n, 'contract number');
    if (ctx.rowHasError || repeated || reference === null || !farm || !season || !item || quantity === null || price === null || !from || !to || !status) return;
    ctx.writes.contracts.push({ row: n, reference, farmId: farm.id, seasonId: season.id, itemId: item.id, quantity, priceCents: priceToCents(price), currency, deliveryFrom: from, deliveryTo: to, status });
  }
}
