import { DecimalPipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatLabel, MatPrefix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { AgGridAngular } from 'ag-grid-angular';
import type { ColDef, GridApi, GridReadyEvent } from 'ag-grid-community';
import type { FarmSummary } from '../../../shared/api-types';
import { errorMessage } from '../core/api-error';
import { gridTheme } from '../shared/grid';

const landFormat = new Intl.NumberFormat(undefined, { minimumFractionDigits: 1, maximumFractionDigits: 1 });

/** `/farms`: every farm of the co-op, read-only for now. */
@Component({
  selector: 'np-farms-list',
  imports: [DecimalPipe, AgGridAngular, MatFormField, MatLabel, MatPrefix, MatInput, MatIcon, MatButton, MatProgressBar],
  templateUrl: './farms-list.html',
  styleUrl: './farms-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmsList {
  protected readonly farms = httpResource<FarmSummary[]>(() => '/api/farms', { defaultValue: [] });
  protected readonly rows = computed(() => (this.farms.hasValue() ? this.farms.value() : []));
  protected readonly problem = computed(() => (this.farms.error() ? errorMessage(this.farms.error()) : null));
  protected readonly totalLand = computed(() => this.rows().reduce((sum, f) => sum + f.landHa, 0));
  protected readonly quickFilter = signal('');
  readonly #grid = signal<GridApi<FarmSummary> | null>(null);

  protected readonly theme = gridTheme;
  protected readonly columns: ColDef<FarmSummary>[] = [
    { field: 'code', headerName: 'Code', width: 110, filter: 'agTextColumnFilter', sort: 'asc' },
    { field: 'name', headerName: 'Farm', flex: 2, minWidth: 180, filter: 'agTextColumnFilter' },
    { field: 'region', headerName: 'Region', flex: 1, minWidth: 140, filter: 'agTextColumnFilter' },
    {
      field: 'landHa',
      headerName: 'Land (ha)',
      type: 'numericColumn',
      width: 130,
      filter: 'agNumberColumnFilter',
      valueFormatter: (p) => (p.value == null ? '' : landFormat.format(p.value as number)),
    },
    {
      field: 'ownerName',
      headerName: 'Member',
      flex: 1,
      minWidth: 160,
      filter: 'agTextColumnFilter',
      valueFormatter: (p) => (p.value as string | null) ?? 'no account linked',
    },
  ];
  protected readonly defaultColDef: ColDef = { sortable: true, resizable: true };

  protected gridReady(event: GridReadyEvent<FarmSummary>): void {
    this.#grid.set(event.api);
  }

  protected exportCsv(): void {
    this.#grid()?.exportDataAsCsv({ fileName: 'netput-farms.csv' });
  }
}
