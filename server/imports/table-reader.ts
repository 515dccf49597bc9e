/**
 * Reads an uploaded CSV or XLSX file row by row, as text cells, without building the whole table:
 * papaparse's step mode for CSV, exceljs' streaming WorkbookReader for XLSX. Row numbers are those a
 * spreadsheet shows (the first line or row is 1, blank rows count).
 */
import { Readable } from 'node:stream';
import type ExcelJS from 'exceljs';
import Papa from 'papaparse';
import type { ImportError, ImportFormat } from './import-types.js';
import { ImportFileError } from './import-file-error.js';
import { guessDelimiter } from '../../shared/cell-parsers.js';
import type { ImportLimits } from './import-limits.js';
import { checkWorkbookZip, isOldExcel, isZip } from './zip-guard.js';

export interface TableMeta {
  format: ImportFormat;
  encoding: string | null;
  delimiter: string | null;
  sheet: string | null;
  notes: string[];
}

/** Receives every row (header included); `problem` gets reader-level errors such as an unclosed quote. */
export interface TableSink {
  row(rowNumber: number, cells: string[]): void;
  problem(error: ImportError): void;
}

const WORKBOOK_NAME = /\.(xlsx|xlsm)$/i;

/** Decodes CSV bytes: a BOM decides; else UTF-8 when valid, else Windows-1252 (what Excel writes as "CSV"). */
export function decodeText(bytes: Uint8Array): { text: string; encoding: string } {
  if (bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) return { text: new TextDecoder('utf-8').decode(bytes.subarray(3)), encoding: 'utf-8' };
  if (bytes[0] === 0xff && bytes[1] === 0xfe) return { text: new TextDecoder('utf-16le').decode(bytes.subarray(2)), encoding: 'utf-16le' };
  if (bytes[0] === 0xfe && bytes[1] === 0xff) return { text: new TextDecoder('utf-16be').decode(bytes.subarray(2)), encoding: 'utf-16be' };
  try {
    return { text: new TextDecoder('utf-8', { fatal: true }).decode(bytes), encoding: 'utf-8' };
  } catch {
    return { text: new TextDecoder('windows-1252').decode(bytes), encoding: 'windows-1252' };
  }
}

/** Which reader a file needs, by its first bytes (the name only explains a refusal). */
export function sniffFormat(bytes: Uint8Array, fileName: string): ImportFormat {
  if (bytes.length === 0) throw new ImportFileError(422, 'empty_file', 'The file is empty');
  if (isOldExcel(bytes)) throw new ImportFileError(422, 'unsupported_format', 'This is an old Excel workbook (.xls); save it as .xlsx or as CSV and upload that');
  if (isZip(bytes)) return 'xlsx';
  if (WORKBOOK_NAME.test(fileName)) throw new ImportFileError(422, 'unsupported_format', `${fileName} is named as an Excel workbook but is not one; save it again as .xlsx or as CSV`);
  return 'csv';
}

function readCsv(bytes: Uint8Array, sink: TableSink): TableMeta {
  const { text, encoding } = decodeText(bytes);
  if (text.includes('\u0000')) {
    throw new ImportFileError(422, 'unsupported_format', 'The file is not a text (CSV) file or an .xlsx workbook; save it as CSV (UTF-8) or .xlsx');
  }
  let rowNumber = 0;
  let failure: unknown = null;
  let delimiter: string | null = null;
  Papa.parse<string[]>(text, {
    delimiter: guessDelimiter(text) ?? '',
    delimitersToGuess: [',', ';', '\t', '|'],
    skipEmptyLines: false,
    step: (res, parser) => {
      rowNumber++;
      delimiter ??= res.meta.delimiter;
      try {
        for (const e of res.errors) {
          if (e.type === 'Quotes') {
            sink.problem({
              row: rowNumber,
              column: null,
              message:
                e.code === 'MissingQuotes'
                  ? 'a quoted cell is not closed: the rest of the file was read as one cell'
                  : 'a quote inside a cell is not doubled (write "" for a quote inside a quoted cell)',
            });
          }
        }
        sink.row(rowNumber, res.data);
      } catch (err) {
        failure = err;
        parser.abort();
      }
    },
  });
  if (failure) throw failure;
  return { format: 'csv', encoding, delimiter, sheet: null, notes: [] };
}

/** An exceljs cell value as the text a user sees in the cell. */
export function cellText(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'string') return v;
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  if (v instanceof Date) {
    if (Number.isNaN(v.getTime())) return '';
    const iso = v.toISOString();
    return iso.endsWith('T00:00:00.000Z') ? iso.slice(0, 10) : iso.replace('.000Z', 'Z');
  }
  if (typeof v === 'object') {
    const o = v as Record<string, unknown>;
    if ('error' in o) return String(o.error);
    if ('formula' in o || 'sharedFormula' in o) return cellText(o.result);
    if (Array.isArray(o.richText)) return o.richText.map((r: { text?: string }) => r.text ?? '').join('');
    if ('text' in o) return cellText(o.text);
  }
  return String(v);
}

async function readXlsx(bytes: Uint8Array, sink: TableSink, limits: ImportLimits): Promise<TableMeta> {
  const buf = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  await checkWorkbookZip(buf, limits);
  // exceljs takes a second to load: only workbooks pay for it.
  const { default: Excel } = await import('exceljs');
  const reader = new Excel.stream.xlsx.WorkbookReader(Readable.from([buf]), {
    worksheets: 'emit',
    sharedStrings: 'cache',
    styles: 'cache',
    hyperlinks: 'ignore',
    entries: 'ignore',
  });
  const notes: string[] = [];
  let sheet: string | null = null;
  try {
    for await (const worksheet of reader) {
      sheet = (worksheet as unknown as { name: string }).name;
      for await (const row of worksheet as unknown as AsyncIterable<ExcelJS.Row>) {
        const values = row.values as unknown[];
        const cells: string[] = [];
        for (let i = 1; i < values.length; i++) cells.push(cellText(values[i]));
        sink.row(row.number, cells);
      }
      break;
    }
  } catch (err) {
    if (err instanceof ImportFileError) throw err;
    throw new ImportFileError(422, 'unreadable_workbook', 'The workbook cannot be read (it may be damaged or password-protected); save it again as .xlsx or as CSV');
  }
  if (sheet === null) throw new ImportFileError(422, 'unreadable_workbook', 'The workbook has no worksheet');
  const sheets = (reader as unknown as { model?: { sheets?: { name: string }[] } }).model?.sheets ?? [];
  if (sheets.length > 1) notes.push(`Read the worksheet "${sheet}"; the workbook's other worksheets (${sheets.length - 1}) were not read.`);
  return { format: 'xlsx', encoding: null, delimiter: null, sheet, notes };
}

/** Reads the file into `sink`; throws ImportFileError (nothing usable) for unreadable files. */
export async function readTable(bytes: Uint8Array, fileName: string, sink: TableSink, limits: ImportLimits): Promise<TableMeta> {
  const format = sniffFormat(bytes, fileName);
  return format === 'xlsx' ? readXlsx(bytes, sink, limits) : readCsv(bytes, sink);
}
