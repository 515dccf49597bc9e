/**
 * The farm files of the command line (docs/project-command.md: NEXT.csv of the project command;
 * docs/fit-command.md §5: the fit command's --committed-file), read the same way: a header row of
 * distinct, non-empty column names, then one row per farm with a farm name listed once. What each
 * file's columns mean stays with its command (project-cli.ts, contracted-cli.ts).
 */
import Papa from 'papaparse';
import { EstimationInputError } from './errors.js';

export interface FarmFile {
  /** Column names, trimmed. */
  header: string[];
  /** Column index by name. */
  col: Map<string, number>;
  /** The file's lines as parsed, the header first. */
  lines: string[][];
}

/**
 * Parse the file and its header: `checkColumn` is called for each column name in turn (after the
 * empty and repeated checks) and throws for one the file does not accept.
 * @throws EstimationInputError naming the row and column
 */
export function readFarmFile(text: string, checkColumn: (name: string) => void): FarmFile {
  const body = text.replace(/^\uFEFF/, '');
  if (body.trim() === '') throw new EstimationInputError('the file is empty');
  const parsed = Papa.parse<string[]>(body, { skipEmptyLines: false, delimitersToGuess: [',', ';', '\t'] });
  const fatal = parsed.errors.find((e) => e.type === 'Quotes');
  if (fatal) throw new EstimationInputError(`row ${(fatal.row ?? 0) + 1}: ${fatal.message}`, { row: (fatal.row ?? 0) + 1 });
  const lines = parsed.data;
  const header = (lines[0] ?? []).map((h) => h.trim());
  const col = new Map<string, number>();
  header.forEach((h, c) => {
    if (h === '') throw new EstimationInputError(`row 1, column ${c + 1}: empty column name`, { row: 1 });
    if (col.has(h)) throw new EstimationInputError(`row 1, column ${h}: the column appears twice`, { row: 1, column: h });
    checkColumn(h);
    col.set(h, c);
  });
  return { header, col, lines };
}

/** One farm row: its row number in the file (the header is row 1), its cells and its farm name (trimmed). */
export interface FarmRow {
  row: number;
  cells: string[];
  farm: string;
}

/**
 * The farm rows after the header, one at a time (so a caller's own checks of a row come before the
 * next row's): blank lines skipped; every row as many cells as the header, a farm name, no farm twice.
 * @throws EstimationInputError naming the row and column
 */
export function* farmRows(file: FarmFile): Generator<FarmRow> {
  const { header, col, lines } = file;
  const seen = new Set<string>();
  for (let li = 1; li < lines.length; li++) {
    const cells = lines[li]!;
    const row = li + 1;
    if (cells.length === 1 && cells[0]!.trim() === '') continue;
    if (cells.length !== header.length) throw new EstimationInputError(`row ${row}: ${cells.length} cells, but the header has ${header.length} columns`, { row });
    const farm = cells[col.get('farm')!]!.trim();
    if (farm === '') throw new EstimationInputError(`row ${row}, column farm: empty cell`, { row, column: 'farm' });
    if (seen.has(farm)) throw new EstimationInputError(`row ${row}, column farm: farm "${farm}" is listed twice`, { row, column: 'farm' });
    seen.add(farm);
    yield { row, cells, farm };
  }
}
