import { ChangeDetectionStrategy, Component, computed, input, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { AgGridAngular } from 'ag-grid-angular';
import type { ColDef, ColGroupDef, GridApi, GridReadyEvent } from 'ag-grid-community';
import { gridTheme } from '../shared/grid';
import { csvCell, formatQuantity } from './outlook-format';
import { SCENARIO_NAMES, scenarioLabel, type ItemProjection, type QuantitySummary } from './outlook-types';

/** One grid row: an item with each scenario's 5 %, median and 95 % points, in item units or tonnes. */
export interface ProjectionRow {
  item: string;
  name: string;
  role: string;
  unit: string;
  point: number | null;
  [key: string]: string | number | null;
}

/**
 * Rows of the projection table. In tonnes, items counted by mass (t, kg N, kg P2O5 …) are shown in
 * their tonnes unit (t, t N, t P2O5 …); litres and hours stay as they are.
 */
export function projectionRows(items: readonly ItemProjection[], tonnes: boolean): ProjectionRow[] {
  return items.map((it) => {
    const useTonnes = tonnes && it.tonnes !== null;
    const scenarios: Record<string, QuantitySummary> = useTonnes ? it.tonnes!.scenarios : it.scenarios;
    const row: ProjectionRow = {
      item: it.item,
      name: it.name,
      role: it.role === 'output' ? 'supply' : 'demand',
      unit: useTonnes ? it.tonnes!.unit : it.unit,
      point: scenarios['base']?.point ?? null,
    };
    for (const s of SCENARIO_NAMES) {
      const q = scenarios[s];
      row[`${s}_p5`] = q?.p5 ?? null;
      row[`${s}_median`] = q?.median ?? null;
      row[`${s}_p95`] = q?.p95 ?? null;
    }
    return row;
  });
}

const quantity = (p: { value: unknown }) => (typeof p.value === 'number' ? formatQuantity(p.value) : '—');

/** Supply and input demand of the co-op or one farm per price scenario, with 5–95 % bands (AG Grid). */
@Component({
  selector: 'np-projection-grid',
  imports: [AgGridAngular, MatButton, MatIcon],
  template: `
    <ag-grid-angular
      class="grid"
      [attr.aria-label]="label()"
      [theme]="theme"
      [rowData]="rows()"
      [columnDefs]="columns"
      [defaultColDef]="defaultColDef"
      domLayout="autoHeight"
      (gridReady)="gridReady($event)"
    />
    <div class="under">
      <span class="np-muted">Outputs are supply, inputs demand. Median and 5–95 % band of {{ draws() }} simulated seasons; “at estimates” is the base scenario at the fitted parameters, without noise (the figure of the e-mail). The arrows by a scenario open its band.</span>
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
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProjectionGrid {
  // inputs
  readonly items = input.required<readonly ItemProjection[]>();
  readonly tonnes = input(false);
  readonly label = input('Projection');
  readonly draws = input<number | null>(null);
  /** The CSV file name, without extension. */
  readonly fileName = input('netput-projection');

  protected readonly theme = gridTheme;
  protected readonly rows = computed(() => projectionRows(this.items(), this.tonnes()));
  readonly #grid = signal<GridApi<ProjectionRow> | null>(null);

  protected readonly columns: (ColDef<ProjectionRow> | ColGroupDef<ProjectionRow>)[] = [
    { field: 'name', headerName: 'Item', pinned: 'left', minWidth: 160, flex: 2 },
    { field: 'unit', headerName: 'Unit', width: 90 },
    ...SCENARIO_NAMES.map(
      (s): ColGroupDef<ProjectionRow> => ({
        headerName: scenarioLabel(s),
        openByDefault: s === 'base',
        children: [
          { field: `${s}_p5`, headerName: '5 %', type: 'numericColumn', minWidth: 88, flex: 1, valueFormatter: quantity, columnGroupShow: 'open' },
          { field: `${s}_median`, headerName: 'Median', type: 'numericColumn', minWidth: s === 'base' ? 104 : 124, flex: 1, valueFormatter: quantity },
          { field: `${s}_p95`, headerName: '95 %', type: 'numericColumn', minWidth: 88, flex: 1, valueFormatter: quantity, columnGroupShow: 'open' },
          ...(s === 'base'
            ? [{ field: 'point', headerName: 'At estimates', type: 'numericColumn', minWidth: 116, flex: 1, valueFormatter: quantity, columnGroupShow: 'open' } as ColDef<ProjectionRow>]
            : []),
        ],
      }),
    ),
  ];
  protected readonly defaultColDef: ColDef = { sortable: true, resizable: true };

  protected gridReady(event: GridReadyEvent<ProjectionRow>): void {
    this.#grid.set(event.api);
  }

  protected exportCsv(): void {
    this.#grid()?.exportDataAsCsv({ fileName: `${this.fileName()}.csv`, processCellCallback: csvCell });
  }
}
