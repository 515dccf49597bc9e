/**
 * CSV and XLSX writers for every table the API exports. Text cells that a spreadsheet would run as a
 * formula (starting with =, +, -, @, tab or carriage return) get a leading apostrophe, as the OWASP
 * "CSV Injection" guidance advises (owasp.org/www-community/attacks/CSV_Injection); numbers are
 * written as numbers and never escaped. Our imports drop that apostrophe again, so an export
 * re-imports unchanged.
 */
import Papa from 'papaparse';

export interface SheetColumn {
  /** Property of each row. */
  key: string;
  /** Header cell, as the imports expect it. */
  header: string;
  /** `number` cells stay numbers; `date` cells hold YYYY-MM-DD text and become date cells in XLSX. */
  type?: 'text' | 'number' | 'date';
  /** XLSX column width in characters. */
  width?: number;
}

export type SheetRow = Record<string, unknown>;

/** The characters a spreadsheet treats as the start of a formula (OWASP CSV Injection). */
const FORMULA_START = /^[=+\-@\t\r]/;

/** Prefixes an apostrophe to text a spreadsheet would read as a formula. */
export function escapeFormula(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

function plainValue(v: unknown, type: SheetColumn['type']): string | number | null {
  if (v === null || v === undefined) return null;
  if (type === 'number' && typeof v === 'number') return Number.isFinite(v) ? v : null;
  if (v instanceof Date) return v.toISOString().slice(0, 10);
  return typeof v === 'number' ? v : String(v);
}

/** How a CSV writes decimals: `point` (1234.5, cells separated by commas) or `comma` (1234,5, by semicolons). */
export type CsvDecimalMark = 'point' | 'comma';

/** Text escaped against formulas: always quoted, as papaparse's own escaping does. */
class EscapedText {
  constructor(readonly text: string) {}
  toString() {
    return this.text;
  }
}

function csvCell(v: unknown, type: SheetColumn['type'], mark: CsvDecimalMark): unknown {
  const plain = plainValue(v, type);
  if (typeof plain === 'number') return mark === 'comma' ? String(plain).replace('.', ',') : plain;
  if (typeof plain === 'string' && FORMULA_START.test(plain)) return new EscapedText(`'${plain}`);
  return plain;
}

/**
 * Rows as CSV lines (no header), each ending CRLF (RFC 4180). With a decimal comma the cells are
 * separated by semicolons and numbers written 1234,5, as spreadsheets in decimal-comma locales
 * write and read them (common practice, no source).
 */
export function csvLines(rows: readonly SheetRow[], columns: readonly SheetColumn[], mark: CsvDecimalMark = 'point'): string {
  if (rows.length === 0) return '';
  const data = rows.map((r) => columns.map((c) => csvCell(r[c.key], c.type, mark)));
  // Formula text is escaped above (numbers, even negative ones, never are); papaparse only quotes.
  return `${Papa.unparse(data, { delimiter: mark === 'comma' ? ';' : ',', newline: '\r\n', escapeFormulae: false, quotes: (v: unknown) => v instanceof EscapedText })}\r\n`;
}

/** The header line of a CSV, after a UTF-8 byte order mark so spreadsheet programs read accents correctly (common practice, no source). */
export function csvHeader(columns: readonly SheetColumn[], mark: CsvDecimalMark = 'point'): string {
  return `\uFEFF${csvLines([Object.fromEntries(columns.map((c) => [c.key, c.header]))], columns.map((c) => ({ ...c, type: 'text' as const })), mark)}`;
}

/** The rows as CSV text: header and rows (see csvLines). */
export function toCsv(rows: readonly SheetRow[], columns: readonly SheetColumn[], mark: CsvDecimalMark = 'point'): string {
  return csvHeader(columns, mark) + csvLines(rows, columns, mark);
}

function safeSheetName(name: string): string {
  // Excel's rules: at most 31 characters, none of : \ / ? * [ ]
  return name.replace(/[:\\/?*[\]]/g, ' ').trim().slice(0, 31) || 'Sheet1';
}

function xlsxValues(r: SheetRow, columns: readonly SheetColumn[]): unknown[] {
  return columns.map((c) => {
    const v = plainValue(r[c.key], c.type);
    if (v === null) return null;
    if (c.type === 'date' && typeof v === 'string') {
      const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(v);
      if (m) return new Date(Date.UTC(+m[1], +m[2] - 1, +m[3]));
    }
    return typeof v === 'string' ? escapeFormula(v) : v;
  });
}

/**
 * Writes an .xlsx workbook (as toXlsx) to `out` while the rows arrive, chunk by chunk, so a table of
 * any size is never held whole; `between` runs after each chunk (the caller waits for the network
 * and lets other requests through there). Numbers stay numbers whatever the decimal mark.
 */
export async function streamXlsx(out: NodeJS.WritableStream, chunks: AsyncIterable<readonly SheetRow[]>, columns: readonly SheetColumn[], sheetName: string, between: () => Promise<void>): Promise<void> {
  const { default: Excel } = await import('exceljs');
  const wb = new Excel.stream.xlsx.WorkbookWriter({ stream: out as never, useStyles: true, useSharedStrings: false });
  wb.creator = 'Netput';
  const ws = wb.addWorksheet(safeSheetName(sheetName), { views: [{ state: 'frozen', ySplit: 1 }] });
  ws.columns = columns.map((c) => ({
    header: escapeFormula(c.header),
    key: c.key,
    width: c.width ?? Math.max(10, c.header.length + 2),
    ...(c.type === 'date' ? { style: { numFmt: 'yyyy-mm-dd' } } : {}),
  }));
  const header = ws.getRow(1);
  header.font = { bold: true };
  header.commit();
  for await (const chunk of chunks) {
    for (const r of chunk) ws.addRow(xlsxValues(r, columns)).commit();
    await between();
  }
  ws.commit();
  await wb.commit();
}

/** The rows as an .xlsx workbook with one worksheet: a bold, frozen header row and typed cells. */
export async function toXlsx(rows: readonly SheetRow[], columns: readonly SheetColumn[], sheetName: string): Promise<Buffer> {
  const { default: Excel } = await import('exceljs');
  const wb = new Excel.Workbook();
  wb.creator = 'Netput';
  const ws = wb.addWorksheet(safeSheetName(sheetName), { views: [{ state: 'frozen', ySplit: 1 }] });
  ws.columns = columns.map((c) => ({ header: escapeFormula(c.header), key: c.key, width: c.width ?? Math.max(10, c.header.length + 2) }));
  ws.getRow(1).font = { bold: true };
  for (const r of rows) ws.addRow(xlsxValues(r, columns));
  columns.forEach((c, i) => {
    if (c.type === 'date') ws.getColumn(i + 1).numFmt = 'yyyy-mm-dd';
  });
  return Buffer.from(await wb.xlsx.writeBuffer());
}

/**
 * Several small tables in one CSV file, each a list of rows (its own heading row first), separated
 * by an empty line: how a report for readers (not for re-import) is laid out. Same escaping and line
 * ends as toCsv.
 */
export function toCsvBlocks(blocks: readonly (readonly (string | number | null)[])[][]): string {
  const body = blocks
    .map((rows) => Papa.unparse(rows.map((r) => r.map((v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v))) as unknown[][], { escapeFormulae: FORMULA_START, newline: '\r\n' }))
    .join('\r\n\r\n');
  return `\uFEFF${body}\r\n`;
}
