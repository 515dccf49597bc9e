import Papa from 'papaparse';
import type { PriceInput } from '../../../shared/data-schemas';
import { priceSchema } from '../../../shared/data-schemas';
// The import's own cell parsers and unit comparison (pure TypeScript, luxon only), so a pasted block
// and an uploaded file are judged by the same rules in the same words.
import { guessDelimiter, parseCurrency, parseDecimal, parseIsoDate, parseNumber, quote, type DecimalMark } from '../../../shared/cell-parsers';
import { PRICE_COLUMN_LABEL, PRICE_COLUMNS, PRICE_HEADER_NAMES, REQUIRED_PRICE_FIELDS, normalColumnName, type PriceColumnField } from '../../../shared/price-columns';
import { priceUnitParts, sameUnit } from '../../../shared/unit-names';
import type { Lookups } from './reference-store';

/** One problem of a pasted block: `row` counts the pasted lines from 1 (a header line included), `column` as headed. */
export interface PasteProblem {
  row: number;
  column: string | null;
  message: string;
}

/**
 * Splits text copied from a spreadsheet into rows of cells. Spreadsheets put a tab between cells and
 * quote cells that hold tabs, quotes or line breaks; text with no tab at all (a CSV opened in an
 * editor) is split on the delimiter papaparse finds. Blank lines are dropped; cells are trimmed.
 */
export function parseTable(text: string): string[][] {
  const clean = text.replace(/^\uFEFF/, '').replace(/\r\n?/g, '\n');
  if (clean.trim() === '') return [];
  const delimiter = clean.includes('\t') ? '\t' : (guessDelimiter(clean) ?? '');
  const result = Papa.parse<string[]>(clean, { delimiter, delimitersToGuess: [',', ';', '|'], skipEmptyLines: 'greedy' });
  return result.data.map((row) => row.map((cell) => cell.trim()));
}

/** The columns of a pasted block of prices, in the order assumed when the block has no header line (the export's order without the unit). */
export const PRICE_PASTE_COLUMNS = PRICE_COLUMNS.map((c) => c.field).filter((f) => f !== 'unit') as Exclude<PriceColumnField, 'unit'>[];
export type PricePasteColumn = PriceColumnField;

const COLUMN_LABEL: Record<PricePasteColumn, string> = PRICE_COLUMN_LABEL;

/** The header spellings of the import and the export (shared/price-columns.ts), after the bracketed unit is dropped. */
function headerKey(cell: string): PricePasteColumn | undefined {
  return PRICE_HEADER_NAMES.get(normalColumnName(cell.replace(/\s*[([].*[)\]]\s*$/, '')));
}

export interface PastedPriceRow {
  /** Line of the pasted block it came from (from 1). */
  row: number;
  /** What the block said, for the preview. */
  cells: Record<PricePasteColumn, string>;
  /** The row ready for POST /api/prices, or null when it has problems. */
  value: PriceInput | null;
}

export interface PastedPrices {
  /** True when the first line named the columns. */
  hasHeader: boolean;
  columns: PricePasteColumn[];
  rows: PastedPriceRow[];
  problems: PasteProblem[];
  validRows: PriceInput[];
}

export interface PasteDefaults {
  /** The co-op's currency, for rows that name none. */
  currency: string;
  /** Source for rows that name none; rows need one, so a block without the column needs this. */
  source: string;
  /** How the co-op writes decimals (settings); a number written otherwise is refused. */
  decimalMark?: DecimalMark;
}

/**
 * Reads a block of prices copied from a spreadsheet: with a header line (column names such as item,
 * season, delivery point, price, currency, source, observed on) or without (then the columns are in
 * `PRICE_PASTE_COLUMNS` order). Every bad cell is listed with its line and column; the block's valid
 * rows come back ready to send, and rows repeated within the block are flagged.
 */
export function readPastedPrices(table: string[][], lookups: Lookups, defaults: PasteDefaults): PastedPrices {
  const problems: PasteProblem[] = [];
  if (table.length === 0) return { hasHeader: false, columns: [], rows: [], problems, validRows: [] };
  const headerGuess = table[0].map(headerKey);
  const hasHeader = headerGuess.filter(Boolean).length >= 2;
  const columns: PricePasteColumn[] = hasHeader
    ? headerGuess.map((k, i) => k ?? (`?${i}` as PricePasteColumn))
    : PRICE_PASTE_COLUMNS.slice(0, Math.max(...table.map((r) => r.length)));
  if (hasHeader) {
    table[0].forEach((cell, i) => {
      if (!headerGuess[i] && cell !== '') problems.push({ row: 1, column: cell, message: `the column ${quote(cell)} is not one the prices use; it is ignored` });
    });
    for (const required of REQUIRED_PRICE_FIELDS) {
      if (!columns.includes(required as PricePasteColumn)) problems.push({ row: 1, column: null, message: `no column is headed ${COLUMN_LABEL[required].toLowerCase()}` });
    }
  } else if (table.some((r) => r.length > PRICE_PASTE_COLUMNS.length)) {
    problems.push({
      row: 1,
      column: null,
      message: `without a header line a block has at most ${PRICE_PASTE_COLUMNS.length} columns (${PRICE_PASTE_COLUMNS.map((c) => COLUMN_LABEL[c].toLowerCase()).join(', ')})`,
    });
  }
  const rows: PastedPriceRow[] = [];
  const seen = new Map<string, number>();
  const body = hasHeader ? table.slice(1) : table;
  body.forEach((raw, k) => {
    const line = k + (hasHeader ? 2 : 1);
    const cells = {} as Record<PricePasteColumn, string>;
    for (const c of [...PRICE_PASTE_COLUMNS, 'unit'] as const) cells[c] = '';
    columns.forEach((c, i) => {
      if (c in COLUMN_LABEL) cells[c] = raw[i] ?? '';
    });
    const before = problems.length;
    const problem = (column: PricePasteColumn | null, message: string) =>
      problems.push({ row: line, column: column === null ? null : COLUMN_LABEL[column], message });
    const need = (column: PricePasteColumn): string | null => {
      if (cells[column] === '') {
        problem(column, `empty cell: ${COLUMN_LABEL[column].toLowerCase()} is required`);
        return null;
      }
      return cells[column];
    };

    const itemText = need('item');
    const item = itemText === null ? undefined : lookups.item(itemText);
    if (itemText !== null && !item) problem('item', `unknown item ${quote(itemText)} (items: ${lookups.items.map((i) => i.code).join(', ')})`);
    const seasonText = need('season');
    const season = seasonText === null ? undefined : lookups.season(seasonText);
    if (seasonText !== null && !season) problem('season', `unknown season ${quote(seasonText)}`);
    const dpText = need('delivery_point');
    const dp = dpText === null ? undefined : lookups.deliveryPoint(dpText);
    if (dpText !== null && !dp) {
      problem('delivery_point', `unknown delivery point ${quote(dpText)} (delivery points: ${lookups.deliveryPoints.map((d) => d.name).join(', ')})`);
    }
    let price: number | null = null;
    const priceText = need('price');
    if (priceText !== null) {
      const parsed = parseNumber(priceText, defaults.decimalMark ?? 'point');
      if (!parsed.ok) problem('price', parsed.message);
      else price = parsed.value;
    }
    const unitCell = cells.unit === '' ? null : priceUnitParts(cells.unit);
    if (item && unitCell && !sameUnit(unitCell.unit, item.unit)) {
      problem('unit', `unit ${quote(cells.unit)} is not ${item.code}'s unit ${quote(item.unit)}; ${item.code} prices are per ${item.unit}`);
    }
    let currency = unitCell?.currency ?? defaults.currency;
    if (cells.currency !== '') {
      const parsed = parseCurrency(cells.currency);
      if (!parsed.ok) problem('currency', parsed.message);
      else if (unitCell?.currency && parsed.value !== unitCell.currency) problem('currency', `${parsed.value} differs from the currency in the unit ${quote(cells.unit)}`);
      else currency = parsed.value;
    }
    const source = cells.source !== '' ? cells.source : defaults.source.trim();
    if (source === '') problem('source', 'empty cell: name the source of the price (or give one for the whole block)');
    let observedOn: string | null = null;
    const dateText = need('observed_on');
    if (dateText !== null) {
      const parsed = parseIsoDate(dateText);
      if (!parsed.ok) problem('observed_on', parsed.message);
      else observedOn = parsed.value;
    }

    let value: PriceInput | null = null;
    if (problems.length === before && item && season && dp && price !== null && observedOn !== null) {
      const candidate = { itemId: item.id, seasonId: season.id, deliveryPointId: dp.id, price, currency, source, observedOn };
      // The shared schema has the last word (limits such as price > 0 and the source length).
      const checked = priceSchema.safeParse(candidate);
      if (!checked.success) {
        for (const issue of checked.error.issues) problem(pasteColumnOf(String(issue.path[0] ?? '')), issue.message);
      } else {
        const key = `${item.id}|${season.id}|${dp.id}|${observedOn}`;
        const first = seen.get(key);
        if (first !== undefined) problem(null, `the line repeats line ${first} (same item, season, delivery point and observed date)`);
        else {
          seen.set(key, line);
          value = checked.data;
        }
      }
    }
    rows.push({ row: line, cells, value });
  });
  return { hasHeader, columns, rows, problems, validRows: rows.flatMap((r) => (r.value ? [r.value] : [])) };
}

function pasteColumnOf(field: string): PricePasteColumn | null {
  const map: Record<string, PricePasteColumn> = {
    itemId: 'item',
    seasonId: 'season',
    deliveryPointId: 'delivery_point',
    price: 'price',
    currency: 'currency',
    source: 'source',
    observedOn: 'observed_on',
  };
  return map[field] ?? null;
}

/**
 * Maps a server answer for a block (`details[].path` such as `body.rows.3.price`) back to the lines
 * of the paste, so a refusal names the line a person sees.
 */
export function problemsFromServer(
  details: readonly { path: string; message: string }[] | undefined,
  sentRows: readonly PastedPriceRow[],
): PasteProblem[] {
  const out: PasteProblem[] = [];
  for (const d of details ?? []) {
    const m = /^(?:body\.)?rows\.(\d+)\.?(\w*)/.exec(d.path);
    if (!m) continue;
    const sent = sentRows[Number(m[1])];
    const column = pasteColumnOf(m[2]);
    out.push({ row: sent?.row ?? Number(m[1]) + 1, column: column ? COLUMN_LABEL[column] : null, message: d.message });
  }
  return out;
}

export const PASTE_COLUMN_LABEL = COLUMN_LABEL;

export interface IndexValues {
  values: { seasonId: number; value: number }[];
  problems: PasteProblem[];
}

/**
 * Reads the values of a price index, one season per line: "2016/17<tab>100" (or comma/semicolon
 * separated, as in a two-column CSV). A first line whose second cell is not a number is a header.
 */
export function readIndexValues(table: string[][], lookups: Lookups): IndexValues {
  const problems: PasteProblem[] = [];
  const values: { seasonId: number; value: number }[] = [];
  const seen = new Map<number, number>();
  const hasHeader = table.length > 0 && table[0].length >= 2 && !parseDecimal(table[0][1] ?? '').ok;
  table.forEach((raw, k) => {
    if (k === 0 && hasHeader) return;
    const line = k + 1;
    const [seasonText = '', valueText = ''] = raw;
    if (raw.length > 2 && raw.slice(2).some((c) => c !== '')) problems.push({ row: line, column: null, message: 'use two columns: season and index value' });
    const season = seasonText === '' ? undefined : lookups.season(seasonText);
    if (seasonText === '') problems.push({ row: line, column: 'Season', message: 'empty cell: season is required' });
    else if (!season) problems.push({ row: line, column: 'Season', message: `unknown season ${quote(seasonText)}` });
    const parsed = valueText === '' ? null : parseDecimal(valueText);
    if (parsed === null) problems.push({ row: line, column: 'Value', message: 'empty cell: the index value is required' });
    else if (!parsed.ok) problems.push({ row: line, column: 'Value', message: parsed.message });
    else if (!(parsed.value > 0)) problems.push({ row: line, column: 'Value', message: `${quote(valueText)} is not an index value: it must be more than 0` });
    if (!season || !parsed?.ok || !(parsed.value > 0)) return;
    const first = seen.get(season.id);
    if (first !== undefined) {
      problems.push({ row: line, column: 'Season', message: `${season.label} is given twice (line ${first} and line ${line})` });
      return;
    }
    seen.set(season.id, line);
    values.push({ seasonId: season.id, value: parsed.value });
  });
  return { values, problems };
}
