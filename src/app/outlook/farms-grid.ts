import { ChangeDetectionStrategy, Component, computed, input, output, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import type { ColDef, GridApi, GridReadyEvent, RowClickedEvent } from 'ag-grid-community';
import { AgGridAngular } from '../shared/grid';
import { csvCell, formatQuantity } from './outlook-format';
import type { FarmOutlook } from './outlook-api-types';

export interface FarmRow {
  farmId: number;
  code: string;
  name: string;
  region: string;
  land: number | null;
  [item: string]: string | number | null;
}

/** One row per farm: land it was projected at and each item's base projection (at the estimates). */
export function farmRows(farms: readonly FarmOutlook[]): FarmRow[] {
  return farms.map((f) => {
    const row: FarmRow = { farmId: f.farmId, code: f.code, name: f.name, region: f.region, land: f.fixed['land_ha'] ?? null };
    for (const it of f.items) row[`i_${it.item}`] = it.scenarios['base']?.point ?? null;
    return row;
  });
}

const quantity = (p: { value: unknown }) => (typeof p.value === 'number' ? formatQuantity(p.value) : '—');

/** Every farm of the projection at its own fixed factors, base scenario; a row opens the farm's detail. */
@Component({
  selector: 'np-farms-grid',
  imports: [AgGridAngular, MatButton, MatIcon],
  template: `
    <ag-grid-angular
      class="grid"
      aria-label="Farms, base scenario"
      [rowData]="rows()"
      [columnDefs]="columns()"
      [pagination]="true"
      [paginationPageSize]="10"
      [paginationPageSizeSelector]="[10, 20, 50]"
      domLayout="autoHeight"
      (gridReady)="gridReady($event)"
      (rowClicked)="rowClicked($event)"
    />
    <div class="under">
      <span class="np-muted">Base scenario at the estimates. Choose a row for the farm's bands and fan chart.</span>
      <button matButton type="button" (click)="exportCsv()"><mat-icon>download</mat-icon>Export CSV</button>
    </div>
  `,
  styles: `
    :host {
      display: block;
    }
    .under {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      justify-content: space-between;
      gap: 4px 16px;
      margin-top: 4px;
      font: var(--mat-sys-body-small);
    }
    :host ::ng-deep .ag-row {
      cursor: pointer;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmsGrid {
  // inputs
  readonly farms = input.required<readonly FarmOutlook[]>();
  readonly fileName = input('netput-farms-projection');

  readonly selected = output<number>();

  protected readonly rows = computed(() => farmRows(this.farms()));
  protected readonly columns = computed<ColDef<FarmRow>[]>(() => {
    const first = this.farms()[0];
    return [
      { field: 'code', headerName: 'Code', width: 90, pinned: 'left', sort: 'asc' },
      { field: 'name', headerName: 'Farm', minWidth: 170, flex: 2, filter: 'agTextColumnFilter' },
      { field: 'region', headerName: 'Region', minWidth: 120, flex: 1, filter: 'agTextColumnFilter' },
      { field: 'land', headerName: 'Land, ha', type: 'numericColumn', width: 110, valueFormatter: quantity },
      ...(first?.items ?? []).map(
        (it): ColDef<FarmRow> => ({ field: `i_${it.item}`, headerName: `${it.name}, ${it.unit}`, type: 'numericColumn', minWidth: 120, flex: 1, wrapHeaderText: true, autoHeaderHeight: true, valueFormatter: quantity }),
      ),
    ];
  });
  readonly #grid = signal<GridApi<FarmRow> | null>(null);

  protected gridReady(event: GridReadyEvent<FarmRow>): void {
    this.#grid.set(event.api);
  }

  protected rowClicked(event: RowClickedEvent<FarmRow>): void {
    if (event.data) this.selected.emit(event.data.farmId);
  }

  protected exportCsv(): void {
    this.#grid()?.exportDataAsCsv({ fileName: `${this.fileName()}.csv`, processCellCallback: csvCell });
  }
}
