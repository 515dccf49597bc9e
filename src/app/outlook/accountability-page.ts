import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatExpansionPanel, MatExpansionPanelDescription, MatExpansionPanelHeader, MatExpansionPanelTitle } from '@angular/material/expansion';
import { MatProgressBar } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { ColDef } from 'ag-grid-community';
import type { EChartsCoreOption } from 'echarts/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import { errorMessage } from '../core/api-error';
import { AgGridAngular } from '../shared/grid';
import { FAN_COLOURS } from './fan-chart';
import { OutlookCautions } from './outlook-cautions';
import { formatDateTime, formatPercent, formatPrice, formatQuantity, formatShare, formatSignedPercent } from './outlook-format';
import type { Accountability, AccountabilitySeason, Comparison, FertiliserComparison } from './outlook-api-types';
import { SERIES } from '../../../shared/design-tokens';
import { CHART_TEXT } from '../shared/chart-theme';
import { LoadProblem } from '../shared/load-problem';

const SERIES_COLOURS: readonly string[] = SERIES;

/** The co-op's error per item, season after season: one line per item, a point per season with records. */
export function errorChartOption(acc: Accountability): EChartsCoreOption | null {
  const seasons = acc.seasons.filter((s) => s.items.some((i) => i.errorPct !== null));
  if (!seasons.length) return null;
  const codes = [...new Map(seasons.flatMap((s) => s.items.map((i) => [i.item, i.name] as const))).entries()];
  const text = CHART_TEXT;
  return {
    animation: false,
    aria: { enabled: true },
    textStyle: text,
    legend: { top: 0, textStyle: text },
    tooltip: { trigger: 'axis', valueFormatter: (v: unknown) => (typeof v === 'number' ? formatSignedPercent(v) : 'no record') },
    grid: { left: 64, right: 24, top: 56, bottom: 40 },
    xAxis: { type: 'category', data: seasons.map((s) => s.season), axisLabel: text },
    yAxis: { type: 'value', name: 'error, %', axisLabel: { ...text, formatter: (v: number) => `${v} %` }, splitLine: { lineStyle: { color: FAN_COLOURS.grid } } },
    series: codes.map(([code, name], k) => ({
      name,
      type: 'line',
      color: SERIES_COLOURS[k % SERIES_COLOURS.length],
      symbol: 'circle',
      symbolSize: 7,
      data: seasons.map((s) => s.items.find((i) => i.item === code)?.errorPct ?? null),
      markLine: k === 0 ? { silent: true, symbol: 'none', lineStyle: { color: FAN_COLOURS.axis, type: 'solid' }, data: [{ yAxis: 0 }], label: { show: false } } : undefined,
    })),
  };
}

const STATUS_WORDS: Record<AccountabilitySeason['status'], string> = {
  complete: 'every farm reported',
  partial: 'some farms reported',
  'awaiting records': 'awaiting the season’s records',
};

const num = (f: (v: number) => string) => (p: { value: unknown }) => (typeof p.value === 'number' ? f(p.value) : '—');
const yesNo = (p: { value: unknown }) => (p.value === null || p.value === undefined ? '—' : p.value ? 'yes' : 'no');

interface FarmComparisonRow extends Comparison {
  code: string;
  farm: string;
}

interface FarmFertiliserRow extends FertiliserComparison {
  code: string;
  farm: string;
}

/** `/outlook/accountability`: published outlooks set against the deliveries, purchases and prices that came. */

/** A nutrient mass in whole kilograms: "4,600", "0". */
const wholeKg = (v: number): string => Math.round(v).toLocaleString('en');

@Component({
  selector: 'np-accountability-page',
  imports: [
    RouterLink,
    AgGridAngular,
    NgxEchartsDirective,
    MatButton,
    MatButtonToggleGroup,
    MatButtonToggle,
    MatExpansionPanel,
    MatExpansionPanelHeader,
    MatExpansionPanelTitle,
    MatExpansionPanelDescription,
    MatProgressBar,
    OutlookCautions,
    LoadProblem,
  ],
  templateUrl: './accountability-page.html',
  styleUrl: './accountability-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AccountabilityPage {
  protected readonly which = signal<'latest' | 'first'>('latest');
  protected readonly acc = httpResource<Accountability>(() => `/api/outlooks/accountability?version=${this.which()}`);
  protected readonly a = computed(() => (this.acc.hasValue() ? this.acc.value() : null));
  protected readonly problem = computed(() => (this.acc.error() ? errorMessage(this.acc.error()) : null));
  protected readonly chart = computed(() => {
    const a = this.a();
    return a ? errorChartOption(a) : null;
  });
  /** Some season has a recorded quantity or price to set against its outlook; until then a short note stands in for the tables. */
  protected readonly hasRecords = computed(() =>
    (this.a()?.seasons ?? []).some((s) => s.items.some((i) => i.errorPct !== null) || s.prices.some((p) => p.errorPct !== null) || s.farms.some((f) => f.items.some((i) => i.errorPct !== null))),
  );
  protected readonly seasons = computed(() => [...(this.a()?.seasons ?? [])].sort((x, y) => y.startYear - x.startYear));
  /** The season opened on arrival: the newest with something recorded, not a newer one still waiting for its records. */
  protected readonly openedSeason = computed(() => {
    const list = this.seasons();
    return (list.find((s) => s.status !== 'awaiting records') ?? list[0])?.versionId ?? null;
  });
  protected readonly priceSummary = computed(() => {
    const a = this.a();
    if (!a) return [];
    const names = new Map(a.seasons.flatMap((s) => s.prices.map((p) => [p.item, p.name] as const)));
    return a.summary.prices.map((p) => ({ ...p, name: names.get(p.item) ?? p.item }));
  });
  protected readonly statusWords = STATUS_WORDS;
  protected readonly formatDateTime = formatDateTime;
  protected readonly formatQuantity = formatQuantity;
  protected readonly formatPrice = formatPrice;
  protected readonly formatSignedPercent = formatSignedPercent;

  protected readonly itemSummaryColumns: ColDef[] = [
    { field: 'name', headerName: 'Item', minWidth: 180, flex: 2 },
    { field: 'seasons', headerName: 'Seasons', type: 'numericColumn', width: 110 },
    { field: 'mape', headerName: 'Mean absolute error', type: 'numericColumn', minWidth: 170, flex: 1, valueFormatter: num((v) => formatPercent(v)) },
    { field: 'bias', headerName: 'Mean error (bias)', type: 'numericColumn', minWidth: 160, flex: 1, valueFormatter: num((v) => formatSignedPercent(v)) },
    { field: 'bandCoverage', headerName: 'Actual inside the 5–95 % band', type: 'numericColumn', minWidth: 220, flex: 1, valueFormatter: num(formatShare) },
  ];
  protected readonly priceSummaryColumns: ColDef[] = [
    { field: 'name', headerName: 'Price of', minWidth: 180, flex: 2 },
    { field: 'seasons', headerName: 'Seasons', type: 'numericColumn', width: 110 },
    { field: 'mape', headerName: 'Mean absolute error', type: 'numericColumn', minWidth: 170, flex: 1, valueFormatter: num((v) => formatPercent(v)) },
    { field: 'bias', headerName: 'Mean error (bias)', type: 'numericColumn', minWidth: 160, flex: 1, valueFormatter: num((v) => formatSignedPercent(v)) },
    { field: 'rangeCoverage', headerName: 'Actual between low and high', type: 'numericColumn', minWidth: 220, flex: 1, valueFormatter: num(formatShare) },
  ];
  protected readonly farmSummaryColumns: ColDef[] = [
    { field: 'code', headerName: 'Code', width: 90, sort: 'asc' },
    { field: 'name', headerName: 'Farm', minWidth: 180, flex: 2, filter: 'agTextColumnFilter' },
    { field: 'comparisons', headerName: 'Items compared', type: 'numericColumn', width: 150 },
    { field: 'mape', headerName: 'Mean absolute error', type: 'numericColumn', minWidth: 170, flex: 1, valueFormatter: num((v) => formatPercent(v)) },
    { field: 'bias', headerName: 'Mean error (bias)', type: 'numericColumn', minWidth: 160, flex: 1, valueFormatter: num((v) => formatSignedPercent(v)) },
  ];
  protected readonly itemColumns: ColDef[] = [
    { field: 'name', headerName: 'Item', minWidth: 170, flex: 2 },
    { field: 'unit', headerName: 'Unit', width: 90 },
    // With no farm reported yet there is nothing to set against: the server's sum over reporting farms is 0.
    {
      field: 'projected',
      headerName: 'Projected (base)',
      type: 'numericColumn',
      minWidth: 140,
      flex: 1,
      valueFormatter: (p) => (p.data?.farmsReported === 0 ? 'no records yet' : typeof p.value === 'number' ? formatQuantity(p.value) : '—'),
    },
    { field: 'p5', headerName: '5 %', type: 'numericColumn', width: 124, valueFormatter: num(formatQuantity) },
    { field: 'p95', headerName: '95 %', type: 'numericColumn', width: 124, valueFormatter: num(formatQuantity) },
    { field: 'actual', headerName: 'Actual', type: 'numericColumn', minWidth: 130, flex: 1, valueFormatter: num(formatQuantity) },
    { field: 'errorPct', headerName: 'Error', type: 'numericColumn', width: 110, valueFormatter: num((v) => formatSignedPercent(v)) },
    { field: 'withinBand', headerName: 'In band', width: 100, valueFormatter: yesNo },
    { headerName: 'Farms reported', type: 'numericColumn', width: 140, valueGetter: (p) => (p.data ? `${p.data.farmsReported} of ${p.data.farmsProjected}` : '') },
  ];
  protected readonly priceColumns: ColDef[] = [
    { field: 'name', headerName: 'Price of', minWidth: 170, flex: 2 },
    { field: 'method', headerName: 'Method', minWidth: 200, flex: 2 },
    { headerName: 'Low', type: 'numericColumn', width: 110, valueGetter: (p) => p.data?.expected.low, valueFormatter: num(formatPrice) },
    { headerName: 'Base', type: 'numericColumn', width: 110, valueGetter: (p) => p.data?.expected.base, valueFormatter: num(formatPrice) },
    { headerName: 'High', type: 'numericColumn', width: 110, valueGetter: (p) => p.data?.expected.high, valueFormatter: num(formatPrice) },
    { field: 'actual', headerName: 'Actual', type: 'numericColumn', width: 120, valueFormatter: num(formatPrice) },
    { field: 'priceUnit', headerName: 'Unit', width: 140 },
    { field: 'errorPct', headerName: 'Error', type: 'numericColumn', width: 110, valueFormatter: num((v) => formatSignedPercent(v)) },
    { field: 'withinRange', headerName: 'In range', width: 100, valueFormatter: yesNo },
  ];
  protected readonly farmColumns: ColDef<FarmComparisonRow>[] = [
    { field: 'code', headerName: 'Code', width: 90 },
    { field: 'farm', headerName: 'Farm', minWidth: 160, flex: 2, filter: 'agTextColumnFilter' },
    { field: 'name', headerName: 'Item', minWidth: 150, flex: 1, filter: 'agTextColumnFilter' },
    { field: 'projected', headerName: 'Projected', type: 'numericColumn', width: 130, valueFormatter: num(formatQuantity) },
    { field: 'actual', headerName: 'Actual', type: 'numericColumn', width: 130, valueFormatter: num(formatQuantity) },
    { field: 'unit', headerName: 'Unit', width: 90 },
    { field: 'errorPct', headerName: 'Error', type: 'numericColumn', width: 110, filter: 'agNumberColumnFilter', valueFormatter: num((v) => formatSignedPercent(v)) },
    { field: 'withinBand', headerName: 'In band', width: 100, valueFormatter: yesNo },
  ];

  // Whole kilograms, and widths that fit the page at 1280 px with every column in view.
  protected readonly fertiliserColumns: ColDef<FarmFertiliserRow>[] = [
    { field: 'code', headerName: 'Code', width: 76 },
    { field: 'farm', headerName: 'Farm', minWidth: 140, flex: 2, filter: 'agTextColumnFilter', tooltipField: 'words' },
    { field: 'name', headerName: 'Nutrient', minWidth: 136, flex: 1, tooltipField: 'words' },
    { field: 'projected', headerName: 'Projected, kg', type: 'numericColumn', width: 118, valueFormatter: num(wholeKg) },
    { field: 'booked', headerName: 'Booked, kg', type: 'numericColumn', width: 108, valueFormatter: num(wholeKg) },
    { field: 'actual', headerName: 'Used, kg', type: 'numericColumn', width: 104, valueFormatter: num(wholeKg) },
    { field: 'bookedShareOfUse', headerName: 'Booked of use', type: 'numericColumn', width: 118, valueFormatter: num(formatShare) },
    { field: 'errorPct', headerName: 'Projection error', type: 'numericColumn', width: 130, valueFormatter: num((v) => formatSignedPercent(v)) },
  ];

  /** Per version id, every farm × nutrient row of the fertiliser comparison. */
  protected readonly fertiliserRows = computed(
    () => new Map<number, FarmFertiliserRow[]>(this.seasons().map((s) => [s.versionId, (s.fertiliser?.farms ?? []).flatMap((f) => f.nutrients.map((n) => ({ ...n, code: f.code, farm: f.name })))])),
  );

  /** Per version id, every farm × item comparison as one flat list for the grid. */
  protected readonly farmRows = computed(
    () => new Map<number, FarmComparisonRow[]>(this.seasons().map((s) => [s.versionId, s.farms.flatMap((f) => f.items.map((i) => ({ ...i, code: f.code, farm: f.name })))])),
  );
}
