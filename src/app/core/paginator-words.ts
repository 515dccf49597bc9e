import { Injectable } from '@angular/core';
import { MatPaginatorIntl } from '@angular/material/paginator';

/** The paginator's words, the same as the grids' pager (src/app/shared/grid.ts): "Rows 1–25 of 80", "Rows at a time". */
@Injectable()
export class PaginatorWords extends MatPaginatorIntl {
  override itemsPerPageLabel = 'Rows at a time';
  override nextPageLabel = 'Next part';
  override previousPageLabel = 'Previous part';
  override firstPageLabel = 'First part';
  override lastPageLabel = 'Last part';
  override getRangeLabel = (page: number, pageSize: number, length: number): string => {
    if (length === 0 || pageSize === 0) return 'No rows';
    const first = page * pageSize + 1;
    const last = Math.min(length, (page + 1) * pageSize);
    return `Rows ${first}–${last} of ${length}`;
  };
}
