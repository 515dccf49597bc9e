import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { ColDef, ColGroupDef } from 'ag-grid-community';
import { AgGridAngular, WRAPPED_HEADINGS } from '../shared/grid';
import { GridFooter } from './grid-footer';
import { quantityCell } from './outlook-format';
import { SCENARIO_NAMES, scenarioLabel, type ItemProjection, type QuantitySummary } from './outlook-api-types';

/**
 * One grid row: an item with each scenario's figure at the estimates (`point` for the base,
 * `low_point`, `high_point`) and its 5 %, median and 95 % points, in item units or tonnes.
 */
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
      if (s !== 'base') row[`${s}_point`] = q?.point ?? null;
      row[`${s}_p5`] = q?.p5 ?? null;
      row[`${s}_median`] = q?.median ?? null;
      row[`${s}_p95`] = q?.p95 ?? null;
    }
    return row;
  });
}

/**
 * Width in px that shows a formatted number whole: digits of the app font at 14 px are about 8 px
 * wide, separators about 4 px, plus the cell's padding and a margin for the sort arrow.
 */
export function numberWidth(text: string): number {
  const digits = (text.match(/[0-9−]/g) ?? []).length;
  return Math.ceil(digits * 8.2 + (text.length - digits) * 4.2 + 44);
}

/** The columns of one scenario, each at least as wide as its widest formatted value and its header. */
function scenarioColumns(rows: readonly ProjectionRow[]): ColGroupDef<ProjectionRow>[] {
  const widest = (field: string, header: number) => Math.max(header, ...rows.map((r) => numberWidth(quantityCell({ value: r[field] }))));
  return SCENARIO_NAMES.map((s) => ({
    headerName: s === 'base' ? 'Base' : s === 'low' ? 'Low' : 'High',
    headerTooltip: `${scenarioLabel(s)}${s === 'base' ? ': the expected prices' : ': see the prices of the scenarios'}. The arrow opens or closes its 5–95 % band.`,
    openByDefault: s === 'base',
    children: [
      {
        field: s === 'base' ? 'point' : `${s}_point`,
        headerName: 'At estimates',
        headerTooltip: 'At the estimates: the model at its fitted parameters, without chance variation (the figure of the e-mail and of the member portal)',
        type: 'numericColumn',
        minWidth: widest(s === 'base' ? 'point' : `${s}_point`, 96),
        flex: 1,
        valueFormatter: quantityCell,
      },
      { field: `${s}_p5`, headerName: '5 %', headerTooltip: '5 % of the simulated outcomes fall below this', type: 'numericColumn', minWidth: widest(`${s}_p5`, 76), flex: 1, valueFormatter: quantityCell, columnGroupShow: 'open' },
      { field: `${s}_median`, headerName: 'Median', headerTooltip: 'Median of the simulated outcomes', type: 'numericColumn', minWidth: widest(`${s}_median`, 96), flex: 1, valueFormatter: quantityCell, columnGroupShow: 'open' },
      { field: `${s}_p95`, headerName: '95 %', headerTooltip: '95 % of the simulated outcomes fall below this', type: 'numericColumn', minWidth: widest(`${s}_p95`, 84), flex: 1, valueFormatter: quantityCell, columnGroupShow: 'open' },
    ],
  }));
}

/** Supply and input demand of the co-op or one farm per price scenario, with 5–95 % bands (AG Grid). */
@Component({
  selector: 'np-projection-grid',
  imports: [AgGridAngular, GridFooter],
  template: `
    <ag-grid-angular
      #grid
      class="grid"
      [attr.aria-label]="label()"
      [rowData]="rows()"
      [columnDefs]="columns()"
      [tooltipShowDelay]="300"
      [defaultColDef]="defaultColDef"
      domLayout="autoHeight"
    />
    <np-grid-footer [grid]="grid" [fileName]="fileName()"
      >Outputs are supply, inputs demand. Each scenario's figure is “at estimates”: the model at its fitted parameters, without chance variation, as in
        the e-mail and the member portal. Its 5 % and 95 % points bound the band where 9 in 10 outcomes should fall, from {{ draws() ?? 'the' }} simulated
        outcomes (what the band allows for is said with the chart); the arrow by a scenario opens or closes them. Export CSV keeps every figure unrounded.</np-grid-footer
    >
  `,
  styles: `
    :host {
      display: block;
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

  protected readonly rows = computed(() => projectionRows(this.items(), this.tonnes()));

  protected readonly columns = computed<(ColDef<ProjectionRow> | ColGroupDef<ProjectionRow>)[]>(() => [
    { field: 'name', headerName: 'Item', pinned: 'left', minWidth: 140, flex: 2 },
    { field: 'unit', headerName: 'Unit', width: 100 },
    ...scenarioColumns(this.rows()),
  ]);
  protected readonly defaultColDef = WRAPPED_HEADINGS;
}
