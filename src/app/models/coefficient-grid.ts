import { ChangeDetectionStrategy, Component, computed, input, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatLabel, MatPrefix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { AgGridAngular } from 'ag-grid-angular';
import type { ColDef, GridApi, GridReadyEvent } from 'ag-grid-community';
import { gridTheme } from '../shared/grid';
import { formatSignificant, ItemLabels } from './model-format';
import type { FitRunResult } from './model-types';

interface CoefficientRow {
  equation: string;
  regressor: string;
  parameter: string;
  estimate: number;
  standardError: number;
  t: number;
}

/** Every estimated coefficient of the netput system with its standard error, one row per equation and regressor. */
@Component({
  selector: 'np-coefficient-grid',
  imports: [AgGridAngular, MatButton, MatFormField, MatLabel, MatPrefix, MatIcon, MatInput],
  template: `
    <p class="np-muted">
      Coefficients of each netput equation, named equation_regressor (e.g. wheat_canola: the canola price in the wheat equation). The same structural parameter appears in
      several equations when symmetry ties them together. |t| below about 2 means the coefficient is not clearly different from zero.
    </p>
    <div class="toolbar">
      <mat-form-field class="search">
        <mat-label>Search coefficients</mat-label>
        <mat-icon matPrefix aria-hidden="true">search</mat-icon>
        <input matInput type="search" [value]="quickFilter()" (input)="quickFilter.set($any($event.target).value)" />
      </mat-form-field>
      <button matButton="outlined" type="button" (click)="exportCsv()">
        <mat-icon>download</mat-icon>
        Export CSV
      </button>
    </div>
    <ag-grid-angular
      class="grid"
      aria-label="Coefficients"
      [theme]="theme"
      [rowData]="rows()"
      [columnDefs]="columns"
      [defaultColDef]="defaultColDef"
      [quickFilterText]="quickFilter()"
      [pagination]="true"
      [paginationPageSize]="20"
      [paginationPageSizeSelector]="[20, 50, 100]"
      domLayout="autoHeight"
      (gridReady)="gridReady($event)"
    />
  `,
  styles: `
    :host { display: flex; flex-direction: column; gap: 8px; }
    p { margin: 0; max-width: 90ch; }
    .toolbar { display: flex; flex-wrap: wrap; gap: 8px 16px; align-items: center; }
    .search { flex: 0 1 360px; }
    .grid { width: 100%; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CoefficientGrid {
  // inputs
  readonly result = input.required<FitRunResult>();
  readonly labels = input.required<ItemLabels>();
  readonly runId = input.required<number>();

  protected readonly theme = gridTheme;
  protected readonly quickFilter = signal('');
  readonly #grid = signal<GridApi<CoefficientRow> | null>(null);

  protected readonly rows = computed<CoefficientRow[]>(() =>
    this.result().fit.equations.flatMap((e) =>
      e.coefficients.map((c) => ({
        equation: `${this.labels().name(e.item)} ${e.role === 'output' ? 'supply' : 'demand'}`,
        regressor: c.name.startsWith(`${e.item}_`) ? c.name.slice(e.item.length + 1) : c.name,
        parameter: c.parameter,
        estimate: c.estimate,
        standardError: c.standardError,
        t: c.standardError > 0 ? c.estimate / c.standardError : NaN,
      })),
    ),
  );

  protected readonly columns: ColDef<CoefficientRow>[] = [
    { field: 'equation', headerName: 'Equation', flex: 1, minWidth: 170, filter: 'agTextColumnFilter' },
    { field: 'regressor', headerName: 'Regressor', flex: 1, minWidth: 150, filter: 'agTextColumnFilter' },
    { field: 'parameter', headerName: 'Parameter', flex: 1, minWidth: 150, filter: 'agTextColumnFilter' },
    { field: 'estimate', headerName: 'Estimate', type: 'numericColumn', width: 130, valueFormatter: (p) => formatSignificant(p.value as number) },
    { field: 'standardError', headerName: 'Std. error', type: 'numericColumn', width: 130, valueFormatter: (p) => formatSignificant(p.value as number) },
    {
      field: 't',
      headerName: 't value',
      type: 'numericColumn',
      width: 110,
      filter: 'agNumberColumnFilter',
      valueFormatter: (p) => (Number.isFinite(p.value) ? (p.value as number).toFixed(2).replace('-', '−') : '—'),
    },
  ];
  protected readonly defaultColDef: ColDef = { sortable: true, resizable: true };

  protected gridReady(event: GridReadyEvent<CoefficientRow>): void {
    this.#grid.set(event.api);
  }

  protected exportCsv(): void {
    this.#grid()?.exportDataAsCsv({ fileName: `netput-run-${this.runId()}-coefficients.csv` });
  }
}
