/**
 * Checks an uploaded file against the reference data and turns it into rows for the database, listing
 * every bad cell (row as the spreadsheet shows it, column as headed, what is wrong). Nothing here
 * touches the database: the lookups come in, the rows to write go out, so it runs in a worker thread.
 *
 * Kinds:
 * - prices: item, season, delivery_point, price, unit, currency, source, observed_on (one row per
 *   price observation; natural key item + season + delivery point + observed date).
 * - records: farm, season, item, quantity, unit, land_ha (one row per farm, season and item; land_ha,
 *   repeated on the farm's rows of a season, goes to farm_season_factors; a row may carry land only).
 * - observations: the fit command's wide layout (docs/fit-command.md §2): season, farm,
 *   price:<item>, output:<item> or input:<item>, fixed:<name>. Quantities and fixed factors become farm
 *   records and farm_season_factors. Prices are co-op level: one price per item and season, stored at
 *   one delivery point (the one chosen, else DEFAULT_DELIVERY_POINT), dated the season's first day,
 *   in the co-op's currency; where farm rows of a season disagree the stored price is their mean,
 *   and a note says so. Empty cells are "not recorded" and write nothing.
 */
import type {
  FactorWrite,
  ImportError,
  Lookups,
  PreviewRow,
  PriceWrite,
  RecordWrite,
  ValidationOptions,
  ValidationOutcome,
} from './import-types.js';
import { ImportFileError } from './import-file-error.js';
import { IMPORT_LIMITS, type ImportLimits } from './import-limits.js';
import { columnLetter, FACTOR_NAME, fieldsFor, fixedFactorName, normalHeader, suggestMapping, type FieldDef } from './import-fields.js';
import { markName, parseCurrency, parseIsoDate, parseNumber, parseSeason, quote, unescapeFormula, type DecimalMark, type Parsed, type SeasonRef } from '../../shared/cell-parsers.js';
import { historyAt, implausiblePrice, implausibleQuantity } from '../../shared/plausibility.js';
import { headerParts, priceUnitParts, sameUnit } from '../../shared/unit-names.js';
import { readTable, type TableMeta, type TableSink } from './table-reader.js';
import { newBuiltWrites } from './packed-rows.js';
import { CONTRACT_STATUSES, MONTH_PATTERN, priceToCents, MINOR_PER_MAJOR, type ContractStatus } from '../../shared/contract-schemas.js';

/** Where co-op level prices of an observation file go unless the planner names another point. */
export const DEFAULT_DELIVERY_POINT = 'Co-op input depot';

/** Largest values kept, as in the data desk's own forms (shared/data-schemas.ts). */
const MAX_PRICE = 1e9;
const STATUS_NOTE = 'Contracts without a status are stored as signed.';
const MAX_QUANTITY = 1e12;
const MAX_LAND_HA = 1e6;
const MAX_SOURCE_CHARS = 200;
const PREVIEW_CELL_CHARS = 200;

type Item = Lookups['items'][number];
type Season = Lookups['seasons'][number];

const fmt = (n: number) => n.toLocaleString('en-GB', { maximumFractionDigits: 6 });

class Validator implements TableSink {
  private headerRow: number | null = null;
  private columns: string[] = [];
  private fields: FieldDef[] = [];
  private suggested: Record<string, string> = {};
  private mapping: Record<string, string> = {};
  /** Column index of each mapped field. */
  private col = new Map<string, number>();
  private dataRows = 0;
  private validRows = 0;
  private errorCount = 0;
  private errors: ImportError[] = [];
  private warningCount = 0;
  private warnings: ImportError[] = [];
  /** Seasons the file names that are well-formed but not set up yet, with the first row naming each. */
  private readonly unknownSeasons = new Map<number, { label: string; startYear: number; row: number; rows: number }>();
  private readonly mark: DecimalMark;
  private rowHasError = false;
  /** The row the reader reported a problem for (before handing it over). */
  private problemRow: number | null = null;
  private preview: PreviewRow[] = [];
  private notes: string[] = [];
  private headerBlocksRows = false;
  private readonly writes = newBuiltWrites();

  // Lookups, by the spellings a file may use.
  private readonly itemByKey = new Map<string, Item>();
  private readonly seasonByLabel = new Map<string, SeasonRef>();
  private readonly seasonByYear = new Map<number, SeasonRef>();
  private readonly seasonById = new Map<number, Season>();
  private readonly farmByCode = new Map<string, { id: number; code: string }>();
  private readonly dpByName = new Map<string, { id: number; name: string }>();
  private readonly caches = new Map<string, Map<string, Parsed<unknown>>>();
  private readonly unitChecks = new Map<string, boolean>();

  // Per-kind state.
  private defaultDp: { id: number; name: string } | null = null;
  private readonly defaultSource: string;
  private headerCurrency: string | null = null;
  private headerUnit: string | null = null;
  private readonly seen = new Map<string, number>();
  private readonly land = new Map<string, { row: number; value: number }>();
  private readonly priceSums = new Map<string, { itemId: number; seasonId: number; sum: number; n: number; min: number; max: number; row: number }>();
  private wide: { priceCols: { col: number; item: Item }[]; qtyCols: { col: number; item: Item }[]; fixedCols: { col: number; factor: string }[] } | null = null;

  constructor(
    private readonly options: ValidationOptions,
    private readonly lookups: Lookups,
    private readonly limits: ImportLimits,
  ) {
    for (const it of lookups.items) {
      this.itemByKey.set(it.code.toLowerCase(), it);
      if (!this.itemByKey.has(it.name.toLowerCase())) this.itemByKey.set(it.name.toLowerCase(), it);
    }
    for (const s of lookups.seasons) {
      const ref = { id: s.id, label: s.label, startYear: s.startYear };
      this.seasonByLabel.set(s.label.toLowerCase(), ref);
      this.seasonByYear.set(s.startYear, ref);
      this.seasonById.set(s.id, s);
    }
    for (const fm of lookups.farms) this.farmByCode.set(fm.code.toUpperCase(), fm);
    for (const dp of lookups.deliveryPoints) this.dpByName.set(normalName(dp.name), dp);
    this.defaultSource = `Import of ${options.fileName}`.slice(0, MAX_SOURCE_CHARS);
    this.mark = options.decimalMark ?? lookups.decimalMark ?? 'point';
    if (options.deliveryPoint !== undefined) {
      const dp = this.dpByName.get(normalName(options.deliveryPoint));
      if (!dp) {
        throw new ImportFileError(400, 'invalid', `There is no delivery point ${quote(options.deliveryPoint)}`, [
          { path: 'body.deliveryPoint', message: `Unknown delivery point; choose one of: ${lookups.deliveryPoints.map((d) => d.name).join(', ')}` },
        ]);
      }
      this.defaultDp = dp;
    }
  }

  // --- errors -------------------------------------------------------------------------------------

  private error(row: number | null, column: string | null, message: string) {
    this.errorCount++;
    if (row !== null && row !== this.headerRow) this.rowHasError = true;
    if (this.errors.length < this.limits.maxListedErrors) this.errors.push({ row, column, message });
  }

  /** A value that may be right but is asked about: the commit needs the planner to accept the warnings. */
  private warning(row: number, column: string | null, message: string) {
    this.warningCount++;
    if (this.warnings.length < this.limits.maxListedErrors) this.warnings.push({ row, column, message });
  }

  problem(e: ImportError) {
    this.problemRow = e.row;
    this.error(e.row, e.column, e.message);
  }

  // --- the header ---------------------------------------------------------------------------------

  row(n: number, raw: string[]) {
    if (this.headerRow === null) {
      if (raw.every((c) => c.trim() === '')) {
        this.rowHasError = false;
        return;
      }
      this.setHeader(n, raw);
      return;
    }
    // A blank row is skipped, unless the reader found something wrong in it (an unclosed quote).
    if (raw.every((c) => c.trim() === '') && this.problemRow !== n) return;
    this.dataRows++;
    if (this.dataRows > this.limits.maxRows) {
      throw new ImportFileError(
        422,
        'too_many_rows',
        `The file has more than ${this.limits.maxRows.toLocaleString('en-GB')} data rows; split it into files of at most ${this.limits.maxRows.toLocaleString('en-GB')} rows`,
      );
    }
    if (this.preview.length < this.limits.previewRows) {
      this.preview.push({ row: n, cells: this.columns.map((_, i) => (raw[i] ?? '').slice(0, PREVIEW_CELL_CHARS)) });
    }
    if (raw.length > this.columns.length && raw.slice(this.columns.length).some((c) => c.trim() !== '')) {
      this.error(n, null, `the row has ${raw.length} cells but the header has ${this.columns.length} (is a comma used as the decimal mark, or a cell with a comma not quoted?)`);
    }
    if (!this.headerBlocksRows) {
      if (this.options.kind === 'prices') this.priceRow(n, raw);
      else if (this.options.kind === 'records') this.recordRow(n, raw);
      else if (this.options.kind === 'contracts') this.contractRow(n, raw);
      else this.observationRow(n, raw);
    }
    // With a required column missing no row can be imported, so none counts as valid.
    if (!this.rowHasError && !this.headerBlocksRows) this.validRows++;
    this.rowHasError = false;
  }

  private setHeader(n: number, raw: string[]) {
    this.headerRow = n;
    let cells = raw.map((c) => c.replace(/^\uFEFF/, '').trim());
    while (cells.length && cells[cells.length - 1] === '') cells = cells.slice(0, -1);
    this.columns = cells.map((c, i) => c || `(column ${columnLetter(i)})`);
    const firstAt = new Map<string, number>();
    const duplicated = new Set<string>();
    this.columns.forEach((c, i) => {
      const key = c.toLowerCase();
      const first = firstAt.get(key);
      if (first === undefined) firstAt.set(key, i);
      else {
        duplicated.add(c);
        duplicated.add(this.columns[first]);
        this.error(n, c, `the column name appears twice (columns ${columnLetter(first)} and ${columnLetter(i)}); rename one`);
      }
    });
    this.fields = fieldsFor(this.options.kind, this.lookups, this.columns);
    const usable = (c: string) => !duplicated.has(c) && !c.startsWith('(column ');
    this.suggested = suggestMapping(this.fields, this.columns, usable);
    this.mapping = { ...this.suggested };
    this.applyOverrides(usable);
    this.columns.forEach((c, i) => {
      for (const [field, source] of Object.entries(this.mapping)) if (source === c) this.col.set(field, i);
    });
    for (const def of this.fields) {
      const optionalDp = def.field === 'delivery_point' && this.defaultDp;
      if (def.required && !this.mapping[def.field] && !optionalDp) {
        this.error(n, null, `no column is mapped to ${def.field} (${def.label})${def.field === 'delivery_point' ? '; map one or choose a delivery point for the whole file' : ''}`);
        this.headerBlocksRows = true;
      }
    }
    if (this.options.kind === 'prices') this.priceHeader();
    else if (this.options.kind === 'records') this.recordHeader(n);
    else if (this.options.kind === 'contracts') this.contractHeader();
    else this.observationHeader(n);
    this.rowHasError = false;
  }

  private applyOverrides(usable: (c: string) => boolean) {
    const overrides = this.options.mapping ?? {};
    const details: { path: string; message: string }[] = [];
    const known = new Set(this.fields.map((d) => d.field));
    for (const [field, source] of Object.entries(overrides)) {
      if (!known.has(field)) {
        const list = this.fields.map((d) => d.field);
        details.push({ path: `body.mapping.${field}`, message: `Unknown field for ${this.options.kind} imports; fields are ${list.slice(0, 20).join(', ')}${list.length > 20 ? ', ...' : ''}` });
        continue;
      }
      if (source === null || source === '') {
        delete this.mapping[field];
        continue;
      }
      if (!this.columns.includes(source)) {
        details.push({ path: `body.mapping.${field}`, message: `The file has no column ${quote(source)}` });
        continue;
      }
      if (!usable(source)) {
        details.push({ path: `body.mapping.${field}`, message: `The column ${quote(source)} cannot be mapped: its name is not unique` });
        continue;
      }
      this.mapping[field] = source;
    }
    // An explicit choice wins over a suggestion that took the same column.
    for (const [field, source] of Object.entries(this.mapping)) {
      if (overrides[field] === undefined && Object.entries(overrides).some(([f2, s2]) => f2 !== field && s2 === source)) delete this.mapping[field];
    }
    const byColumn = new Map<string, string>();
    for (const [field, source] of Object.entries(this.mapping)) {
      const other = byColumn.get(source);
      if (other) details.push({ path: `body.mapping.${field}`, message: `The column ${quote(source)} is already mapped to ${other}` });
      else byColumn.set(source, field);
    }
    if (details.length) throw new ImportFileError(400, 'invalid', `The column mapping is not valid: ${details.map((d) => `${d.path}: ${d.message}`).join('; ')}`, details);
  }

  private columnOf(field: string): string {
    return this.mapping[field] ?? field;
  }

  private unitFromHeader(field: string): { unit: string | null; currency: string | null } {
    const source = this.mapping[field];
    if (!source) return { unit: null, currency: null };
    const parts = headerParts(source);
    return { unit: parts.unit, currency: parts.currency };
  }

  private priceHeader() {
    const { unit, currency } = this.unitFromHeader('price');
    this.headerUnit = unit;
    this.headerCurrency = currency;
  }

  private recordHeader(n: number) {
    const hasItem = Boolean(this.mapping.item);
    const hasQty = Boolean(this.mapping.quantity);
    if (hasItem !== hasQty) {
      this.error(n, null, hasItem ? 'no column is mapped to quantity (Quantity): an item needs its quantity' : 'no column is mapped to item (Item): a quantity needs its item');
      this.headerBlocksRows = true;
    }
    if (!hasItem && !hasQty && !this.mapping.land_ha) {
      this.error(n, null, 'map item and quantity, or land_ha: the file has nothing to import');
      this.headerBlocksRows = true;
    }
    this.headerUnit = this.unitFromHeader('quantity').unit;
    const landUnit = this.unitFromHeader('land_ha').unit;
    if (landUnit && !sameUnit(landUnit, 'ha')) this.error(n, this.columnOf('land_ha'), `land is recorded in ha, not ${quote(landUnit)}`);
  }

  private observationHeader(n: number) {
    const priceCols: { col: number; item: Item }[] = [];
    const qtyCols: { col: number; item: Item }[] = [];
    const fixedCols: { col: number; factor: string }[] = [];
    const itemList = this.lookups.items.map((i) => i.code).join(', ');
    const mappedColumns = new Set(Object.values(this.mapping));
    for (const [field, source] of Object.entries(this.mapping)) {
      const i = this.col.get(field)!;
      const m = /^(price|output|input|fixed):(.+)$/.exec(field);
      if (!m) continue;
      const { unit, currency } = headerParts(source);
      if (m[1] === 'price' && currency && currency !== this.lookups.currency) {
        this.error(n, source, `the column is in ${currency}; an observation file's prices are stored in the co-op's currency, ${this.lookups.currency}`);
      }
      if (m[1] === 'fixed') {
        if (m[2] === 'land_ha' && unit && !sameUnit(unit, 'ha')) this.error(n, source, `land is recorded in ha, not ${quote(unit)}`);
        fixedCols.push({ col: i, factor: m[2] });
        continue;
      }
      const item = this.lookups.items.find((it) => it.code === m[2])!;
      if (unit && !sameUnit(unit, item.unit)) this.error(n, source, `the column's unit ${quote(unit)} is not ${item.code}'s unit ${quote(item.unit)}`);
      if (m[1] === 'price') priceCols.push({ col: i, item });
      else qtyCols.push({ col: i, item });
    }
    // Columns in the layout's own form that name nothing known are errors, not silently dropped; a
    // known one left unmapped (the planner's choice) is only ignored.
    this.columns.forEach((c) => {
      if (mappedColumns.has(c)) return;
      const m = /^(price|output|input|fixed):(.*)$/.exec(normalHeader(c));
      if (!m) return;
      if (m[1] === 'fixed') {
        if (!FACTOR_NAME.test(fixedFactorName(m[2]))) this.error(n, c, `${quote(m[2])} is not a factor name: use letters, digits and _ (e.g. fixed:land_ha)`);
        return;
      }
      const item = this.itemByKey.get(m[2]);
      if (!item) this.error(n, c, `unknown item ${quote(m[2])} (items: ${itemList})`);
      else if (m[1] !== 'price' && m[1] !== item.role) this.error(n, c, `${item.code} is an ${item.role}: name the column ${item.role}:${item.code}`);
    });
    if (!priceCols.length && !qtyCols.length && !fixedCols.length) {
      this.error(n, null, 'no price:, output:, input: or fixed: column: the file has nothing to import');
      this.headerBlocksRows = true;
    }
    if (priceCols.length) {
      const dp = this.defaultDp ?? this.dpByName.get(normalName(DEFAULT_DELIVERY_POINT));
      if (!dp) {
        this.error(n, null, `there is no delivery point ${quote(DEFAULT_DELIVERY_POINT)} for the prices; choose one for the whole file`);
        this.headerBlocksRows = true;
      } else {
        this.defaultDp = dp;
        this.notes.push(`Prices are stored as co-op prices at ${dp.name}, dated the first day of their season, in ${this.lookups.currency}.`);
      }
    }
    this.wide = { priceCols, qtyCols, fixedCols };
  }

  // --- cells --------------------------------------------------------------------------------------

  private text(raw: string[], field: string): string | undefined {
    const i = this.col.get(field);
    if (i === undefined) return undefined;
    return unescapeFormula((raw[i] ?? '').trim());
  }

  /** Parses repeated cells (the same item, season or date on many rows) once. */
  private cached<T>(kind: string, s: string, parse: () => Parsed<T>): Parsed<T> {
    let cache = this.caches.get(kind);
    if (!cache) this.caches.set(kind, (cache = new Map()));
    let hit = cache.get(s) as Parsed<T> | undefined;
    if (!hit) {
      hit = parse();
      if (cache.size < 10_000) cache.set(s, hit);
    }
    return hit;
  }

  private unitMatches(unit: string, itemUnit: string): boolean {
    const key = `${unit}\u0000${itemUnit}`;
    let hit = this.unitChecks.get(key);
    if (hit === undefined) {
      hit = sameUnit(unit, itemUnit);
      if (this.unitChecks.size < 1000) this.unitChecks.set(key, hit);
    }
    return hit;
  }

  private required<T>(n: number, field: string, s: string | undefined, parse: (s: string) => Parsed<T>): T | null {
    if (s === undefined) return null;
    const label = this.fields.find((d) => d.field === field)?.label ?? field;
    if (s === '') {
      this.error(n, this.columnOf(field), `empty cell: ${label.toLowerCase()} is required`);
      return null;
    }
    const r = parse(s);
    if (!r.ok) {
      this.error(n, this.columnOf(field), r.message);
      return null;
    }
    return r.value;
  }

  private item = (s: string): Parsed<Item> =>
    this.cached('item', s, () => {
      const it = this.itemByKey.get(s.toLowerCase());
      return it ? { ok: true, value: it } : { ok: false, message: `unknown item ${quote(s)} (items: ${this.lookups.items.map((i) => i.code).join(', ')})` };
    });

  private season = (s: string): Parsed<SeasonRef> => this.cached('season', s, () => parseSeason(s, this.lookups.seasons, this.seasonByLabel, this.seasonByYear));

  /** The season of a row; a well-formed season that is not set up yet is remembered, to be offered for creation. */
  private seasonOf(n: number, s: string | undefined): SeasonRef | null {
    const season = this.required(n, 'season', s, this.season);
    if (season || !s) return season;
    const m = /^(\d{4})(?:\s*[/-]\s*(\d{2}|\d{4}))?$/.exec(s.trim());
    if (m && /^unknown season/.test((this.season(s) as { message: string }).message)) {
      const startYear = Number(m[1]);
      const known = this.unknownSeasons.get(startYear);
      if (known) known.rows++;
      else this.unknownSeasons.set(startYear, { label: `${startYear}/${String((startYear + 1) % 100).padStart(2, '0')}`, startYear, row: n, rows: 1 });
    }
    return null;
  }

  private farm = (s: string): Parsed<{ id: number; code: string }> =>
    this.cached('farm', s, () => {
      const fm = this.farmByCode.get(s.toUpperCase());
      return fm ? { ok: true, value: fm } : { ok: false, message: `unknown farm ${quote(s)}: no farm has this code` };
    });

  private deliveryPoint = (s: string): Parsed<{ id: number; name: string }> =>
    this.cached('dp', s, () => {
      const dp = this.dpByName.get(normalName(s));
      return dp
        ? { ok: true, value: dp }
        : { ok: false, message: `unknown delivery point ${quote(s)} (delivery points: ${this.lookups.deliveryPoints.map((d) => d.name).join(', ')})` };
    });

  private numberIn(n: number, column: string, s: string, rule: 'price' | 'quantity' | 'land' | 'factor'): number | null {
    const r = this.cached('number', s, () => parseNumber(s, this.mark));
    if (!r.ok) {
      this.error(n, column, r.message);
      return null;
    }
    const v = r.value;
    if (rule === 'price' && !(v > 0)) return this.error(n, column, `${quote(s)} is not a price: a price must be more than 0`), null;
    if (rule === 'price' && v > MAX_PRICE) return this.error(n, column, `${quote(s)} is larger than the largest price kept (${fmt(MAX_PRICE)})`), null;
    if (rule === 'quantity' && v < 0) {
      return this.error(n, column, `${quote(s)} is negative: quantities are 0 or more, inputs too (the column or the item says whether it is an input)`), null;
    }
    if (rule === 'quantity' && v > MAX_QUANTITY) return this.error(n, column, `${quote(s)} is larger than the largest quantity kept (${fmt(MAX_QUANTITY)})`), null;
    if (rule === 'land' && !(v > 0)) return this.error(n, column, `${quote(s)} is not an area: land must be more than 0 ha`), null;
    if (rule === 'land' && v > MAX_LAND_HA) return this.error(n, column, `${quote(s)} ha is more land than the server keeps for a farm (${fmt(MAX_LAND_HA)} ha)`), null;
    return v;
  }

  private checkUnit(n: number, item: Item, cellUnit: string | undefined, valueField: 'price' | 'quantity') {
    if (this.headerUnit && !this.unitMatches(this.headerUnit, item.unit)) {
      this.error(n, this.columnOf(valueField), `the column's unit ${quote(this.headerUnit)} is not ${item.code}'s unit ${quote(item.unit)}`);
    }
    if (cellUnit && !this.unitMatches(priceUnitParts(cellUnit).unit, item.unit)) {
      const per = valueField === 'price' ? `; ${item.code} prices are per ${item.unit}` : `; ${item.code} is recorded in ${item.unit}`;
      this.error(n, this.columnOf('unit'), `unit ${quote(cellUnit)} is not ${item.code}'s unit ${quote(item.unit)}${per}`);
    }
  }

  private firstTime(key: string, n: number, what: string): boolean {
    const first = this.seen.get(key);
    if (first !== undefined) {
      this.error(n, null, `the row repeats row ${first} (same ${what})`);
      return false;
    }
    this.seen.set(key, n);
    return true;
  }

  // --- rows ---------------------------------------------------------------------------------------

  private priceRow(n: number, raw: string[]) {
    const item = this.required(n, 'item', this.text(raw, 'item'), this.item);
    const season = this.seasonOf(n, this.text(raw, 'season'));
    const dpText = this.text(raw, 'delivery_point');
    const dp = dpText === undefined || (dpText === '' && this.defaultDp) ? this.defaultDp : this.required(n, 'delivery_point', dpText, this.deliveryPoint);
    const priceText = this.text(raw, 'price') ?? '';
    const price = priceText === '' ? (this.error(n, this.columnOf('price'), 'empty cell: price is required'), null) : this.numberIn(n, this.columnOf('price'), priceText, 'price');
    const observedOn = this.required(n, 'observed_on', this.text(raw, 'observed_on'), (s) => this.cached('date', s, () => parseIsoDate(s)));
    const unitText = this.text(raw, 'unit');
    if (item) this.checkUnit(n, item, unitText || undefined, 'price');
    // "EUR/t", as the prices grid shows the unit, names the currency as well.
    const unitCurrency = unitText ? priceUnitParts(unitText).currency : null;
    const fileCurrency = this.headerCurrency ?? unitCurrency;
    if (this.headerCurrency && unitCurrency && unitCurrency !== this.headerCurrency) {
      this.error(n, this.columnOf('unit'), `${unitCurrency} differs from the currency in the column ${quote(this.columnOf('price'))} (${this.headerCurrency})`);
    }
    let currency = fileCurrency ?? this.lookups.currency;
    const currencyText = this.text(raw, 'currency');
    if (currencyText) {
      const c = this.cached('currency', currencyText, () => parseCurrency(currencyText));
      if (!c.ok) this.error(n, this.columnOf('currency'), c.message);
      else if (fileCurrency && c.value !== fileCurrency) {
        const where = this.headerCurrency ? `the column ${quote(this.columnOf('price'))}` : `the unit ${quote(unitText ?? '')}`;
        this.error(n, this.columnOf('currency'), `${c.value} differs from the currency in ${where} (${fileCurrency})`);
      } else currency = c.value;
    }
    let source = this.text(raw, 'source') || this.defaultSource;
    if (source.length > MAX_SOURCE_CHARS) {
      this.error(n, this.columnOf('source'), `the source is ${source.length} characters long; at most ${MAX_SOURCE_CHARS} are kept`);
      source = '';
    }
    // A repeated row is named even when the row (or the one it repeats) has other problems, so one
    // pass lists every problem of the file.
    const key = item && season && dp && observedOn ? `${item.id}|${season.id}|${dp.id}|${observedOn}` : null;
    const repeated = key !== null && !this.firstTime(key, n, 'item, season, delivery point and observed date');
    if (this.rowHasError || repeated || !item || !season || !dp || price === null || !observedOn) return;
    const doubt = implausiblePrice(price, item, currency, historyAt(this.lookups.priceHistory?.[item.id], season.startYear));
    if (doubt) this.warning(n, this.columnOf('price'), doubt);
    const w: PriceWrite = { row: n, itemId: item.id, seasonId: season.id, deliveryPointId: dp.id, price, currency, source, observedOn };
    this.writes.prices.push(w);
  }

  private recordRow(n: number, raw: string[]) {
    const farm = this.required(n, 'farm', this.text(raw, 'farm'), this.farm);
    const season = this.seasonOf(n, this.text(raw, 'season'));
    const itemText = this.text(raw, 'item');
    const qtyText = this.text(raw, 'quantity');
    const landText = this.text(raw, 'land_ha') ?? '';
    let item: Item | null = null;
    let quantity: number | null = null;
    const landOnly = (itemText ?? '') === '' && (qtyText ?? '') === '' && landText !== '';
    if (itemText !== undefined && !landOnly) {
      item = this.required(n, 'item', itemText, this.item);
      if (qtyText === '') this.error(n, this.columnOf('quantity'), 'empty cell: quantity is required');
      else if (qtyText !== undefined) quantity = this.numberIn(n, this.columnOf('quantity'), qtyText, 'quantity');
      if (item) this.checkUnit(n, item, this.text(raw, 'unit') || undefined, 'quantity');
    }
    const land = landText === '' ? null : this.numberIn(n, this.columnOf('land_ha'), landText, 'land');
    if ((itemText ?? '') === '' && (qtyText ?? '') === '' && landText === '') this.error(n, null, 'the row has no item, quantity or land_ha');
    const repeated = Boolean(farm && season && item) && !this.firstTime(`${farm!.id}|${season!.id}|${item!.id}`, n, 'farm, season and item');
    if (this.rowHasError || repeated || !farm || !season) return;
    if (item && quantity !== null) {
      this.writes.records.push({ row: n, farmId: farm.id, seasonId: season.id, itemId: item.id, quantity });
      this.checkQuantity(n, farm, season.id, item, quantity, land);
    }
    if (land !== null) this.addFactor(n, farm.id, season.id, 'land_ha', land, this.columnOf('land_ha'));
  }

  private contractHeader() {
    const price = this.unitFromHeader('price');
    this.headerCurrency = price.currency;
    this.headerUnit = this.unitFromHeader('quantity').unit ?? price.unit;
    if (!this.mapping.status) this.notes.push(STATUS_NOTE);
  }

  /** A delivery contract: its number, an output item of a farm and season, quantity, price in cents, window and status. */
  private contractRow(n: number, raw: string[]) {
    const refText = this.text(raw, 'reference') ?? '';
    let reference: string | null = refText;
    if (refText === '') reference = (this.error(n, this.columnOf('reference'), 'empty cell: the contract number is required'), null);
    else if (refText.length > 40) reference = (this.error(n, this.columnOf('reference'), `the contract number is ${refText.length} characters long; at most 40 are kept`), null);
    const farm = this.required(n, 'farm', this.text(raw, 'farm'), this.farm);
    const season = this.seasonOf(n, this.text(raw, 'season'));
    const item = this.required(n, 'item', this.text(raw, 'item'), this.item);
    if (item && item.role !== 'output') this.error(n, this.columnOf('item'), `${item.code} is an input; a contract commits an output`);
    else if (item) this.checkUnit(n, item, undefined, 'quantity');
    const qtyText = this.text(raw, 'quantity') ?? '';
    let quantity = qtyText === '' ? (this.error(n, this.columnOf('quantity'), 'empty cell: quantity is required'), null) : this.numberIn(n, this.columnOf('quantity'), qtyText, 'quantity');
    if (quantity === 0) quantity = (this.error(n, this.columnOf('quantity'), 'a contract commits more than 0'), null);
    const priceText = this.text(raw, 'price') ?? '';
    let price = priceText === '' ? (this.error(n, this.columnOf('price'), 'empty cell: the contract price is required'), null) : this.numberIn(n, this.columnOf('price'), priceText, 'price');
    if (price !== null && Math.abs(priceToCents(price) - price * MINOR_PER_MAJOR) > 1e-6) price = (this.error(n, this.columnOf('price'), `${quote(priceText)} has more than two decimals (cents)`), null);
    let currency = this.headerCurrency ?? this.lookups.currency;
    const currencyText = this.text(raw, 'currency');
    if (currencyText) {
      const c = this.cached('currency', currencyText, () => parseCurrency(currencyText));
      if (!c.ok) this.error(n, this.columnOf('currency'), c.message);
      else if (this.headerCurrency && c.value !== this.headerCurrency) this.error(n, this.columnOf('currency'), `${c.value} differs from the currency in the column ${quote(this.columnOf('price'))} (${this.headerCurrency})`);
      else currency = c.value;
    }
    const month = (field: 'delivery_from' | 'delivery_to'): string | null => {
      const s = this.text(raw, field) ?? '';
      const label = field === 'delivery_from' ? 'first delivery month' : 'last delivery month';
      if (s === '') return this.error(n, this.columnOf(field), `empty cell: the ${label} is required`), null;
      // 2026-08, or a date in that month (2026-08-01).
      const m = /^(\d{4}-\d{2})(-\d{2})?$/.exec(s);
      if (!m || !MONTH_PATTERN.test(m[1])) return this.error(n, this.columnOf(field), `${quote(s)} is not a month: write the ${label} as YYYY-MM, e.g. 2026-08`), null;
      return m[1];
    };
    const from = month('delivery_from');
    const to = month('delivery_to');
    if (from && to && from > to) this.error(n, this.columnOf('delivery_to'), `the last delivery month ${to} is before the first, ${from}`);
    const statusText = (this.text(raw, 'status') ?? '').toLowerCase();
    let status: ContractStatus | null = 'signed';
    if (statusText === '' && this.mapping.status && !this.notes.includes(STATUS_NOTE)) this.notes.push(STATUS_NOTE);
    if (statusText !== '') {
      status = (CONTRACT_STATUSES as readonly string[]).includes(statusText) ? (statusText as ContractStatus) : null;
      if (!status) this.error(n, this.columnOf('status'), `unknown status ${quote(statusText)} (statuses: ${CONTRACT_STATUSES.join(', ')})`);
    }
    const repeated = reference !== null && !this.firstTime(`contract|${reference.toLowerCase()}`, n, 'contract number');
    if (this.rowHasError || repeated || reference === null || !farm || !season || !item || quantity === null || price === null || !from || !to || !status) return;
    this.writes.contracts.push({ row: n, reference, farmId: farm.id, seasonId: season.id, itemId: item.id, quantity, priceCents: priceToCents(price), currency, deliveryFrom: from, deliveryTo: to, status });
  }

  /** A warning (accepted before the commit) when the quantity is far from the farm's own history per hectare. */
  private checkQuantity(n: number, farm: { id: number; code: string }, seasonId: number, item: Item, quantity: number, rowLand: number | null, col?: number) {
    const land = rowLand ?? this.lookups.land?.[`${farm.id}|${seasonId}`] ?? null;
    const doubt = implausibleQuantity(quantity, land, item, farm.code, this.lookups.recordHistory?.[`${farm.id}|${item.id}`]);
    if (doubt) this.warning(n, col === undefined ? this.columnOf('quantity') : this.columns[col], doubt);
  }

  private addFactor(n: number, farmId: number, seasonId: number, factor: string, value: number, column: string) {
    const key = `${farmId}|${seasonId}|${factor}`;
    const before = this.land.get(key);
    if (before) {
      if (before.value !== value) this.error(n, column, `${fmt(value)} differs from ${fmt(before.value)} on row ${before.row} for the same farm and season`);
      return;
    }
    this.land.set(key, { row: n, value });
    const w: FactorWrite = { row: n, farmId, seasonId, factor, value };
    this.writes.factors.push(w);
  }

  private observationRow(n: number, raw: string[]) {
    const wide = this.wide!;
    const season = this.seasonOf(n, this.text(raw, 'season'));
    const farmText = this.text(raw, 'farm') ?? '';
    const farm = farmText === '' ? null : this.required(n, 'farm', farmText, this.farm);
    const prices: { item: Item; value: number }[] = [];
    const quantities: { item: Item; value: number }[] = [];
    const fixed: { factor: string; value: number; column: string }[] = [];
    for (const { col, item } of wide.priceCols) {
      const s = unescapeFormula((raw[col] ?? '').trim());
      if (s === '') continue;
      const v = this.numberIn(n, this.columns[col], s, 'price');
      if (v !== null) prices.push({ item, value: v });
    }
    for (const { col, item } of wide.qtyCols) {
      const s = unescapeFormula((raw[col] ?? '').trim());
      if (s === '') continue;
      if (farmText === '') {
        this.error(n, this.columns[col], 'a quantity needs a farm: this row has no farm');
        continue;
      }
      const v = this.numberIn(n, this.columns[col], s, 'quantity');
      if (v !== null) quantities.push({ item, value: v });
    }
    for (const { col, factor } of wide.fixedCols) {
      const s = unescapeFormula((raw[col] ?? '').trim());
      if (s === '') continue;
      if (farmText === '') {
        this.error(n, this.columns[col], 'a fixed factor needs a farm: this row has no farm');
        continue;
      }
      const v = this.numberIn(n, this.columns[col], s, factor === 'land_ha' ? 'land' : 'factor');
      if (v !== null) fixed.push({ factor, value: v, column: this.columns[col] });
    }
    const keyed = Boolean(season) && (farmText === '' || Boolean(farm));
    const repeated = keyed && !this.firstTime(`${farm?.id ?? '-'}|${season!.id}`, n, farm ? 'farm and season' : 'season, with no farm');
    if (this.rowHasError || repeated || !season || (farmText !== '' && !farm)) return;
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
        this.writes.records.push({ row: n, farmId: farm.id, seasonId: season.id, itemId: q.item.id, quantity: q.value } satisfies RecordWrite);
        this.checkQuantity(n, farm, season.id, q.item, q.value, land, this.wide!.qtyCols.find((c) => c.item.id === q.item.id)?.col);
      }
      for (const x of fixed) this.addFactor(n, farm.id, season.id, x.factor, x.value, x.column);
    }
  }

  // --- the end ------------------------------------------------------------------------------------

  finish(meta: TableMeta): ValidationOutcome {
    if (this.headerRow === null) throw new ImportFileError(422, 'empty_file', 'The file has no header row: it is empty or blank');
    if (this.dataRows === 0) throw new ImportFileError(422, 'empty_file', 'The file has a header row but no data rows');
    if (this.options.kind === 'observations' && this.defaultDp) this.collectWidePrices();
    const at = (c: string | null) => (c === null ? -1 : this.columns.indexOf(c));
    this.errors.sort((a, b) => (a.row ?? 0) - (b.row ?? 0) || at(a.column) - at(b.column));
    const mapped = new Set(Object.values(this.mapping));
    return {
      format: meta.format,
      encoding: meta.encoding,
      delimiter: meta.delimiter,
      sheet: meta.sheet,
      headerRow: this.headerRow,
      columns: this.columns,
      fields: this.fields.map(({ field, label, required }) => ({ field, label, required: required && !(field === 'delivery_point' && this.defaultDp) })),
      suggestedMapping: this.suggested,
      mapping: this.mapping,
      ignoredColumns: this.columns.filter((c) => !mapped.has(c)),
      preview: this.preview,
      totalRows: this.dataRows,
      validRows: this.validRows,
      errorCount: this.errorCount,
      errors: this.errors,
      warningCount: this.warningCount,
      warnings: this.warnings,
      unknownSeasons: [...this.unknownSeasons.values()].sort((a, b) => a.startYear - b.startYear),
      decimalMark: this.mark,
      notes: [...meta.notes, ...this.notes],
      writes: this.writes,
    };
  }

  private collectWidePrices() {
    const dp = this.defaultDp!;
    const spread = new Map<number, { seasons: number; widest: { min: number; max: number; season: string } | null }>();
    for (const acc of this.priceSums.values()) {
      const season = this.seasonById.get(acc.seasonId)!;
      this.writes.prices.push({
        row: acc.row,
        itemId: acc.itemId,
        seasonId: acc.seasonId,
        deliveryPointId: dp.id,
        price: acc.sum / acc.n,
        currency: this.lookups.currency,
        source: `Observation import: ${this.options.fileName}`.slice(0, MAX_SOURCE_CHARS),
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
      const code = this.lookups.items.find((i) => i.id === itemId)!.code;
      this.notes.push(
        `price:${code}: the rows of ${s.seasons} season(s) disagree; each season's co-op price is the mean of its rows (widest: ${fmt(s.widest!.min)} to ${fmt(s.widest!.max)} in ${s.widest!.season}).`,
      );
    }
  }
}

function normalName(s: string): string {
  return s.trim().toLowerCase().replace(/\s+/g, ' ');
}

/**
 * Reads and checks a whole file. Throws ImportFileError when the file cannot be used at all; every
 * row-level problem is in `errors` instead. `writes` holds the rows that passed (a file with errors
 * is never committed; its valid rows are only counted against the database for the preview).
 */
export async function validateImport(bytes: Uint8Array, options: ValidationOptions, lookups: Lookups, limits: ImportLimits = IMPORT_LIMITS): Promise<ValidationOutcome> {
  const validator = new Validator(options, lookups, limits);
  const meta = await readTable(bytes, options.fileName, validator, limits);
  return validator.finish(meta);
}
