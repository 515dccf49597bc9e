import type { DecimalMark } from '../../../../shared/cell-parsers';
import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';

import { IMPORT_LIMITS, type ImportView, type ImportKind, type OnExisting } from '../../../../shared/import-types';

export type {
  CommitCounts,
  ImportError as ImportProblem,
  ImportField as ImportFieldInfo,
  ImportKind,
  ImportStatus,
  ImportSummary,
  ImportView,
  OnExisting,
  TableName,
} from '../../../../shared/import-types';

/** The limits the server applies, checked here first so a person hears at once. */
export const IMPORT_FILE_LIMITS = { maxBytes: IMPORT_LIMITS.maxFileBytes, maxRows: IMPORT_LIMITS.maxRows } as const;

/** Upload, re-check with another mapping, commit and follow an import. */
@Injectable({ providedIn: 'root' })
export class ImportsApi {
  readonly #http = inject(HttpClient);

  upload(file: File, kind: ImportKind, options: { mapping?: Record<string, string | null>; deliveryPoint?: string | null; decimalMark?: DecimalMark | null } = {}): Promise<ImportView> {
    const form = new FormData();
    form.append('kind', kind);
    if (options.decimalMark) form.append('decimalMark', options.decimalMark);
    if (options.mapping) form.append('mapping', JSON.stringify(options.mapping));
    if (options.deliveryPoint) form.append('deliveryPoint', options.deliveryPoint);
    form.append('file', file, file.name);
    return firstValueFrom(this.#http.post<ImportView>('/api/imports', form));
  }

  validate(id: number, body: { mapping?: Record<string, string | null>; deliveryPoint?: string | null; decimalMark?: DecimalMark }): Promise<ImportView> {
    return firstValueFrom(this.#http.post<ImportView>(`/api/imports/${id}/validate`, body));
  }

  /** `acceptWarnings`: the planner has checked the values far from their history. */
  commit(id: number, onExisting: OnExisting, acceptWarnings = false): Promise<Pick<ImportView, 'id' | 'status' | 'progress'>> {
    return firstValueFrom(this.#http.post<Pick<ImportView, 'id' | 'status' | 'progress'>>(`/api/imports/${id}/commit`, { onExisting, acceptWarnings }));
  }

  get(id: number): Promise<ImportView> {
    return firstValueFrom(this.#http.get<ImportView>(`/api/imports/${id}`));
  }
}
