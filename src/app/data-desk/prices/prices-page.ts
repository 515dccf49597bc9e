import { DecimalPipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, linkedSignal, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatCard, MatCardContent } from '@angular/material/card';
import { MatDialog } from '@angular/material/dialog';
import { MatFormField, MatHint, MatLabel, MatPrefix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { RouterLink } from '@angular/router';
import { AgGridAngular } from 'ag-grid-angular';
import type {
  CellValueChangedEvent,
  ColDef,
  GetRowIdParams,
  GridApi,
  GridReadyEvent,
  IErrorValidationParams,
  RowSelectionOptions,
  SelectionChangedEvent,
  ValueFormatterParams,
} from 'ag-grid-community';
import { firstValueFrom } from 'rxjs';
import type { PriceRow, PriceSeries } from '../../../../shared/api-types';
import { ACCESS, roleAllows } from '../../core/access';
import { errorMessage, errorStatus } from '../../core/api-error';
import { AuthStore } from '../../core/auth-store';
import { SettingsStore } from '../../core/settings-store';
import { CautionNote } from '../../shared/caution-note';
import { ConfirmDialog, type ConfirmDialogData } from '../../shared/confirm-dialog';
import { DataDeskApi } from '../data-desk-api';
import { gridTheme, numberEditing, safeCsvCell, spreadsheetSafe } from '../data-grid';
import { ReferenceStore } from '../reference-store';
import { PasteDialog, type PasteDialogData } from './paste-dialog';
import { PriceChart, formatPrice } from './price-chart';
import { PriceDialog, type PriceDialogData } from './price-dialog';
import { PRICE_FIELD_LABEL, priceEditProblems, withEdit, type PriceField } from './price-validation';
import { savePriceEdit } from './price-save';
import { parseNumber, type DecimalMark } from '../../../../shared/cell-parsers';

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
    MatPrefix,
    MatIcon,
    MatInput,
    MatSelect,
    MatOption,
    MatProgressBar,
    CautionNote,
    PriceChart,
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
  protected readonly canAudit = computed(() => roleAllows(this.#auth.role(), ACCESS.audit));
  protected readonly currency = computed(() => this.#settings.settings()?.currency ?? 'EUR');
  /** How the co-op writes decimals: the price cells show and read numbers that way. */
  protected readonly decimalMark = computed<DecimalMark>(() => this.#settings.settings()?.decimalMark ?? 'point');

  // --- the price rows ---
  protected readonly prices = httpResource<PriceRow[]>(() => '/api/prices');
  /** The rows as shown: the server's list, then each saved edit in place. */
  protected readonly rows = linkedSignal<PriceRow[]>(() => (this.prices.hasValue() ? this.prices.value() : []));
  protected readonly problem = computed(() => (this.prices.error() ? errorMessage(this.prices.error()) : null));
  protected readonly gridItems = signal<number[]>([]);
  protected readonly quickFilter = signal('');
  protected readonly shownRows = computed(() => {
    const only = new Set(this.gridItems());
    return only.size === 0 ? this.rows() : this.rows().filter((r) => only.has(r.itemId));
  });
  /** The seasons the stored prices span (a season opened ahead, without prices, is left out). */
  protected readonly seasonRange = computed(() => {
    const priced = new Set(this.rows().map((r) => r.seasonId));
    const s = this.ref.seasons().filter((season) => priced.has(season.id));
    return s.length ? `${s[0].label} – ${s[s.length - 1].label}` : '';
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
  protected readonly theme = gridTheme;
  protected readonly getRowId = (p: GetRowIdParams<PriceRow>) => String(p.data.id);
  protected readonly rowSelection = computed<RowSelectionOptions | undefined>(() =>
    this.canEdit() ? { mode: 'multiRow', checkboxes: true, headerCheckbox: true, enableClickSelection: false } : undefined,
  );
  protected readonly defaultColDef: ColDef<PriceRow> = {
    sortable: true,
    resizable: true,
    filter: 'agTextColumnFilter',
    editable: () => this.canEdit(),
  };
  protected readonly columns = computed<ColDef<PriceRow>[]>(() => {
    const ref = this.ref.lookups();
    const itemName = (id: unknown) => ref.itemById.get(id as number)?.name ?? `item ${id}`;
    const seasonLabel = (id: unknown) => ref.seasonById.get(id as number)?.label ?? `season ${id}`;
    const pointName = (id: unknown) => ref.deliveryPointById.get(id as number)?.name ?? `point ${id}`;
    const startYear = (id: unknown) => ref.seasonById.get(id as number)?.startYear ?? 0;
    const validate = (field: PriceField) => ({
      getValidationErrors: (p: IErrorValidationParams<PriceRow>) => this.#validate(p, field),
    });
    const mark = this.decimalMark();
    return [
      {
        field: 'itemId',
        headerName: PRICE_FIELD_LABEL.itemId,
        minWidth: 120,
        flex: 1,
        valueFormatter: (p: ValueFormatterParams<PriceRow>) => itemName(p.value),
        filterValueGetter: (p) => itemName(p.data?.itemId),
        getQuickFilterText: (p) => `${itemName(p.value)} ${p.data.itemCode}`,
        comparator: (a, b) => itemName(a).localeCompare(itemName(b)),
        cellEditor: 'agSelectCellEditor',
        cellEditorParams: { values: ref.items.map((i) => i.id), ...validate('itemId') },
      },
      {
        field: 'seasonId',
        headerName: PRICE_FIELD_LABEL.seasonId,
        width: 125,
        sort: 'desc',
        valueFormatter: (p: ValueFormatterParams<PriceRow>) => seasonLabel(p.value),
        filterValueGetter: (p) => seasonLabel(p.data?.seasonId),
        getQuickFilterText: (p) => seasonLabel(p.value),
        comparator: (a, b) => startYear(a) - startYear(b),
        cellEditor: 'agSelectCellEditor',
        cellEditorParams: { values: [...ref.seasons].reverse().map((s) => s.id), ...validate('seasonId') },
      },
      {
        field: 'deliveryPointId',
        headerName: PRICE_FIELD_LABEL.deliveryPointId,
        minWidth: 130,
        flex: 1,
        valueFormatter: (p: ValueFormatterParams<PriceRow>) => pointName(p.value),
        filterValueGetter: (p) => pointName(p.data?.deliveryPointId),
        getQuickFilterText: (p) => pointName(p.value),
        comparator: (a, b) => pointName(a).localeCompare(pointName(b)),
        cellEditor: 'agSelectCellEditor',
        cellEditorParams: { values: ref.deliveryPoints.map((d) => d.id), ...validate('deliveryPointId') },
      },
      {
        field: 'price',
        headerName: PRICE_FIELD_LABEL.price,
        type: 'numericColumn',
        width: 105,
        filter: 'agNumberColumnFilter',
        valueFormatter: (p: ValueFormatterParams<PriceRow>) => (typeof p.value === 'number' ? inMark(formatPrice(p.value), mark) : ''),
        ...numberEditing<PriceRow>(mark, validate('price').getValidationErrors),
      },
      {
        colId: 'per',
        headerName: 'Per',
        width: 95,
        editable: false,
        filter: false,
        valueGetter: (p) => (p.data ? `${p.data.currency}/${ref.itemById.get(p.data.itemId)?.unit ?? p.data.unit}` : ''),
        headerTooltip: 'Currency and the unit the price is quoted per (the item’s unit)',
      },
      {
        field: 'currency',
        headerName: PRICE_FIELD_LABEL.currency,
        width: 95,
        filter: false,
        cellEditor: 'agTextCellEditor',
        cellEditorParams: { maxLength: 3, ...validate('currency') },
      },
      {
        field: 'source',
        headerName: PRICE_FIELD_LABEL.source,
        minWidth: 120,
        flex: 1.5,
        tooltipField: 'source',
        cellEditor: 'agTextCellEditor',
        cellEditorParams: { maxLength: 200, ...validate('source') },
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
    problems ??= priceEditProblems(row, field, value, this.rows());
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
        this.rows.update((rows) => rows.map((r) => (r.id === original.id ? outcome.kept : r)));
        event.api.applyTransaction({ update: [outcome.kept] });
        this.editStatus.set({ ok: false, text: `${describe(original)}, ${PRICE_FIELD_LABEL[field].toLowerCase()}: ${outcome.reason}.` });
        return;
      }
      const saved = outcome.saved;
      this.rows.update((rows) => rows.map((r) => (r.id === saved.id ? saved : r)));
      event.api.applyTransaction({ update: [saved] });
      this.series.reload();
      const was = field === 'price' ? ` (was ${formatPrice(original.price)})` : '';
      const shown = field === 'price' ? `${formatPrice(saved.price)} ${saved.currency}/${saved.unit}` : String(saved[field]);
      this.editStatus.set({ ok: true, text: `Saved: ${describe(saved)}, ${PRICE_FIELD_LABEL[field].toLowerCase()} ${shown}${was}.` });
    } catch (error) {
      this.rows.update((rows) => rows.map((r) => (r.id === original.id ? original : r)));
      event.api.applyTransaction({ update: [original] });
      this.editStatus.set({ ok: false, text: `Not saved: ${describe(original)}, ${PRICE_FIELD_LABEL[field].toLowerCase()}: ${errorMessage(error)}` });
    }
  }

  protected addPrice(): void {
    const data: PriceDialogData = { lookups: this.ref.lookups(), currency: this.currency(), existing: this.rows() };
    this.#dialog
      .open<PriceDialog, PriceDialogData, PriceRow[]>(PriceDialog, { data, autoFocus: 'first-tabbable' })
      .afterClosed()
      .subscribe((created) => this.#added(created));
  }

  protected pasteRows(text = ''): void {
    const data: PasteDialogData = { text, lookups: this.ref.lookups(), currency: this.currency(), decimalMark: this.decimalMark(), existing: this.rows() };
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
    this.rows.update((rows) => [...rows, ...created]);
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
    const gone = new Set(chosen.map((r) => r.id));
    this.rows.update((rows) => rows.filter((r) => !gone.has(r.id)));
    this.series.reload();
    this.selectedCount.set(0);
    this.#snackBar.open(`${chosen.length} ${chosen.length === 1 ? 'price' : 'prices'} deleted.`, 'OK');
  }

  protected async download(format: 'csv' | 'xlsx'): Promise<void> {
    try {
      const name = await this.#api.download(`/api/prices/export?format=${format}`, `netput-prices.${format}`);
      this.#snackBar.open(`Downloaded ${name}.`, 'OK');
    } catch (error) {
      if (errorStatus(error) === 404 && format === 'csv') {
        // The server has no export route yet: the grid writes the import's layout itself, formula-safe.
        this.#exportGridCsv();
        return;
      }
      this.#snackBar.open(errorStatus(error) === 404 ? 'This server does not offer XLSX exports of prices yet.' : errorMessage(error), 'Dismiss');
    }
  }

  /** The rows shown, as CSV in the import's own columns (item code, season label, ...), so the file maps itself when uploaded again. */
  #exportGridCsv(): void {
    const ref = this.ref.lookups();
    const headers: Record<string, string> = {
      itemId: 'item',
      seasonId: 'season',
      deliveryPointId: 'delivery_point',
      price: 'price',
      per: 'unit',
      currency: 'currency',
      source: 'source',
      observedOn: 'observed_on',
    };
    this.#grid()?.exportDataAsCsv({
      fileName: 'netput-prices.csv',
      columnKeys: Object.keys(headers),
      processHeaderCallback: (p) => headers[p.column.getColId()] ?? p.column.getColId(),
      processCellCallback: (p) => {
        const row = p.node?.data;
        switch (p.column.getColId()) {
          case 'itemId':
            return ref.itemById.get(p.value)?.code ?? String(p.value);
          case 'seasonId':
            return ref.seasonById.get(p.value)?.label ?? String(p.value);
          case 'deliveryPointId':
            return String(spreadsheetSafe(ref.deliveryPointById.get(p.value)?.name ?? p.value));
          case 'per':
            return row ? (ref.itemById.get(row.itemId)?.unit ?? row.unit) : '';
          default:
            return safeCsvCell(p);
        }
      },
    });
  }

  protected setChartItems(ids: number[]): void {
    this.chartItems.set(ids.slice(0, MAX_CHART_ITEMS));
  }
}

function describe(row: PriceRow): string {
  return `${row.itemName}, ${row.season}, ${row.deliveryPoint}, ${row.observedOn}`;
}
