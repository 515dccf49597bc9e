import { ChangeDetectionStrategy, Component, computed, input, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import type { ColDef, GridApi, GridReadyEvent } from 'ag-grid-community';
import { NgxEchartsDirective } from 'ngx-echarts';
import { AgGridAngular } from '../shared/grid';
import { backtestOption } from './chart-options';
import { formatAmount, formatPercent, ItemLabels } from './model-format';
import type { FitRunResult } from '../../../shared/estimation-types';
import { SkillSection } from './skill-section';

interface ItemRow {
  item: string;
  name: string;
  unit: string;
  mape: number;
  bias: number;
}

interface SeasonRow {
  season: string;
  fittedOn: string;
  name: string;
  unit: string;
  predicted: number;
  actual: number;
  error: number;
}

/**
 * Rolling-origin back-test: for each of the last k seasons the model was fitted on the seasons
 * before it and projected that season at the prices actually seen; here against what members
 * actually delivered and bought.
 */
@Component({
  selector: 'np-backtest-section',
  imports: [AgGridAngular, MatButton, MatIcon, NgxEchartsDirective, SkillSection],
  templateUrl: './backtest-section.html',
  styles: `
    :host { display: flex; flex-direction: column; gap: 12px; }
    .chart { height: 300px; width: 100%; }
    .grid { width: 100%; }
    p { margin: 0; max-width: 90ch; }
    .toolbar { display: flex; flex-wrap: wrap; gap: 8px; align-items: center; }
    h3 { font: var(--mat-sys-title-small); flex: 1 1 auto; }
    h3.sub { margin: 8px 0 0; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BacktestSection {
  // inputs
  readonly result = input.required<FitRunResult>();
  readonly labels = input.required<ItemLabels>();

  readonly #seasonGrid = signal<GridApi<SeasonRow> | null>(null);

  protected readonly backtest = computed(() => this.result().backtest);
  /** The forecasting model's back-test against the plain rules (runs stored before it have none). */
  protected readonly skill = computed(() => this.result().skill ?? null);
  protected readonly itemRows = computed<ItemRow[]>(() =>
    this.backtest().items.map((r) => ({ ...r, name: this.labels().name(r.item), unit: this.labels().unit(r.item) })),
  );
  protected readonly seasonRows = computed<SeasonRow[]>(() =>
    this.backtest().seasons.flatMap((s) =>
      this.result()
        .summary.items.map((i) => i.name)
        .filter((code) => code in s.actual)
        .map((code) => ({
        season: s.season,
        fittedOn: `${s.fittedOn.first} – ${s.fittedOn.last} (${s.fittedOn.observations})`,
        name: this.labels().name(code),
        unit: this.labels().unit(code),
        predicted: s.predicted[code] ?? NaN,
        actual: s.actual[code] ?? NaN,
        error: s.actual[code] ? (100 * ((s.predicted[code] ?? NaN) - s.actual[code]!)) / s.actual[code]! : NaN,
        })),
    ),
  );
  protected readonly options = computed(() => {
    const rows = this.itemRows();
    return backtestOption(
      rows.map((r) => r.name),
      rows.map((r) => Number(r.mape.toFixed(2))),
      rows.map((r) => Number(r.bias.toFixed(2))),
    );
  });

  protected readonly itemColumns: ColDef<ItemRow>[] = [
    { field: 'name', headerName: 'Item', flex: 2, minWidth: 160 },
    { field: 'unit', headerName: 'Unit', width: 100 },
    {
      field: 'mape',
      headerName: 'Mean absolute error (%)',
      type: 'numericColumn',
      flex: 1,
      minWidth: 150,
      valueFormatter: (p) => formatPercent(p.value as number),
      filter: 'agNumberColumnFilter',
    },
    {
      field: 'bias',
      headerName: 'Bias (%)',
      type: 'numericColumn',
      flex: 1,
      minWidth: 120,
      valueFormatter: (p) => formatPercent(p.value as number),
      filter: 'agNumberColumnFilter',
    },
  ];
  protected readonly seasonColumns: ColDef<SeasonRow>[] = [
    { field: 'season', headerName: 'Season projected', width: 180, filter: 'agTextColumnFilter' },
    { field: 'fittedOn', headerName: 'Fitted on (farm-seasons)', flex: 1, minWidth: 200 },
    { field: 'name', headerName: 'Item', flex: 1, minWidth: 140, filter: 'agTextColumnFilter' },
    { field: 'unit', headerName: 'Unit', width: 90 },
    { field: 'predicted', headerName: 'Projected', type: 'numericColumn', width: 130, valueFormatter: (p) => formatAmount(p.value as number) },
    { field: 'actual', headerName: 'Actual', type: 'numericColumn', width: 130, valueFormatter: (p) => formatAmount(p.value as number) },
    {
      field: 'error',
      headerName: 'Error (%)',
      type: 'numericColumn',
      width: 110,
      valueFormatter: (p) => formatPercent(p.value as number),
      filter: 'agNumberColumnFilter',
    },
  ];

  protected seasonGridReady(event: GridReadyEvent<SeasonRow>): void {
    this.#seasonGrid.set(event.api);
  }

  protected exportSeasons(): void {
    this.#seasonGrid()?.exportDataAsCsv({ fileName: 'netput-backtest.csv' });
  }
}
