import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatDialog } from '@angular/material/dialog';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTab, MatTabGroup } from '@angular/material/tabs';
import { Router } from '@angular/router';
import type { ColDef } from 'ag-grid-community';
import { firstValueFrom, type Observable } from 'rxjs';
import type { DeliveryPoint, Item, PriceIndex, Season } from '../../../../shared/api-types';
import { ACCESS, roleAllows } from '../../core/access';
import { errorMessage, errorStatus } from '../../core/api-error';
import { AuthStore } from '../../core/auth-store';
import { ConfirmDialog, type ConfirmDialogData } from '../../shared/confirm-dialog';
import { DataDeskApi } from '../data-desk-api';
import { ReferenceStore } from '../reference-store';
import { seasonSpan } from '../season-dates';
import { DeliveryPointDialog } from './delivery-point-dialog';
import { CATEGORIES, ItemDialog } from './item-dialog';
import { PriceIndexDialog } from './price-index-dialog';
import { RefTable } from './ref-table';
import { SeasonDialog, type SeasonDialogData } from './season-dialog';
import { HistoryLink } from '../../shared/history-link';

const TABS = ['items', 'seasons', 'points', 'indexes'] as const;
type Tab = (typeof TABS)[number];

const pct = (v: unknown) => (typeof v === 'number' ? `${v.toLocaleString('en-GB', { maximumFractionDigits: 1 })} %` : '');
const categoryLabel = new Map(CATEGORIES.map((c) => [c.value, c.label]));

/** A row of the price-index table: the index and the span of seasons it covers. */
interface IndexRow extends PriceIndex {
  covers: string;
}

/** `/reference`: the items catalogue, seasons, delivery points and price indexes, as tabs. Planners edit; others read. */
@Component({
  selector: 'np-reference-page',
  imports: [MatTabGroup, MatTab, RefTable, HistoryLink],
  templateUrl: './reference-page.html',
  styles: `
    .tabs {
      min-height: 360px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReferencePage {
  readonly #api = inject(DataDeskApi);
  readonly #auth = inject(AuthStore);
  readonly #dialog = inject(MatDialog);
  readonly #router = inject(Router);
  readonly #snackBar = inject(MatSnackBar);
  protected readonly ref = inject(ReferenceStore);

  /** `?tab=items|seasons|points|indexes` (bound by the router). */
  readonly tab = input<string | undefined>(undefined);
  protected readonly tabIndex = computed(() => Math.max(0, TABS.indexOf((this.tab() ?? 'items') as Tab)));
  protected readonly canEdit = computed(() => roleAllows(this.#auth.role(), ACCESS.dataEdit));
  protected readonly auditEntity = computed(() => ['item', 'season', 'delivery-point', 'price-index'][this.tabIndex()]);

  protected readonly itemColumns: ColDef<Item>[] = [
    { field: 'code', headerName: 'Code', width: 130, sort: 'asc' },
    { field: 'name', headerName: 'Name', flex: 2, minWidth: 180 },
    { field: 'role', headerName: 'Output or input', width: 150, valueFormatter: (p) => (p.value === 'output' ? 'Output' : 'Input') },
    { field: 'category', headerName: 'Category', width: 130, valueFormatter: (p) => categoryLabel.get(p.value) ?? String(p.value) },
    { field: 'unit', headerName: 'Unit', width: 110 },
    { field: 'nPct', headerName: 'N', width: 90, filter: false, type: 'numericColumn', valueFormatter: (p) => pct(p.value) },
    { field: 'p2o5Pct', headerName: 'P2O5', width: 100, filter: false, type: 'numericColumn', valueFormatter: (p) => pct(p.value) },
    { field: 'k2oPct', headerName: 'K2O', width: 90, filter: false, type: 'numericColumn', valueFormatter: (p) => pct(p.value) },
  ];
  protected readonly seasonColumns: ColDef<Season>[] = [
    { field: 'label', headerName: 'Season', width: 130 },
    { field: 'startYear', headerName: 'First year', width: 130, type: 'numericColumn', sort: 'desc', filter: false },
    {
      colId: 'span',
      headerName: 'Runs',
      flex: 1,
      minWidth: 220,
      valueGetter: (p) => (p.data ? seasonSpan(p.data).text : ''),
    },
  ];
  protected readonly pointColumns: ColDef<DeliveryPoint>[] = [
    { field: 'name', headerName: 'Name', flex: 2, minWidth: 180, sort: 'asc' },
    { field: 'kind', headerName: 'Kind', width: 150, valueFormatter: (p) => (p.value === 'region' ? 'Price region' : 'Delivery point') },
    { field: 'region', headerName: 'Region', flex: 1, minWidth: 140 },
  ];
  protected readonly indexColumns: ColDef<IndexRow>[] = [
    { field: 'name', headerName: 'Name', flex: 2, minWidth: 200 },
    { field: 'base', headerName: 'Base', width: 160 },
    { field: 'covers', headerName: 'Seasons covered', flex: 1, minWidth: 200 },
    { field: 'source', headerName: 'Source', flex: 2, minWidth: 200, tooltipField: 'source' },
  ];
  protected readonly indexRows = computed<IndexRow[]>(() =>
    this.ref.priceIndexes().map((ix) => ({
      ...ix,
      covers: ix.values.length ? `${ix.values.length}: ${ix.values[0].season} – ${ix.values[ix.values.length - 1].season}` : 'none',
    })),
  );
  protected readonly problemOf = (error: unknown) => (error ? errorMessage(error) : null);

  protected selectTab(index: number): void {
    void this.#router.navigate([], { queryParams: { tab: TABS[index] }, replaceUrl: true });
  }

  // --- items ---
  protected editItem(item: Item | null): void {
    this.#afterSave(this.#dialog.open(ItemDialog, { data: item, autoFocus: 'first-tabbable' }).afterClosed(), (saved: Item) =>
      item ? `${saved.name} saved.` : `${saved.name} added.`,
    );
  }
  protected removeItem(item: Item): void {
    void this.#remove(`the item ${item.name}`, () => this.#api.deleteItem(item.id), 'Prices, farm records or models use it.');
  }

  // --- seasons ---
  protected editSeason(season: Season | null): void {
    const data: SeasonDialogData = { season, seasons: this.ref.seasons() };
    this.#afterSave(this.#dialog.open(SeasonDialog, { data, autoFocus: 'first-tabbable' }).afterClosed(), (saved: Season) =>
      season ? `Season ${saved.label} saved.` : `Season ${saved.label} added.`,
    );
  }
  protected removeSeason(season: Season): void {
    void this.#remove(`season ${season.label}`, () => this.#api.deleteSeason(season.id), 'Prices or farm records of that season exist.');
  }

  // --- delivery points ---
  protected editPoint(point: DeliveryPoint | null): void {
    this.#afterSave(this.#dialog.open(DeliveryPointDialog, { data: point, autoFocus: 'first-tabbable' }).afterClosed(), (saved: DeliveryPoint) =>
      point ? `${saved.name} saved.` : `${saved.name} added.`,
    );
  }
  protected removePoint(point: DeliveryPoint): void {
    void this.#remove(point.name, () => this.#api.deleteDeliveryPoint(point.id), 'Prices are recorded at it.');
  }

  // --- price indexes ---
  protected addIndex(): void {
    this.#afterSave(
      this.#dialog.open(PriceIndexDialog, { data: { lookups: this.ref.lookups() }, autoFocus: 'first-tabbable', maxWidth: '96vw' }).afterClosed(),
      (saved: PriceIndex) => `${saved.name} added with ${saved.values.length} seasons. Choose it under Prices → Deflated.`,
    );
  }
  protected editIndex(ix: PriceIndex): void {
    this.#afterSave(
      this.#dialog.open(PriceIndexDialog, { data: { lookups: this.ref.lookups(), index: ix }, autoFocus: 'first-tabbable', maxWidth: '96vw' }).afterClosed(),
      (saved: PriceIndex) => `${saved.name} saved with ${saved.values.length} seasons; deflated prices use the corrected values.`,
    );
  }
  protected removeIndex(ix: PriceIndex): void {
    void this.#remove(`the index ${ix.name}`, () => this.#api.deletePriceIndex(ix.id), 'A model uses it.');
  }

  #afterSave<T>(closed: Observable<T | undefined>, message: (saved: T) => string): void {
    closed.subscribe((saved) => {
      if (!saved) return;
      this.ref.reloadAll();
      this.#snackBar.open(message(saved), 'OK');
    });
  }

  async #remove(what: string, run: () => Promise<unknown>, inUse: string): Promise<void> {
    const data: ConfirmDialogData = {
      title: `Delete ${what}?`,
      message: `This cannot be undone here; the audit log keeps what was deleted. If anything still refers to it the server refuses (${inUse.toLowerCase()}).`,
      confirmLabel: 'Delete',
      destructive: true,
    };
    if (!(await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed()))) return;
    try {
      await run();
      this.ref.reloadAll();
      this.#snackBar.open(`Deleted ${what}.`, 'OK');
    } catch (error) {
      this.#snackBar.open(errorStatus(error) === 409 ? `${what[0].toUpperCase()}${what.slice(1)} cannot be deleted: ${inUse}` : errorMessage(error), 'Dismiss');
    }
  }
}
