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

/**
 * The rows as CSV text: comma separated, CRLF line ends (RFC 4180), with a UTF-8 byte order mark so
 * spreadsheet programs read accents correctly (common practice, no source).
 */
export function toCsv(rows: readonly SheetRow[], columns: readonly SheetColumn[]): string {
  const data = rows.map((r) => columns.map((c) => plainValue(r[c.key], c.type)));
  const body = Papa.unparse(
    { fields: columns.map((c) => c.header), data },
    // papaparse only escapes strings; its own default pattern misses text with a line break after the
    // first character, so ours is passed in.
    { escapeFormulae: FORMULA_START, newline: '\r\n' },
  );
  return `\uFEFF${body}\r\n`;
}

function safeSheetName(name: string): string {
  // Excel's rules: at most 31 characters, none of : \ / ? * [ ]
  return name.replace(/[:\\/?*[\]]/g, ' ').trim().slice(0, 31) || 'Sheet1';
}

/** The rows as an .xlsx workbook with one worksheet: a bold, frozen header row and typed cells. */
export async function toXlsx(rows: readonly SheetRow[], columns: readonly SheetColumn[], sheetName: string): Promise<Buffer> {
  const { default: Excel } = await import('exceljs');
  const wb = new Excel.Workbook();
  wb.creator = 'Netput';
  const ws = wb.addWorksheet(safeSheetName(sheetName), { views: [{ state: 'frozen', ySplit: 1 }] });
  ws.columns = columns.map((c) => ({ header: escapeFormula(c.header), key: c.key, width: c.width ?? Math.max(10, c.header.length + 2) }));
  ws.getRow(1).font = { bold: true };
  for (const r of rows) {
    const values: unknown[] = columns.map((c) => {
      const v = plainValue(r[c.key], c.type);
      if (v === null) return null;
      if (c.type === 'date' && typeof v === 'string') {
        const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(v);
        if (m) return new Date(Date.UTC(+m[1], +m[2] - 1, +m[3]));
      }
      return typeof v === 'string' ? escapeFormula(v) : v;
    });
    ws.addRow(values);
  }
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
