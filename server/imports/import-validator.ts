/**
 * Checks an uploaded file against the reference data and turns it into rows for the database, listing
 * every bad cell (row as the spreadsheet shows it, column as headed, what is wrong). Nothing here
 * touches the database: the lookups come in, the rows to write go out, so it runs in a worker thread.
 *
 * This is the core every kind shares: it finds the header, maps the columns (suggestion, then the
 * planner's choices), collects errors and warnings, keeps the preview and runs the row loop. What a
 * row of each kind must hold is checked by that kind's row checker (row-checker.ts says what the two
 * sides offer each other):
 * - prices: price-rows.ts
 * - records: record-rows.ts
 * - contracts: contract-rows.ts
 * - observations (the fit command's wide layout): observation-rows.ts
 */
import type { ImportError, ImportKind, Lookups, PreviewRow, ValidationOptions, ValidationOutcome } from './import-types.js';
import { ImportFileError } from './import-file-error.js';
import { IMPORT_LIMITS, type ImportLimits } from './import-limits.js';
import { columnLetter, fieldsFor, suggestMapping, type FieldDef } from './import-fields.js';
import { parseNumber, parseSeason, SEASON_CELL, quote, unescapeFormula, type DecimalMark, type Parsed, type SeasonRef } from '../../shared/cell-parsers.js';
import { headerParts, priceUnitParts, sameUnit } from '../../shared/unit-names.js';
import { VALUE_MAX } from '../../shared/field-limits.js';
import { seasonLabel } from '../../shared/season-calendar.js';
import { readTable, type TableMeta, type TableSink } from './table-reader.js';
import { newBuiltWrites } from './packed-rows.js';
import { fmt, type CheckContext, type DeliveryPointRef, type FarmRef, type Item, type NumberRule, type RowChecker } from './row-checker.js';
import { PriceRows } from './price-rows.js';
import { RecordRows } from './record-rows.js';
import { ContractRows } from './contract-rows.js';
import { ObservationRows } from './observation-rows.js';

/** Longest cell shown in the preview (characters). */
const PREVIEW_CELL_CHARS = 200;

const CHECKERS: Record<ImportKind, (ctx: CheckContext) => RowChecker> = {
  prices: (ctx) => new PriceRows(ctx),
  records: (ctx) => new RecordRows(ctx),
  contracts: (ctx) => new ContractRows(ctx),
  observations: (ctx) => new ObservationRows(ctx),
};

class Validator implements TableSink, CheckContext {
  private headerRow: number | null = null;
  columns: string[] = [];
  private fields: FieldDef[] = [];
  private suggested: Record<string, string> = {};
  mapping: Record<string, string> = {};
  /** Column index of each mapped field. */
  readonly col = new Map<string, number>();
  private dataRows = 0;
  private validRows = 0;
  private errorCount = 0;
  private errors: ImportError[] = [];
  private warningCount = 0;
  private warnings: ImportError[] = [];
  /** Seasons the file names that are well-formed but not set up yet, with the first row naming each. */
  private readonly unknownSeasons = new Map<number, { label: string; startYear: number; row: number; rows: number }>();
  private readonly mark: DecimalMark;
  rowHasError = false;
  /** The row the reader reported a problem for (before handing it over). */
  private problemRow: number | null = null;
  private preview: PreviewRow[] = [];
  private notes: string[] = [];
  private headerBlocksRows = false;
  readonly writes = newBuiltWrites();
  readonly chosenDeliveryPoint: DeliveryPointRef | null = null;
  private readonly checker: RowChecker;
  /** Natural keys seen, with the first row of each. */
  private readonly seen = new Map<string, number>();

  // Lookups, by the spellings a file may use.
  private readonly itemByKey = new Map<string, Item>();
  private readonly seasonByLabel = new Map<string, SeasonRef>();
  private readonly seasonByYear = new Map<number, SeasonRef>();
  private readonly farmByCode = new Map<string, FarmRef>();
  private readonly dpByName = new Map<string, DeliveryPointRef>();
  private readonly caches = new Map<string, Map<string, Parsed<unknown>>>();
  private readonly unitChecks = new Map<string, boolean>();

  constructor(
    readonly options: ValidationOptions,
    readonly lookups: Lookups,
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
    }
    for (const fm of lookups.farms) this.farmByCode.set(fm.code.toUpperCase(), fm);
    for (const dp of lookups.deliveryPoints) this.dpByName.set(normalName(dp.name), dp);
    this.mark = options.decimalMark ?? lookups.decimalMark ?? 'point';
    if (options.deliveryPoint !== undefined) {
      const dp = this.dpByName.get(normalName(options.deliveryPoint));
      if (!dp) {
        throw new ImportFileError(400, 'invalid', `There is no delivery point ${quote(options.deliveryPoint)}`, [
          { path: 'body.deliveryPoint', message: `Unknown delivery point; choose one of: ${lookups.deliveryPoints.map((d) => d.name).join(', ')}` },
        ]);
      }
      this.chosenDeliveryPoint = dp;
    }
    this.checker = CHECKERS[options.kind](this);
  }

  // --- errors, warnings, notes --------------------------------------------------------------------

  error(row: number | null, column: string | null, message: string) {
    this.errorCount++;
    if (row !== null && row !== this.headerRow) this.rowHasError = true;
    if (this.errors.length < this.limits.maxListedErrors) this.errors.push({ row, column, message });
  }

  warning(row: number, column: string | null, message: string) {
    this.warningCount++;
    if (this.warnings.length < this.limits.maxListedErrors) this.warnings.push({ row, column, message });
  }

  note(text: string) {
    if (!this.notes.includes(text)) this.notes.push(text);
  }

  blockRows() {
    this.headerBlocksRows = true;
  }

  problem(e: ImportError) {
    this.problemRow = e.row;
    this.error(e.row, e.column, e.message);
  }

  // --- the row loop -------------------------------------------------------------------------------

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
    if (!this.headerBlocksRows) this.checker.row(n, raw);
    // With a required column missing no row can be imported, so none counts as valid.
    if (!this.rowHasError && !this.headerBlocksRows) this.validRows++;
    this.rowHasError = false;
  }

  // --- the header ---------------------------------------------------------------------------------

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
      const optionalDp = def.field === 'delivery_point' && this.chosenDeliveryPoint;
      if (def.required && !this.mapping[def.field] && !optionalDp) {
        this.error(n, null, `no column is mapped to ${def.field} (${def.label})${def.field === 'delivery_point' ? '; map one or choose a delivery point for the whole file' : ''}`);
        this.headerBlocksRows = true;
      }
    }
    this.checker.header(n);
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

  columnOf(field: string): string {
    return this.mapping[field] ?? field;
  }

  unitFromHeader(field: string): { unit: string | null; currency: string | null } {
    const source = this.mapping[field];
    if (!source) return { unit: null, currency: null };
    const parts = headerParts(source);
    return { unit: parts.unit, currency: parts.currency };
  }


  // --- cells --------------------------------------------------------------------------------------

  text(raw: string[], field: string): string | undefined {
    const i = this.col.get(field);
    if (i === undefined) return undefined;
    return unescapeFormula((raw[i] ?? '').trim());
  }

  cached<T>(kind: string, s: string, parse: () => Parsed<T>): Parsed<T> {
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

  required<T>(n: number, field: string, s: string | undefined, parse: (s: string) => Parsed<T>): T | null {
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

  readonly item = (s: string): Parsed<Item> =>
    this.cached('item', s, () => {
      const it = this.itemByKey.get(s.toLowerCase());
      return it ? { ok: true, value: it } : { ok: false, message: `unknown item ${quote(s)} (items: ${this.lookups.items.map((i) => i.code).join(', ')})` };
    });

  private readonly season = (s: string): Parsed<SeasonRef> => this.cached('season', s, () => parseSeason(s, this.lookups.seasons, this.seasonByLabel, this.seasonByYear));

  seasonOf(n: number, s: string | undefined): SeasonRef | null {
    const season = this.required(n, 'season', s, this.season);
    if (season || !s) return season;
    const m = SEASON_CELL.exec(s.trim());
    if (m && /^unknown season/.test((this.season(s) as { message: string }).message)) {
      const startYear = Number(m[1]);
      const known = this.unknownSeasons.get(startYear);
      if (known) known.rows++;
      else this.unknownSeasons.set(startYear, { label: seasonLabel(startYear), startYear, row: n, rows: 1 });
    }
    return null;
  }

  readonly farm = (s: string): Parsed<FarmRef> =>
    this.cached('farm', s, () => {
      const fm = this.farmByCode.get(s.toUpperCase());
      return fm ? { ok: true, value: fm } : { ok: false, message: `unknown farm ${quote(s)}: no farm has this code` };
    });

  readonly deliveryPoint = (s: string): Parsed<DeliveryPointRef> =>
    this.cached('dp', s, () => {
      const dp = this.dpByName.get(normalName(s));
      return dp
        ? { ok: true, value: dp }
        : { ok: false, message: `unknown delivery point ${quote(s)} (delivery points: ${this.lookups.deliveryPoints.map((d) => d.name).join(', ')})` };
    });

  numberIn(n: number, column: string, s: string, rule: NumberRule): number | null {
    const r = this.cached('number', s, () => parseNumber(s, this.mark));
    if (!r.ok) {
      this.error(n, column, r.message);
      return null;
    }
    const v = r.value;
    const problem = numberProblem(s, v, rule);
    if (problem) return this.error(n, column, problem), null;
    return v;
  }

  checkUnit(n: number, item: Item, headerUnit: string | null, cellUnit: string | undefined, valueField: 'price' | 'quantity') {
    if (headerUnit && !this.unitMatches(headerUnit, item.unit)) {
      this.error(n, this.columnOf(valueField), `the column's unit ${quote(headerUnit)} is not ${item.code}'s unit ${quote(item.unit)}`);
    }
    if (cellUnit && !this.unitMatches(priceUnitParts(cellUnit).unit, item.unit)) {
      const per = valueField === 'price' ? `; ${item.code} prices are per ${item.unit}` : `; ${item.code} is recorded in ${item.unit}`;
      this.error(n, this.columnOf('unit'), `unit ${quote(cellUnit)} is not ${item.code}'s unit ${quote(item.unit)}${per}`);
    }
  }

  firstTime(key: string, n: number, what: string): boolean {
    const first = this.seen.get(key);
    if (first !== undefined) {
      this.error(n, null, `the row repeats row ${first} (same ${what})`);
      return false;
    }
    this.seen.set(key, n);
    return true;
  }

  deliveryPointNamed(name: string): DeliveryPointRef | undefined {
    return this.dpByName.get(normalName(name));
  }

  // --- the end ------------------------------------------------------------------------------------

  finish(meta: TableMeta): ValidationOutcome {
    if (this.headerRow === null) throw new ImportFileError(422, 'empty_file', 'The file has no header row: it is empty or blank');
    if (this.dataRows === 0) throw new ImportFileError(422, 'empty_file', 'The file has a header row but no data rows');
    this.checker.finish?.();
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
      fields: this.fields.map(({ field, label, required }) => ({ field, label, required: required && !(field === 'delivery_point' && this.chosenDeliveryPoint) })),
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

/**
 * What is wrong with a number for its rule, or null: the bounds are the API's (shared/field-limits.ts
 * through the schemas of shared/data-schemas.ts and shared/contract-schemas.ts), so a file keeps what
 * a form keeps.
 */
function numberProblem(s: string, v: number, rule: NumberRule): string | null {
  switch (rule) {
    case 'price':
    case 'contractPrice': {
      const max = rule === 'price' ? VALUE_MAX.price : VALUE_MAX.contractPrice;
      if (!(v > 0)) return `${quote(s)} is not a price: a price must be more than 0`;
      if (v > max) return `${quote(s)} is larger than the largest ${rule === 'price' ? 'price' : 'contract price'} kept (${fmt(max)})`;
      return null;
    }
    case 'quantity':
    case 'contractQuantity': {
      const max = rule === 'quantity' ? VALUE_MAX.quantity : VALUE_MAX.contractQuantity;
      if (v < 0) return `${quote(s)} is negative: quantities are 0 or more, inputs too (the column or the item says whether it is an input)`;
      if (v > max) return `${quote(s)} is larger than the largest ${rule === 'quantity' ? 'quantity' : 'contract quantity'} kept (${fmt(max)})`;
      return null;
    }
    case 'land':
      if (!(v > 0)) return `${quote(s)} is not an area: land must be more than 0 ha`;
      if (v > VALUE_MAX.landHa) return `${quote(s)} ha is more land than the server keeps for a farm (${fmt(VALUE_MAX.landHa)} ha)`;
      return null;
    case 'factor':
      if (v < 0) return `${quote(s)} is negative: a fixed factor cannot be negative`;
      if (v > VALUE_MAX.factor) return `${quote(s)} is larger than the largest fixed factor kept (${fmt(VALUE_MAX.factor)})`;
      return null;
  }
}
