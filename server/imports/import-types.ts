/**
 * Types shared by the import reader, validator, worker and service. The API shapes (ImportView,
 * ImportSummary) belong in shared/api-types.ts once the client uses them.
 */
import type { BuiltWrites } from './packed-rows.js';

export const IMPORT_KINDS = ['prices', 'records', 'observations'] as const;
export const IMPORT_STATUSES = ['validated', 'committing', 'committed', 'failed'] as const;

export type ImportKind = (typeof IMPORT_KINDS)[number];
export type ImportStatus = (typeof IMPORT_STATUSES)[number];
export type ImportFormat = 'csv' | 'xlsx';
export type OnExisting = 'update' | 'skip';

/** One problem with the file: `row` as a spreadsheet shows it (header = its own row), `column` as headed. */
export interface ImportError {
  row: number | null;
  column: string | null;
  message: string;
}

export interface PreviewRow {
  row: number;
  /** Cells in the order of `columns`, as read (text). */
  cells: string[];
}

/** A field the file's columns can be mapped to. */
export interface ImportField {
  field: string;
  label: string;
  required: boolean;
}

/** The reference data a file is checked against (read from the database before each validation). */
export interface Lookups {
  items: { id: number; code: string; name: string; unit: string; role: 'output' | 'input' }[];
  seasons: { id: number; label: string; startYear: number; startsOn: string }[];
  farms: { id: number; code: string }[];
  deliveryPoints: { id: number; name: string }[];
  /** The co-op's currency (settings): the default for prices that name none. */
  currency: string;
}

export interface ValidationOptions {
  kind: ImportKind;
  fileName: string;
  /** `{ targetField: sourceColumn }`; a field mapped to null or '' is left unmapped. Overrides the suggestion. */
  mapping?: Record<string, string | null>;
  /** Delivery point for prices that name none (observation files; price files without the column). */
  deliveryPoint?: string;
}

export interface PriceWrite {
  row: number;
  itemId: number;
  seasonId: number;
  deliveryPointId: number;
  price: number;
  currency: string;
  source: string;
  observedOn: string;
}

export interface RecordWrite {
  row: number;
  farmId: number;
  seasonId: number;
  itemId: number;
  quantity: number;
}

export interface FactorWrite {
  row: number;
  farmId: number;
  seasonId: number;
  factor: string;
  value: number;
}

export interface ImportWrites {
  prices: PriceWrite[];
  records: RecordWrite[];
  factors: FactorWrite[];
}

export type TableName = keyof ImportWrites;
export type TableCounts = Record<TableName, number>;

export interface CommitCounts {
  inserted: number;
  updated: number;
  skipped: number;
}

/** What reading and checking a file found; `writes` holds the rows ready for the database (packed in columns). */
export interface ValidationOutcome {
  format: ImportFormat;
  /** Text encoding of a CSV file (utf-8, utf-16le, windows-1252). */
  encoding: string | null;
  delimiter: string | null;
  /** Worksheet read from an XLSX file. */
  sheet: string | null;
  headerRow: number | null;
  columns: string[];
  fields: ImportField[];
  suggestedMapping: Record<string, string>;
  mapping: Record<string, string>;
  /** Columns no field is mapped to; they are not imported. */
  ignoredColumns: string[];
  preview: PreviewRow[];
  totalRows: number;
  validRows: number;
  errorCount: number;
  /** The first MAX_LISTED_ERRORS errors, in file order. */
  errors: ImportError[];
  /** How the file was read where a choice was made (delivery point, averaged prices, other worksheets). */
  notes: string[];
  writes: BuiltWrites;
}

/** Stored in imports.result and answered by the API (without the rows to write). */
export interface ImportResult extends Omit<ValidationOutcome, 'writes'> {
  errorsNotShown: number;
  /** Rows the commit would write, per table. */
  toWrite: TableCounts;
  /** Of those, rows whose natural key is already in the database. */
  existing: TableCounts;
  existingRows: number;
  deliveryPoint: string | null;
  onExisting: OnExisting | null;
  counts: CommitCounts | null;
  countsByTable: Record<TableName, CommitCounts> | null;
  /** Why the last commit failed (nothing was written). */
  failure: string | null;
  commitStartedAt: string | null;
  /** The server process that started the commit (imports-service's PROCESS_ID). */
  commitProcess?: string;
}

export interface ImportView extends ImportResult {
  id: number;
  kind: ImportKind;
  fileName: string;
  fileSize: number;
  status: ImportStatus;
  createdAt: string;
  createdBy: string | null;
  committedAt: string | null;
  progress: { done: number; total: number };
}

export interface ImportSummary {
  id: number;
  kind: ImportKind;
  fileName: string;
  fileSize: number;
  format: ImportFormat;
  status: ImportStatus;
  createdAt: string;
  createdBy: string | null;
  committedAt: string | null;
  totalRows: number;
  errorCount: number;
  counts: CommitCounts | null;
}
