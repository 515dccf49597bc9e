import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import type { ColDef, RowClickedEvent } from 'ag-grid-community';
import { AgGridAngular } from '../shared/grid';
import { GridFooter } from './grid-footer';
import { quantityCell } from './outlook-format';
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

/** Every farm of the projection at its own fixed factors, base scenario; a row opens the farm's detail. */
@Component({
  selector: 'np-farms-grid',
  imports: [AgGridAngular, GridFooter],
  template: `
    <ag-grid-angular
      #grid
      class="grid"
      aria-label="Farms, base scenario"
      [rowData]="rows()"
      [columnDefs]="columns()"
      [pagination]="true"
      [paginationPageSize]="10"
      [paginationPageSizeSelector]="[10, 20, 50]"
      domLayout="autoHeight"
      (rowClicked)="rowClicked($event)"
    />
    <np-grid-footer [grid]="grid" [fileName]="fileName()">Base scenario at the estimates. Choose a row for the farm's bands and fan chart.</np-grid-footer>
  `,
  styles: `
    :host {
      display: block;
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
      { field: 'land', headerName: 'Land, ha', type: 'numericColumn', width: 110, valueFormatter: quantityCell },
      ...(first?.items ?? []).map(
        (it): ColDef<FarmRow> => ({ field: `i_${it.item}`, headerName: `${it.name}, ${it.unit}`, type: 'numericColumn', minWidth: 120, flex: 1, wrapHeaderText: true, autoHeaderHeight: true, valueFormatter: quantityCell }),
      ),
    ];
  });

  protected rowClicked(event: RowClickedEvent<FarmRow>): void {
    if (event.data) this.selected.emit(event.data.farmId);
  }
}
