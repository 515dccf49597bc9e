/**
 * The netput CSV layout (one row per observation; see docs/fit-command.md §2) parsed into a
 * plain, serialisable dataset. Parsing is strict: the first bad cell stops it with an
 * EstimationInputError naming the row (the header is row 1, as a spreadsheet shows it) and column.
 */
import Papa from 'papaparse';
import { EstimationInputError } from './errors.js';

export type ItemRole = 'output' | 'input';

export interface NetputItem {
  name: string;
  role: ItemRole;
}

export interface NetputDataset {
  /** Items in the order of their quantity columns in the file. */
  items: NetputItem[];
  /** Quasi-fixed factors (`fixed:<name>` columns), in file order. */
  fixedFactors: string[];
  /** Season label per observation, as written. */
  seasons: string[];
  /** The season's (first) calendar year per observation: 2014 for "2014" and for "2014/15". */
  seasonYears: number[];
  /** Farm identifier per observation, or null when the file has no farm column. */
  farms: string[] | null;
  /** prices[item][obs], > 0, same item order as `items`. */
  prices: number[][];
  /** quantities[item][obs], >= 0 (produced for outputs, used for inputs). */
  quantities: number[][];
  /** fixed[factor][obs]. */
  fixed: number[][];
  /** Spreadsheet row number of each observation, for messages. */
  rows: number[];
}

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
export const SEASON = /^(\d{4})(?:\s*[/-]\s*(\d{2}|\d{4}))?$/;

/** Parse one numeric cell or throw an error naming its row and column. */
export function numberCell(raw: string | undefined, row: number, column: string): number {
  const s = (raw ?? '').trim();
  if (s === '') throw new EstimationInputError(`row ${row}, column ${column}: empty cell`, { row, column });
  if (!NUMBER.test(s)) throw new EstimationInputError(`row ${row}, column ${column}: "${s}" is not a number`, { row, column });
  const v = Number(s);
  if (!Number.isFinite(v)) throw new EstimationInputError(`row ${row}, column ${column}: "${s}" is not a finite number`, { row, column });
  return v;
}

/**
 * Parse the netput CSV layout: `season` (required), `farm` (optional), `price:<item>`,
 * `output:<item>` or `input:<item>`, and `fixed:<name>` columns. Every item has exactly one price
 * column and one quantity column.
 * @throws EstimationInputError for an empty file, an unknown or duplicate column, an item without
 *   its price or quantity column, a bad cell (with row and column), or no data rows
 */
export function parseNetputCsv(text: string): NetputDataset {
  const body = text.replace(/^\uFEFF/, '');
  if (body.trim() === '') throw new EstimationInputError('the file is empty');
  const parsed = Papa.parse<string[]>(body, { skipEmptyLines: false, delimitersToGuess: [',', ';', '\t'] });
  const fatal = parsed.errors.find((e) => e.type === 'Quotes');
  if (fatal) {
    const row = (fatal.row ?? 0) + 1;
    throw new EstimationInputError(`row ${row}: ${fatal.message}`, { row });
  }
  const lines = parsed.data;
  const header = (lines[0] ?? []).map((h) => h.trim());
  const seen = new Set<string>();
  let seasonCol = -1;
  let farmCol = -1;
  const priceCols = new Map<string, number>();
  const qtyCols: { name: string; role: ItemRole; col: number }[] = [];
  const fixedCols: { name: string; col: number }[] = [];
  header.forEach((h, col) => {
    if (h === '') throw new EstimationInputError(`row 1, column ${col + 1}: empty column name`, { row: 1 });
    if (seen.has(h)) throw new EstimationInputError(`row 1, column ${h}: the column appears twice`, { row: 1, column: h });
    seen.add(h);
    const m = /^(price|output|input|fixed):(.+)$/.exec(h);
    if (h === 'season') seasonCol = col;
    else if (h === 'farm') farmCol = col;
    else if (m) {
      const kind = m[1]!;
      const name = m[2]!.trim();
      if (name === '') throw new EstimationInputError(`row 1, column ${h}: the column needs a name after "${kind}:"`, { row: 1, column: h });
      if (kind === 'price') priceCols.set(name, col);
      else if (kind === 'fixed') fixedCols.push({ name, col });
      else {
        const clash = qtyCols.find((q) => q.name === name);
        if (clash) throw new EstimationInputError(`row 1, column ${h}: item "${name}" already has a quantity column ${clash.role}:${name}`, { row: 1, column: h });
        qtyCols.push({ name, role: kind as ItemRole, col });
      }
    } else {
      throw new EstimationInputError(
        `row 1, column ${h}: unknown column (expected season, farm, price:<item>, output:<item>, input:<item> or fixed:<name>)`,
        { row: 1, column: h },
      );
    }
  });
  if (seasonCol < 0) throw new EstimationInputError('row 1: the required column "season" is missing', { row: 1 });
  for (const [name, col] of priceCols) {
    if (!qtyCols.some((q) => q.name === name))
      throw new EstimationInputError(`row 1, column price:${name}: item "${name}" has a price but no quantity column (output:${name} or input:${name})`, {
        row: 1,
        column: header[col]!,
      });
  }
  for (const q of qtyCols) {
    if (!priceCols.has(q.name))
      throw new EstimationInputError(`row 1, column ${q.role}:${q.name}: item "${q.name}" has a quantity but no price column (price:${q.name})`, {
        row: 1,
        column: `${q.role}:${q.name}`,
      });
  }
  if (qtyCols.length < 2) throw new EstimationInputError('the file needs at least two items (each with a price and a quantity column)');

  const ds: NetputDataset = {
    items: qtyCols.map((q) => ({ name: q.name, role: q.role })),
    fixedFactors: fixedCols.map((f) => f.name),
    seasons: [],
    seasonYears: [],
    farms: farmCol >= 0 ? [] : null,
    prices: qtyCols.map(() => []),
    quantities: qtyCols.map(() => []),
    fixed: fixedCols.map(() => []),
    rows: [],
  };
  for (let li = 1; li < lines.length; li++) {
    const cells = lines[li]!;
    const row = li + 1;
    if (cells.length === 1 && cells[0]!.trim() === '') continue; // blank line
    if (cells.length !== header.length)
      throw new EstimationInputError(`row ${row}: ${cells.length} cells, but the header has ${header.length} columns`, { row });
    const season = cells[seasonCol]!.trim();
    const sm = SEASON.exec(season);
    if (!sm) throw new EstimationInputError(`row ${row}, column season: "${season}" is not a year (2014) or a season (2014/15)`, { row, column: 'season' });
    ds.seasons.push(season);
    ds.seasonYears.push(Number(sm[1]));
    if (ds.farms) {
      const farm = cells[farmCol]!.trim();
      if (farm === '') throw new EstimationInputError(`row ${row}, column farm: empty cell`, { row, column: 'farm' });
      ds.farms.push(farm);
    }
    qtyCols.forEach((q, i) => {
      const pc = `price:${q.name}`;
      const p = numberCell(cells[priceCols.get(q.name)!], row, pc);
      if (!(p > 0)) throw new EstimationInputError(`row ${row}, column ${pc}: a price must be positive, got ${p}`, { row, column: pc });
      ds.prices[i]!.push(p);
      const qc = `${q.role}:${q.name}`;
      const v = numberCell(cells[q.col], row, qc);
      if (v < 0) throw new EstimationInputError(`row ${row}, column ${qc}: a quantity must not be negative, got ${v} (inputs are entered as amounts used)`, { row, column: qc });
      ds.quantities[i]!.push(v);
    });
    fixedCols.forEach((f, k) => ds.fixed[k]!.push(numberCell(cells[f.col], row, `fixed:${f.name}`)));
    ds.rows.push(row);
  }
  if (ds.rows.length === 0) throw new EstimationInputError('the file has a header but no data rows');
  return ds;
}
