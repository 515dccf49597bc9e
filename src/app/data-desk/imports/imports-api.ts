import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';

// The API shapes of server/imports/import-types.ts (ImportView, ImportSummary), repeated here until
// they move to shared/api-types.ts; only the fields this client reads.

export type ImportKind = 'prices' | 'records' | 'observations';
export type ImportStatus = 'validated' | 'committing' | 'committed' | 'failed';
export type OnExisting = 'update' | 'skip';
export type TableName = 'prices' | 'records' | 'factors';

export interface ImportProblem {
  row: number | null;
  column: string | null;
  message: string;
}

export interface ImportFieldInfo {
  field: string;
  label: string;
  required: boolean;
}

export interface CommitCounts {
  inserted: number;
  updated: number;
  skipped: number;
}

export interface ImportView {
  id: number;
  kind: ImportKind;
  fileName: string;
  fileSize: number;
  status: ImportStatus;
  createdAt: string;
  createdBy: string | null;
  committedAt: string | null;
  progress: { done: number; total: number };
  format: 'csv' | 'xlsx';
  encoding: string | null;
  delimiter: string | null;
  sheet: string | null;
  headerRow: number | null;
  columns: string[];
  fields: ImportFieldInfo[];
  suggestedMapping: Record<string, string>;
  mapping: Record<string, string>;
  ignoredColumns: string[];
  preview: { row: number; cells: string[] }[];
  totalRows: number;
  validRows: number;
  errorCount: number;
  errors: ImportProblem[];
  errorsNotShown: number;
  notes: string[];
  toWrite: Record<TableName, number>;
  existing: Record<TableName, number>;
  existingRows: number;
  deliveryPoint: string | null;
  onExisting: OnExisting | null;
  counts: CommitCounts | null;
  countsByTable: Record<TableName, CommitCounts> | null;
  failure: string | null;
  commitStartedAt: string | null;
}

export interface ImportSummary {
  id: number;
  kind: ImportKind;
  fileName: string;
  fileSize: number;
  format: 'csv' | 'xlsx';
  status: ImportStatus;
  createdAt: string;
  createdBy: string | null;
  committedAt: string | null;
  totalRows: number;
  errorCount: number;
  counts: CommitCounts | null;
}

/** The limits the server applies (server/imports/import-limits.ts), checked here first so a person hears at once. */
export const IMPORT_FILE_LIMITS = { maxBytes: 20 * 1024 * 1024, maxRows: 200_000 } as const;

/** Upload, re-check with another mapping, commit and follow an import. */
@Injectable({ providedIn: 'root' })
export class ImportsApi {
  readonly #http = inject(HttpClient);

  upload(file: File, kind: ImportKind, options: { mapping?: Record<string, string | null>; deliveryPoint?: string | null } = {}): Promise<ImportView> {
    const form = new FormData();
    form.append('kind', kind);
    if (options.mapping) form.append('mapping', JSON.stringify(options.mapping));
    if (options.deliveryPoint) form.append('deliveryPoint', options.deliveryPoint);
    form.append('file', file, file.name);
    return firstValueFrom(this.#http.post<ImportView>('/api/imports', form));
  }

  validate(id: number, body: { mapping?: Record<string, string | null>; deliveryPoint?: string | null }): Promise<ImportView> {
    return firstValueFrom(this.#http.post<ImportView>(`/api/imports/${id}/validate`, body));
  }

  commit(id: number, onExisting: OnExisting): Promise<Pick<ImportView, 'id' | 'status' | 'progress'>> {
    return firstValueFrom(this.#http.post<Pick<ImportView, 'id' | 'status' | 'progress'>>(`/api/imports/${id}/commit`, { onExisting }));
  }

  get(id: number): Promise<ImportView> {
    return firstValueFrom(this.#http.get<ImportView>(`/api/imports/${id}`));
  }
}
