import { DecimalPipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, linkedSignal, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatCard, MatCardContent } from '@angular/material/card';
import { MatDialog } from '@angular/material/dialog';
import { MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { RouterLink } from '@angular/router';
import type {
  CellValueChangedEvent,
  ColDef,
  FilterModel,
  GetRowIdParams,
  GridApi,
  GridReadyEvent,
  IDatasource,
  IErrorValidationParams,
  IGetRowsParams,
  IRowNode,
  RowSelectionOptions,
  SelectionChangedEvent,
  SortModelItem,
  ValueFormatterParams,
} from 'ag-grid-community';
import { firstValueFrom } from 'rxjs';
import type { CoopSummary, PriceRow, PriceSeries } from '../../../../shared/api-types';
import { TEXT_MAX } from '../../../../shared/field-limits';
import { NUMBER_FILTER_OPS, PRICE_SORT_COLUMNS, PRICE_TEXT_FILTERS, TEXT_FILTER_OPS, type PriceSortColumn } from '../../../../shared/price-query';
import { ACCESS, roleAllows } from '../../core/access';
import { errorMessage } from '../../core/api-error';
import { AuthStore } from '../../core/auth-store';
import { SettingsStore } from '../../core/settings-store';
import { CautionNote } from '../../shared/caution-note';
import { ConfirmDialog, type ConfirmDialogData } from '../../shared/confirm-dialog';
import { DataDeskApi } from '../data-desk-api';
import { AgGridAngular, numberEditing } from '../data-grid';
import { ReferenceStore } from '../reference-store';
import { PasteDialog, type PasteDialogData } from './paste-dialog';
import { PriceChart, formatPrice } from './price-chart';
import { PriceDialog, type PriceDialogData } from './price-dialog';
import { PRICE_FIELD_LABEL, priceEditProblems, withEdit, type PriceField } from './price-validation';
import { savePriceEdit } from './price-save';
import { parseNumber, type DecimalMark } from '../../../../shared/cell-parsers';
import { HistoryLink } from '../../shared/history-link';
import { LoadProblem } from '../../shared/load-problem';
import { GridSearch } from '../../shared/grid-search';
import { seasonsNewestFirst } from '../../shared/lookup-fields';

/** A number formatted with a decimal point and comma groups (1,234.50), written in the co-op's convention. */
function inMark(text: string, mark: DecimalMark): string {
  return mark === 'comma' ? text.replace(/[.,]/g, (c) => (c === '.' ? ',' : '.')) : text;
}

/** Most items the chart draws at once (more lines than this cannot be told apart). */
const MAX_CHART_ITEMS = 8;

/** `/prices`: the price history in a grid (planners edit, add, paste and delete) and as series over seasons. */
@Component({
  selector: 'np-prices-page',
  imports: [
    DecimalPipe,
    RouterLink,
    AgGridAngular,
    MatButton,
    MatButtonToggleGroup,
    MatButtonToggle,
    MatCard,
    MatCardContent,
    MatFormField,
    MatLabel,
    MatHint,
    MatIcon,
    MatSelect,
    MatOption,
    MatProgressBar,
    CautionNote,
    PriceChart,
    HistoryLink,
    LoadProblem,
    GridSearch,
  ],
  templateUrl: './prices-page.html',
  styleUrl: './prices-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PricesPage {
  readonly #api = inject(DataDeskApi);
  readonly #auth = inject(AuthStore);
  readonly #dialog = inject(MatDialog);
  readonly #snackBar = inject(MatSnackBar);
  readonly #settings = inject(SettingsStore);
  protected readonly ref = inject(ReferenceStore);

  protected readonly canEdit = computed(() => roleAllows(this.#auth.role(), ACCESS.dataEdit));
  protected readonly currency = computed(() => this.#settings.settings()?.currency ?? 'EUR');
  /** How the co-op writes decimals: the price cells show and read numbers that way. */
  protected readonly decimalMark = computed<DecimalMark>(() => this.#settings.settings()?.decimalMark ?? 'point');

  // --- the price rows: read from the server block by block (AG Grid's infinite row model) ---
  /** Rows the server reads per request; the grid keeps a few blocks around the visible ones. */
  protected readonly blockSize = 100;
  /** How many prices match what the grid is narrowed to (X-Total-Count); null until the first block. */
  protected readonly total = signal<number | null>(null);
  /** True while the grid is narrowed (search, items or a column condition). */
  protected readonly narrowed = signal(false);
  protected readonly loading = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly gridItems = signal<number[]>([]);
  protected readonly quickFilter = signal('');
  /** The seasons with prices or records, from the co-op summary (a season opened ahead is left out). */
  readonly #summary = httpResource<CoopSummary>(() => '/api/summary');
  protected readonly seasonRange = computed(() => {
    const s = this.#summary.hasValue() ? this.#summary.value().seasons : null;
    return s?.first && s.last ? `${s.first} – ${s.last}` : '';
  });
  /** A new source whenever the search or the chosen items change: the grid then reads from the first row again. */
  protected readonly datasource = computed<IDatasource>(() => {
    const search = this.quickFilter().trim();
    const items = this.gridItems();
    return { getRows: (p) => void this.#getRows(p, search, items) };
  });
  protected readonly selectedCount = signal(0);
  /** What happened to the last edit, read out by screen readers. */
  protected readonly editStatus = signal<{ ok: boolean; text: string } | null>(null);
  readonly #grid = signal<GridApi<PriceRow> | null>(null);

  // --- the chart ---
  protected readonly maxChartItems = MAX_CHART_ITEMS;
  protected readonly chartItems = linkedSignal<number[]>(() => {
    const items = this.ref.items();
    const outputs = items.filter((i) => i.role === 'output').map((i) => i.id);
    const fertiliser = items.find((i) => i.category === 'fertiliser');
    return [...outputs, ...(fertiliser ? [fertiliser.id] : [])].slice(0, 4);
  });
  protected readonly deflator = signal<number | null>(null);
  protected readonly series = httpResource<PriceSeries>(() => {
    const ids = this.chartItems();
    if (ids.length === 0) return undefined;
    const deflator = this.deflator();
    return { url: '/api/prices/series', params: { items: ids.join(','), ...(deflator ? { deflator } : {}) } };
  });
  /** The last series received, kept on screen while the next one loads. */
  protected readonly shownSeries = linkedSignal<PriceSeries | undefined, PriceSeries | null>({
    source: () => (this.series.hasValue() ? this.series.value() : undefined),
    computation: (next, previous) => (this.chartItems().length === 0 ? null : (next ?? previous?.value ?? null)),
  });
  protected readonly seriesProblem = computed(() => (this.series.error() ? errorMessage(this.series.error()) : null));
  protected readonly deflatorInfo = computed(() => {
    const id = this.deflator();
    return id === null ? null : (this.ref.priceIndexes().find((ix) => ix.id === id) ?? null);
  });
  /** Seasons the chosen index does not cover: their deflated prices are gaps. */
  protected readonly deflatorGaps = computed(() => {
    const ix = this.deflatorInfo();
    if (!ix) return [];
    const covered = new Set(ix.values.map((v) => v.seasonId));
    return this.ref.seasons().filter((s) => !covered.has(s.id)).map((s) => s.label);
  });

  // --- the grid ---
  protected readonly getRowId = (p: GetRowIdParams<PriceRow>) => String(p.data.id);
  protected readonly rowSelection = computed<RowSelectionOptions | undefined>(() =>
    this.canEdit() ? { mode: 'multiRow', checkboxes: true, headerCheckbox: false, enableClickSelection: false } : undefined,
  );
  protected readonly defaultColDef: ColDef<PriceRow> = {
    filter: 'agTextColumnFilter',
    editable: () => this.canEdit(),
    // The server narrows: one condition per column, the comparisons it knows (shared/price-query.ts).
    filterParams: { filterOptions: [...TEXT_FILTER_OPS], maxNumConditions: 1, buttons: ['reset'] },
  };
  protected readonly columns = computed<ColDef<PriceRow>[]>(() => {
    const ref = this.ref.lookups();
    const itemName = (id: unknown) => ref.itemById.get(id as number)?.name ?? `item ${id}`;
    const seasonLabel = (id: unknown) => ref.seasonById.get(id as number)?.label ?? `season ${id}`;
    const pointName = (id: unknown) => ref.deliveryPointById.get(id as number)?.name ?? `point ${id}`;
    const validate = (field: PriceField) => ({
      getValidationErrors: (p: IErrorValidationParams<PriceRow>) => this.#validate(p, field),
    });
    const mark = this.decimalMark();
    return [
      {
        field: 'itemId',
        headerName: PRICE_FIELD_LABEL.itemId,
        minWidth: 120,
        valueFormatter: (p: ValueFormatterParams<PriceRow>) => itemName(p.value),
        cellEditor: 'agSelectCellEditor',
        cellEditorParams: { values: ref.items.map((i) => i.id), ...validate('itemId') },
      },
      {
        field: 'seasonId',
        headerName: PRICE_FIELD_LABEL.seasonId,
        width: 125,
        sort: 'desc',
        valueFormatter: (p: ValueFormatterParams<PriceRow>) => seasonLabel(p.value),
        cellEditor: 'agSelectCellEditor',
        cellEditorParams: { values: seasonsNewestFirst(ref.seasons).map((s) => s.id), ...validate('seasonId') },
      },
      {
        field: 'deliveryPointId',
        headerName: PRICE_FIELD_LABEL.deliveryPointId,
        minWidth: 130,
        valueFormatter: (p: ValueFormatterParams<PriceRow>) => pointName(p.value),
        cellEditor: 'agSelectCellEditor',
        cellEditorParams: { values: ref.deliveryPoints.map((d) => d.id), ...validate('deliveryPointId') },
      },
      {
        field: 'price',
        headerName: PRICE_FIELD_LABEL.price,
        type: 'numericColumn',
        width: 105,
        filter: 'agNumberColumnFilter',
        filterParams: {
          filterOptions: [...NUMBER_FILTER_OPS],
          maxNumConditions: 1,
          buttons: ['reset'],
          // typed in the co-op's convention, like the cells
          allowedCharPattern: '\\d\\-,. ',
          numberParser: (text: string | null) => {
            const r = text && text.trim() ? parseNumber(text, mark) : null;
            return r?.ok ? r.value : null;
          },
        },
        valueFormatter: (p: ValueFormatterParams<PriceRow>) => (typeof p.value === 'number' ? inMark(formatPrice(p.value), mark) : ''),
        ...numberEditing<PriceRow>(mark, validate('price').getValidationErrors),
      },
      {
        colId: 'per',
        headerName: 'Per',
        width: 95,
        editable: false,
        filter: false,
        sortable: false,
        valueGetter: (p) => (p.data ? `${p.data.currency}/${ref.itemById.get(p.data.itemId)?.unit ?? p.data.unit}` : ''),
        headerTooltip: 'Currency and the unit the price is quoted per (the item’s unit)',
      },
      {
        field: 'currency',
        headerName: PRICE_FIELD_LABEL.currency,
        width: 95,
        cellEditor: 'agTextCellEditor',
        cellEditorParams: { maxLength: 3, ...validate('currency') },
      },
      {
        field: 'source',
        headerName: PRICE_FIELD_LABEL.source,
        minWidth: 120,
        tooltipField: 'source',
        cellEditor: 'agTextCellEditor',
        cellEditorParams: { maxLength: TEXT_MAX.source, ...validate('source') },
      },
      {
        field: 'observedOn',
        headerName: PRICE_FIELD_LABEL.observedOn,
        width: 120,
        filter: false,
        cellEditor: 'agDateStringCellEditor',
        cellEditorParams: { ...validate('observedOn') },
      },
    ];
  });

  protected gridReady(event: GridReadyEvent<PriceRow>): void {
    this.#grid.set(event.api);
  }

  /** Reads one block for the grid: its window, its sort and its column conditions, sent to the server. */
  async #getRows(p: IGetRowsParams, search: string, items: number[]): Promise<void> {
    const params: Record<string, string | number> = { offset: p.startRow, limit: p.endRow - p.startRow, ...queryOf(p.sortModel, p.filterModel) };
    if (search) params['q'] = search;
    if (items.length) params['items'] = items.join(',');
    this.narrowed.set(Boolean(search || items.length || Object.keys(p.filterModel ?? {}).length));
    this.loading.set(true);
    try {
      const { rows, total } = await this.#api.pricePage(params);
      this.total.set(total);
      this.problem.set(null);
      p.successCallback(rows, total);
    } catch (error) {
      this.problem.set(errorMessage(error));
      p.failCallback();
    } finally {
      this.loading.set(false);
    }
  }

  /** The rows the grid holds now (its loaded blocks): what the dialogs check repeated prices against. */
  #loadedRows(): PriceRow[] {
    const out: PriceRow[] = [];
    this.#grid()?.forEachNode((n: IRowNode<PriceRow>) => {
      if (n.data) out.push(n.data);
    });
    return out;
  }

  /** Reads the blocks again (after rows were added or deleted). */
  protected reload(): void {
    this.problem.set(null);
    this.#grid()?.refreshInfiniteCache();
  }

  protected selectionChanged(event: SelectionChangedEvent<PriceRow>): void {
    this.selectedCount.set(event.api.getSelectedRows().length);
  }

  #validate(p: IErrorValidationParams<PriceRow>, field: PriceField): string[] | null {
    const row = p.cellEditorParams.data;
    let value: unknown = p.value;
    let problems: string[] | null = null;
    if (field === 'price' && typeof value === 'string') {
      const parsed = value.trim() === '' ? null : parseNumber(value, this.decimalMark());
      if (parsed && !parsed.ok) problems = [parsed.message];
      value = parsed?.ok ? parsed.value : null;
    }
    problems ??= priceEditProblems(row, field, value, this.#loadedRows());
    if (problems) this.editStatus.set({ ok: false, text: `${describe(row)}, ${PRICE_FIELD_LABEL[field].toLowerCase()}: ${problems.join('; ')}` });
    else if (this.editStatus()?.ok === false) this.editStatus.set(null);
    return problems;
  }

  /** Saves one edited cell; on refusal the cell goes back to what is stored. */
  protected async cellChanged(event: CellValueChangedEvent<PriceRow>): Promise<void> {
    const field = event.colDef.field as PriceField | undefined;
    if (!field || event.newValue === event.oldValue) return;
    const original = { ...event.data, [field]: event.oldValue } as PriceRow;
    const body = withEdit(original, field, event.newValue);
    try {
      const outcome = await savePriceEdit(this.#api, this.#dialog, original, body);
      if ('kept' in outcome) {
        event.node.setData(outcome.kept);
        this.editStatus.set({ ok: false, text: `${describe(original)}, ${PRICE_FIELD_LABEL[field].toLowerCase()}: ${outcome.reason}.` });
        return;
      }
      const saved = outcome.saved;
      event.node.setData(saved);
      this.series.reload();
      const was = field === 'price' ? ` (was ${formatPrice(original.price)})` : '';
      const shown = field === 'price' ? `${formatPrice(saved.price)} ${saved.currency}/${saved.unit}` : String(saved[field]);
      this.editStatus.set({ ok: true, text: `Saved: ${describe(saved)}, ${PRICE_FIELD_LABEL[field].toLowerCase()} ${shown}${was}.` });
    } catch (error) {
      event.node.setData(original);
      this.editStatus.set({ ok: false, text: `Not saved: ${describe(original)}, ${PRICE_FIELD_LABEL[field].toLowerCase()}: ${errorMessage(error)}` });
    }
  }

  protected addPrice(): void {
    const data: PriceDialogData = { lookups: this.ref.lookups(), currency: this.currency(), decimalMark: this.decimalMark(), existing: this.#loadedRows() };
    this.#dialog
      .open<PriceDialog, PriceDialogData, PriceRow[]>(PriceDialog, { data, autoFocus: 'first-tabbable' })
      .afterClosed()
      .subscribe((created) => this.#added(created));
  }

  protected pasteRows(text = ''): void {
    const data: PasteDialogData = { text, lookups: this.ref.lookups(), currency: this.currency(), decimalMark: this.decimalMark(), existing: this.#loadedRows() };
    this.#dialog
      .open<PasteDialog, PasteDialogData, PriceRow[]>(PasteDialog, { data, autoFocus: 'first-tabbable', maxWidth: '96vw' })
      .afterClosed()
      .subscribe((created) => this.#added(created));
  }

  /** Ctrl+V on the grid (not inside a cell editor) opens the paste dialog with what was copied. */
  protected gridPaste(event: ClipboardEvent): void {
    if (!this.canEdit()) return;
    const target = event.target as HTMLElement | null;
    if (target?.closest('input, textarea, [contenteditable="true"]')) return;
    const text = event.clipboardData?.getData('text/plain') ?? '';
    if (text.trim() === '') return;
    event.preventDefault();
    this.pasteRows(text);
  }

  #added(created: PriceRow[] | undefined): void {
    if (!created?.length) return;
    this.reload();
    this.series.reload();
    this.#snackBar.open(created.length === 1 ? `Price added: ${describe(created[0])}.` : `${created.length} prices added.`, 'OK');
  }

  protected async deleteSelected(): Promise<void> {
    const grid = this.#grid();
    const chosen = grid?.getSelectedRows() ?? [];
    if (chosen.length === 0) return;
    const listed = chosen.slice(0, 5).map((r) => `${describe(r)}: ${formatPrice(r.price)} ${r.currency}/${r.unit}`);
    const data: ConfirmDialogData = {
      title: chosen.length === 1 ? 'Delete this price?' : `Delete ${chosen.length} prices?`,
      message: `${listed.join('; ')}${chosen.length > 5 ? `; and ${chosen.length - 5} more` : ''}. The audit log keeps what was deleted.`,
      confirmLabel: chosen.length === 1 ? 'Delete price' : `Delete ${chosen.length} prices`,
      destructive: true,
    };
    if (!(await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed()))) return;
    // One request, one transaction: all the chosen prices go, or none does.
    try {
      await this.#api.deletePrices(chosen.map((r) => r.id));
    } catch (error) {
      this.#snackBar.open(`Nothing deleted: ${errorMessage(error)}`, 'Dismiss');
      return;
    }
    grid?.deselectAll();
    this.reload();
    this.series.reload();
    this.selectedCount.set(0);
    this.#snackBar.open(`${chosen.length} ${chosen.length === 1 ? 'price' : 'prices'} deleted.`, 'OK');
  }

  /** The whole table as a file, streamed by the server (the grid holds only the blocks in view). */
  protected async download(format: 'csv' | 'xlsx'): Promise<void> {
    try {
      const name = await this.#api.download(`/api/prices/export?format=${format}`, `netput-prices.${format}`);
      this.#snackBar.open(`Downloaded ${name}.`, 'OK');
    } catch (error) {
      this.#snackBar.open(errorMessage(error), 'Dismiss');
    }
  }

  protected setChartItems(ids: number[]): void {
    this.chartItems.set(ids.slice(0, MAX_CHART_ITEMS));
  }
}

/** The grid's sort and column conditions as GET /api/prices parameters (shared/price-query.ts). */
export function queryOf(sortModel: readonly SortModelItem[], filterModel: FilterModel | null): Record<string, string> {
  const out: Record<string, string> = {};
  const sort = sortModel[0];
  if (sort && (PRICE_SORT_COLUMNS as readonly string[]).includes(sort.colId)) {
    out['sort'] = sort.colId as PriceSortColumn;
    out['dir'] = sort.sort;
  }
  for (const [colId, model] of Object.entries(filterModel ?? {})) {
    const m = model as { filterType?: string; type?: string; filter?: string | number | null; filterTo?: number | null };
    if (!m?.type || m.filter === null || m.filter === undefined || m.filter === '') continue;
    if (colId === 'price' && m.filterType === 'number') {
      out['price'] = m.type === 'inRange' ? `inRange:${m.filter}:${m.filterTo ?? m.filter}` : `${m.type}:${m.filter}`;
    } else if (colId in PRICE_TEXT_FILTERS) {
      out[PRICE_TEXT_FILTERS[colId as keyof typeof PRICE_TEXT_FILTERS]] = `${m.type}:${m.filter}`;
    }
  }
  return out;
}

function describe(row: PriceRow): string {
  return `${row.itemName}, ${row.season}, ${row.deliveryPoint}, ${row.observedOn}`;
}
