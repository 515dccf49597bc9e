/**
 * Import shapes shared by the API (server/imports) and the screens: kinds, statuses, the problems a
 * file has, and what the API answers about an import. Plain data, no Node imports.
 */

import type { DecimalMark } from './cell-parsers.js';

/** Limits on what an import reads; each one answers a clear message when exceeded. */
export const IMPORT_LIMITS = {
  /** Upload size (413 above it). */
  maxFileBytes: 20 * 1024 * 1024,
  /** Data rows, header excluded (422 above it). */
  maxRows: 200_000,
  /** XLSX: total uncompressed size of the workbook's zip entries (422 above it). */
  maxUncompressedBytes: 100 * 1024 * 1024,
  /** XLSX: uncompressed ÷ compressed size, checked once the workbook expands past 1 MB. */
  maxCompressionRatio: 100,
  ratioCheckFromBytes: 1024 * 1024,
  maxZipEntries: 10_000,
  /** Errors listed in a response; the rest are counted. */
  maxListedErrors: 1000,
  previewRows: 20,
  /** Longest cell read into a text field or shown in the preview. */
  maxCellChars: 1000,
} as const;

export type ImportLimits = { -readonly [K in keyof typeof IMPORT_LIMITS]: number };

export const IMPORT_KINDS = ['prices', 'records', 'observations', 'contracts'] as const;
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

export type TableName = 'prices' | 'records' | 'factors' | 'contracts';
export type TableCounts = Record<TableName, number>;

export interface CommitCounts {
  inserted: number;
  updated: number;
  skipped: number;
}

/** What reading and checking a file found (the server adds the rows ready for the database). */
export interface ImportReport {
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
  /** Values that may be right but are asked about (a price far from its item's history); the commit needs them accepted. */
  warningCount: number;
  warnings: ImportError[];
  /** Seasons the file names that are not set up yet (well-formed), offered for creation in the preview. */
  unknownSeasons: { label: string; startYear: number; row: number; rows: number }[];
  /** How the file's numbers were read: 1234.5 (`point`) or 1234,5 (`comma`). */
  decimalMark: DecimalMark;
  /** How the file was read where a choice was made (delivery point, averaged prices, other worksheets). */
  notes: string[];
}

/** Stored in imports.result and answered by the API (without the rows to write). */
export interface ImportResult extends ImportReport {
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
