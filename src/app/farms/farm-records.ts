import { DecimalPipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, linkedSignal, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router, RouterLink } from '@angular/router';
import type {
  CellValueChangedEvent,
  ColDef,
  ColGroupDef,
  GetRowIdParams,
  GridApi,
  GridReadyEvent,
  IErrorValidationParams,
  ValueFormatterParams,
} from 'ag-grid-community';
import { firstValueFrom } from 'rxjs';
import { farmMemberNames, type FarmRecordRow, type FarmSummary, type Item } from '../../../shared/api-types';
import { ACCESS, roleAllows } from '../core/access';
import { errorMessage, errorStatus } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { factorNameSchema } from '../../../shared/data-schemas';
import { DataDeskApi, type FactorRow, type LandRow, type RecordBody } from '../data-desk/data-desk-api';
import { AgGridAngular, numberEditing, numberTextProblem, safeCsvCell } from '../data-desk/data-grid';
import { FIT_FIGURES, WRAPPED_HEADINGS } from '../shared/grid';
import { SettingsStore } from '../core/settings-store';
import type { DecimalMark } from '../../../shared/cell-parsers';
import { parseTable } from '../data-desk/paste';
import { ReferenceStore } from '../data-desk/reference-store';
import { CautionNote } from '../shared/caution-note';
import { ConfirmDialog, type ConfirmDialogData } from '../shared/confirm-dialog';
import { openFarmDialog } from './farm-dialog';
import { factorKey, itemKey, pivotRecords, quantityDoubt, recordCellProblem, type SeasonRow } from './records-pivot';
import { HistoryLink } from '../shared/history-link';

const quantityFormat = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 2 });
/** Tonnes with one decimal throughout a column (1,124.0 beside 1,184.1), other units as recorded. */
const tonnesFormat = new Intl.NumberFormat('en-GB', { minimumFractionDigits: 1, maximumFractionDigits: 2 });
const landFormat = new Intl.NumberFormat('en-GB', { minimumFractionDigits: 1, maximumFractionDigits: 1 });

/** `/farms/:id`: one farm, its outputs, input use and land per season in one grid. Planners edit cells and paste blocks. */
@Component({
  selector: 'np-farm-records',
  imports: [DecimalPipe, RouterLink, AgGridAngular, MatButton, MatFormField, MatHint, MatIcon, MatInput, MatLabel, MatProgressBar, CautionNote, HistoryLink],
  templateUrl: './farm-records.html',
  styleUrl: './farm-records.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmRecords {
  readonly #api = inject(DataDeskApi);
  readonly #auth = inject(AuthStore);
  readonly #dialog = inject(MatDialog);
  readonly #router = inject(Router);
  readonly #snackBar = inject(MatSnackBar);
  protected readonly ref = inject(ReferenceStore);
  readonly #settings = inject(SettingsStore);
  /** How the co-op writes decimals: the grid's cells are typed that way. */
  protected readonly decimalMark = computed<DecimalMark>(() => this.#settings.settings()?.decimalMark ?? 'point');

  /** The route's `:id`. */
  readonly id = input.required<string>();
  protected readonly farmId = computed(() => Number(this.id()));
  protected readonly memberNames = (farm: FarmSummary) => farmMemberNames(farm.members);
  protected readonly canEdit = computed(() => roleAllows(this.#auth.role(), ACCESS.dataEdit));

  protected readonly farms = httpResource<FarmSummary[]>(() => '/api/farms');
  protected readonly farm = computed(() => (this.farms.hasValue() ? (this.farms.value().find((f) => f.id === this.farmId()) ?? null) : null));
  protected readonly notFound = computed(() => this.farms.hasValue() && this.farm() === null);
  protected readonly records = httpResource<FarmRecordRow[]>(() => (Number.isInteger(this.farmId()) ? { url: '/api/records', params: { farms: this.farmId() } } : undefined));
  protected readonly land = httpResource<LandRow[]>(() => (Number.isInteger(this.farmId()) ? { url: '/api/records/land', params: { farms: this.farmId() } } : undefined));
  protected readonly factors = httpResource<FactorRow[]>(() => (Number.isInteger(this.farmId()) ? { url: '/api/records/factors', params: { farms: this.farmId() } } : undefined));
  /** Factors added as columns in this visit, before any value of them is saved. */
  readonly #addedFactors = signal<string[]>([]);
  /** Fixed factors other than land: those this farm has values of, and those just added. */
  protected readonly otherFactors = computed(() => {
    const recorded = this.factors.hasValue() ? this.factors.value().map((f) => f.factor) : [];
    return [...new Set([...recorded, ...this.#addedFactors()])].filter((f) => f !== 'land_ha').sort();
  });
  protected readonly newFactor = signal('');
  protected readonly newFactorProblem = signal<string | null>(null);
  protected readonly loading = computed(
    () => this.farms.isLoading() || this.records.isLoading() || this.land.isLoading() || this.factors.isLoading() || !this.ref.loaded(),
  );
  protected readonly problem = computed(() => {
    const e = this.farms.error() ?? this.records.error() ?? this.land.error() ?? this.factors.error() ?? this.ref.error();
    return e ? errorMessage(e) : null;
  });

  protected readonly rows = linkedSignal<SeasonRow[]>(() =>
    pivotRecords(
      this.ref.seasons(),
      this.ref.items(),
      this.records.hasValue() ? this.records.value() : [],
      this.land.hasValue() ? this.land.value() : [],
      this.factors.hasValue() ? this.factors.value() : [],
      this.otherFactors(),
    ),
  );
  protected readonly recordCount = computed(() => (this.records.hasValue() ? this.records.value().length : 0));
  protected readonly gaps = computed(() => this.rows().filter((r) => this.ref.items().every((it) => r[itemKey(it.id)] === null)).map((r) => r.season));
  protected readonly status = signal<{ ok: boolean; text: string } | null>(null);
  readonly #grid = signal<GridApi<SeasonRow> | null>(null);

  /** Columns sized to their figures; the item headings (wrapped) sit above them. */
  protected readonly fitFigures = FIT_FIGURES;
  protected readonly getRowId = (p: GetRowIdParams<SeasonRow>) => String(p.data.seasonId);
  protected readonly defaultColDef: ColDef<SeasonRow> = { sortable: false, editable: () => this.canEdit(), wrapHeaderText: WRAPPED_HEADINGS.wrapHeaderText, autoHeaderHeight: WRAPPED_HEADINGS.autoHeaderHeight };
  protected readonly columns = computed<(ColDef<SeasonRow> | ColGroupDef<SeasonRow>)[]>(() => {
    const items = this.ref.items();
    const mark = this.decimalMark();
    const itemColumn = (it: Item): ColDef<SeasonRow> => ({
      colId: itemKey(it.id),
      field: itemKey(it.id),
      headerName: `${it.name} (${it.unit})`,
      headerTooltip: `${it.name}, ${it.role === 'output' ? 'produced' : 'used'}, in ${it.unit}`,
      type: 'numericColumn',
      // Sized to its figures by the grids' content sizing (src/app/shared/grid.ts); a flex column would be left out.
      minWidth: 110,
      wrapHeaderText: true,
      autoHeaderHeight: true,
      valueFormatter: (p: ValueFormatterParams<SeasonRow>) => (typeof p.value === 'number' ? (it.unit === 't' ? tonnesFormat : quantityFormat).format(p.value) : '—'),
      cellClassRules: { 'np-missing': (p) => p.value === null || p.value === undefined },
      ...numberEditing<SeasonRow>(mark, (p) => this.#validate('quantity', p)),
    });
    return [
      { field: 'season', headerName: 'Season', pinned: 'left', width: 110, editable: false },
      {
        field: 'landHa',
        headerName: 'Land (ha)',
        type: 'numericColumn',
        width: 120,
        valueFormatter: (p: ValueFormatterParams<SeasonRow>) => (typeof p.value === 'number' ? landFormat.format(p.value) : '—'),
        cellClassRules: { 'np-missing': (p) => p.value === null || p.value === undefined },
        ...numberEditing<SeasonRow>(mark, (p) => this.#validate('land', p)),
      },
      ...(this.otherFactors().length
        ? [
            {
              headerName: 'Other fixed factors',
              children: this.otherFactors().map(
                (name): ColDef<SeasonRow> => ({
                  colId: factorKey(name),
                  field: factorKey(name),
                  headerName: name,
                  headerTooltip: `Fixed factor ${name}: this farm's level in each season`,
                  type: 'numericColumn',
                  minWidth: 120,
                  wrapHeaderText: true,
                  autoHeaderHeight: true,
                  valueFormatter: (p: ValueFormatterParams<SeasonRow>) => (typeof p.value === 'number' ? quantityFormat.format(p.value) : '—'),
                  cellClassRules: { 'np-missing': (p) => p.value === null || p.value === undefined },
                  ...numberEditing<SeasonRow>(mark, (p) => this.#validate('factor', p)),
                }),
              ),
            },
          ]
        : []),
      { headerName: 'Outputs (produced)', children: items.filter((i) => i.role === 'output').map(itemColumn) },
      { headerName: 'Inputs (used)', children: items.filter((i) => i.role === 'input').map(itemColumn) },
    ];
  });

  protected gridReady(event: GridReadyEvent<SeasonRow>): void {
    this.#grid.set(event.api);
  }

  /** Adds a column for a fixed factor this farm has no values of yet (irrigated area, machinery value, …). */
  protected addFactor(): void {
    const parsed = factorNameSchema.safeParse(this.newFactor());
    if (!parsed.success) {
      this.newFactorProblem.set(parsed.error.issues[0]!.message);
      return;
    }
    if (parsed.data === 'land_ha' || this.otherFactors().includes(parsed.data)) {
      this.newFactorProblem.set(`${parsed.data} is a column already`);
      return;
    }
    this.#addedFactors.update((names) => [...names, parsed.data]);
    this.newFactor.set('');
    this.newFactorProblem.set(null);
    this.status.set({ ok: true, text: `Column ${parsed.data} added: enter the farm's level in each season.` });
  }

  #validate(kind: 'quantity' | 'land' | 'factor', p: IErrorValidationParams<SeasonRow>): string[] | null {
    const problem = numberTextProblem(p.value, this.decimalMark()) ?? recordCellProblem(kind, p.value);
    if (problem) this.status.set({ ok: false, text: `${p.cellEditorParams.data.season}: ${problem}` });
    return problem ? [problem] : null;
  }

  protected async cellChanged(event: CellValueChangedEvent<SeasonRow>): Promise<void> {
    const key = event.colDef.field as keyof SeasonRow | undefined;
    if (!key || event.newValue === event.oldValue) return;
    const row = event.data;
    const farmId = this.farmId();
    const revert = () => {
      this.rows.update((rows) => rows.map((r) => (r.seasonId === row.seasonId ? { ...r, [key]: event.oldValue } : r)));
      event.api.applyTransaction({ update: [{ ...row, [key]: event.oldValue }] });
    };
    try {
      if (key === 'landHa') {
        await this.#api.putLand({ farmId, seasonId: row.seasonId, landHa: Number(event.newValue) });
        this.status.set({ ok: true, text: `Saved: land in ${row.season} is ${landFormat.format(Number(event.newValue))} ha.` });
      } else if (key.startsWith('fx_')) {
        const factor = key.slice(3);
        if (event.newValue === null || event.newValue === undefined || event.newValue === '') {
          await this.#api.deleteFactor({ farmId, seasonId: row.seasonId, factor });
          this.status.set({ ok: true, text: `Removed: ${factor} in ${row.season}.` });
        } else {
          await this.#api.putFactor({ farmId, seasonId: row.seasonId, factor, value: Number(event.newValue) });
          this.status.set({ ok: true, text: `Saved: ${factor} in ${row.season} is ${quantityFormat.format(Number(event.newValue))}.` });
        }
      } else {
        const item = this.ref.items().find((it) => itemKey(it.id) === key)!;
        if (event.newValue === null || event.newValue === undefined || event.newValue === '') {
          const data: ConfirmDialogData = {
            title: `Remove ${item.name.toLowerCase()} of ${row.season}?`,
            message: `The record (${quantityFormat.format(event.oldValue)} ${item.unit}) is deleted; the audit log keeps it.`,
            confirmLabel: 'Remove record',
            destructive: true,
          };
          if (!(await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed()))) return revert();
          await this.#api.deleteRecord({ farmId, seasonId: row.seasonId, itemId: item.id });
          this.status.set({ ok: true, text: `Removed: ${item.name} in ${row.season}.` });
        } else {
          // A quantity far from the farm's own history per hectare is asked about before it is saved.
          const doubt = quantityDoubt(this.rows(), row, item, this.farm()?.code ?? 'this farm', Number(event.newValue));
          if (doubt) {
            const data: ConfirmDialogData = {
              title: 'Is this quantity right?',
              message: `${doubt}. Save it as it is, or go back and correct it.`,
              confirmLabel: 'Save as it is',
              cancelLabel: 'Go back',
            };
            if (!(await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed()))) {
              revert();
              this.status.set({ ok: false, text: `Not saved (${row.season}): ${doubt}.` });
              return;
            }
          }
          // The version the edit started from (null: the cell was empty); a stale one is refused with 409.
          const stored = this.records.hasValue() ? this.records.value().find((r) => r.seasonId === row.seasonId && r.itemId === item.id) : undefined;
          await this.#api.putRecords([{ farmId, seasonId: row.seasonId, itemId: item.id, quantity: Number(event.newValue), version: stored?.version ?? null }]);
          this.status.set({ ok: true, text: `Saved: ${item.name} in ${row.season} is ${quantityFormat.format(Number(event.newValue))} ${item.unit}.` });
        }
      }
      this.rows.update((rows) => rows.map((r) => (r.seasonId === row.seasonId ? { ...r, [key]: event.newValue ?? null } : r)));
      // The grid shows the edit already; the sources are refreshed so a later re-pivot (a column
      // added, another resource reloaded) cannot bring back the old value.
      if (key === 'landHa') this.land.reload();
      else if (key.startsWith('fx_')) this.factors.reload();
      else this.records.reload();
    } catch (error) {
      revert();
      this.status.set({ ok: false, text: `Not saved (${row.season}): ${errorMessage(error)}` });
    }
  }

  /**
   * Ctrl+V on the grid fills cells from the focused one, right and down, as in a spreadsheet. All the
   * quantities go in one request (all or nothing); land cells follow, one season at a time.
   */
  protected async gridPaste(event: ClipboardEvent): Promise<void> {
    if (!this.canEdit()) return;
    const target = event.target as HTMLElement | null;
    if (target?.closest('input, textarea')) return;
    const grid = this.#grid();
    const focused = grid?.getFocusedCell();
    const text = event.clipboardData?.getData('text/plain') ?? '';
    if (!grid || !focused || text.trim() === '') return;
    event.preventDefault();
    const block = parseTable(text);
    const columns = grid.getAllDisplayedColumns().map((c) => c.getColId());
    const startCol = columns.indexOf(focused.column.getColId());
    const rows: SeasonRow[] = [];
    grid.forEachNodeAfterFilterAndSort((n) => n.data && rows.push(n.data));
    const problems: string[] = [];
    const records: RecordBody[] = [];
    const land: { seasonId: number; landHa: number }[] = [];
    const levels: { seasonId: number; factor: string; value: number }[] = [];
    block.forEach((cells, r) => {
      const row = rows[focused.rowIndex + r];
      if (!row) {
        problems.push(`line ${r + 1}: below the last season`);
        return;
      }
      cells.forEach((cell, c) => {
        const colId = columns[startCol + c];
        if (!colId || colId === 'season') {
          problems.push(`line ${r + 1}, cell ${c + 1}: outside the editable columns`);
          return;
        }
        if (cell === '') return;
        const kind = colId === 'landHa' ? 'land' : colId.startsWith('fx_') ? 'factor' : 'quantity';
        const problem = recordCellProblem(kind, cell);
        if (problem) problems.push(`${row.season}, ${this.#columnName(colId)}: ${problem}`);
        else if (kind === 'land') land.push({ seasonId: row.seasonId, landHa: Number(cell) });
        else if (kind === 'factor') levels.push({ seasonId: row.seasonId, factor: colId.slice(3), value: Number(cell) });
        else records.push({ farmId: this.farmId(), seasonId: row.seasonId, itemId: Number(colId.slice(1)), quantity: Number(cell) });
      });
    });
    if (problems.length) {
      this.status.set({ ok: false, text: `Nothing pasted: ${problems.slice(0, 5).join('; ')}${problems.length > 5 ? `; and ${problems.length - 5} more` : ''}` });
      return;
    }
    try {
      if (records.length) await this.#api.putRecords(records);
      for (const l of land) await this.#api.putLand({ farmId: this.farmId(), ...l });
      for (const l of levels) await this.#api.putFactor({ farmId: this.farmId(), ...l });
      const extra = [land.length ? `land of ${land.length} seasons` : '', levels.length ? `${levels.length} fixed-factor values` : ''].filter(Boolean).join(' and ');
      this.status.set({ ok: true, text: `Pasted ${records.length} quantities${extra ? ` and ${extra}` : ''}.` });
    } catch (error) {
      this.status.set({ ok: false, text: `Not pasted: ${errorMessage(error)}` });
    }
    this.records.reload();
    this.land.reload();
    this.factors.reload();
  }

  #columnName(colId: string): string {
    if (colId === 'landHa') return 'land';
    if (colId.startsWith('fx_')) return colId.slice(3);
    return this.ref.items().find((it) => itemKey(it.id) === colId)?.name ?? colId;
  }

  protected editFarm(): void {
    const farm = this.farm();
    if (!farm) return;
    openFarmDialog(this.#dialog, farm, this.farms.hasValue() ? this.farms.value() : []).subscribe((saved) => {
      if (!saved) return;
      this.farms.reload();
      this.#snackBar.open(`${saved.name} saved.`, 'OK');
    });
  }

  protected async deleteFarm(): Promise<void> {
    const farm = this.farm();
    if (!farm) return;
    const data: ConfirmDialogData = {
      title: `Delete ${farm.name}?`,
      message: `This deletes the farm and its ${this.recordCount()} records and land of every season. Models already fitted keep their copy of the data. The audit log records the deletion.`,
      confirmLabel: 'Delete farm and records',
      destructive: true,
    };
    if (!(await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed()))) return;
    try {
      await this.#api.deleteFarm(farm.id);
      this.#snackBar.open(`${farm.name} deleted.`, 'OK');
      await this.#router.navigate(['/farms']);
    } catch (error) {
      this.#snackBar.open(errorMessage(error), 'Dismiss');
    }
  }

  protected async download(format: 'csv' | 'xlsx'): Promise<void> {
    const farm = this.farm();
    try {
      await this.#api.download(`/api/records/export?format=${format}&farms=${this.farmId()}`, `netput-records-${farm?.code ?? this.farmId()}.${format}`);
    } catch (error) {
      if (errorStatus(error) === 404 && format === 'csv') {
        this.#grid()?.exportDataAsCsv({ fileName: `netput-records-${farm?.code ?? this.farmId()}.csv`, processCellCallback: safeCsvCell });
        return;
      }
      this.#snackBar.open(errorStatus(error) === 404 ? 'This server does not offer XLSX exports of records yet.' : errorMessage(error), 'Dismiss');
    }
  }
}
