import { ChangeDetectionStrategy, Component, computed, inject, input, type Signal } from '@angular/core';
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

const pct = (v: unknown) => (typeof v === 'number' ? `${v.toLocaleString('en-GB', { maximumFractionDigits: 1 })} %` : '');
const categoryLabel = new Map(CATEGORIES.map((c) => [c.value, c.label]));

/** One tab: a kind of reference data, its table, and what Add, Edit and Delete open. */
interface RefKind<T extends { id: number }> {
  /** Its `?tab=` value. */
  tab: string;
  /** The tab's label. */
  title: string;
  /** Its entity in the audit log (the history link). */
  entity: string;
  rows: Signal<T[]>;
  columns: ColDef<T>[];
  /** For the table's buttons and messages (see RefTable). */
  label: string;
  plural: string;
  caption: string;
  /** The line above the table. */
  about: string;
  resource: { isLoading(): boolean; error(): unknown };
  add(): void;
  edit(row: T): void;
  remove(row: T): void;
}

/** The kinds differ in their row type; one list holds them (each kind's table only hands back its own rows). */
const refKind = <T extends { id: number }>(kind: RefKind<T>) => kind as unknown as RefKind<{ id: number }>;

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

  /** `?tab=items|seasons|points|indexes` (bound by the router; see `kinds`). */
  readonly tab = input<string | undefined>(undefined);
  protected readonly tabIndex = computed(() => Math.max(0, this.kinds.findIndex((k) => k.tab === (this.tab() ?? 'items'))));
  protected readonly canEdit = computed(() => roleAllows(this.#auth.role(), ACCESS.dataEdit));
  protected readonly auditEntity = computed(() => this.kinds[this.tabIndex()].entity);

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

  /** The tabs, in order. */
  protected readonly kinds: readonly RefKind<{ id: number }>[] = [
    refKind<Item>({
      tab: 'items',
      title: 'Items',
      entity: 'item',
      rows: this.ref.items,
      columns: this.itemColumns,
      label: 'an item',
      plural: 'items',
      caption: 'Items',
      about:
        'Outputs the members sell and inputs they buy, each with the unit its quantities and prices use. Fertilisers carry their N–P2O5–K2O analysis (% by weight).',
      resource: this.ref.itemsResource,
      add: () => this.editItem(null),
      edit: (item) => this.editItem(item),
      remove: (item) => this.removeItem(item),
    }),
    refKind<Season>({
      tab: 'seasons',
      title: 'Seasons',
      entity: 'season',
      rows: this.ref.seasons,
      columns: this.seasonColumns,
      label: 'a season',
      plural: 'seasons',
      caption: 'Seasons',
      about: 'Crop or marketing years of twelve months from their first month. Prices and farm records belong to a season.',
      resource: this.ref.seasonsResource,
      add: () => this.editSeason(null),
      edit: (season) => this.editSeason(season),
      remove: (season) => this.removeSeason(season),
    }),
    refKind<DeliveryPoint>({
      tab: 'points',
      title: 'Delivery points',
      entity: 'delivery-point',
      rows: this.ref.deliveryPoints,
      columns: this.pointColumns,
      label: 'a point',
      plural: 'delivery points',
      caption: 'Delivery points and regions',
      about: 'Where prices are quoted: elevators, stores, the input depot, or whole price regions.',
      resource: this.ref.deliveryPointsResource,
      add: () => this.editPoint(null),
      edit: (point) => this.editPoint(point),
      remove: (point) => this.removePoint(point),
    }),
    refKind<IndexRow>({
      tab: 'indexes',
      title: 'Price indexes',
      entity: 'price-index',
      rows: this.indexRows,
      columns: this.indexColumns,
      label: 'an index',
      plural: 'price indexes',
      caption: 'Price indexes',
      about:
        'Indexes to deflate prices by (price ÷ index × 100), e.g. a consumer price index. Upload the official series with its source; a season without a value is left as a gap when deflating.',
      resource: this.ref.priceIndexesResource,
      add: () => this.addIndex(),
      edit: (ix) => this.editIndex(ix),
      remove: (ix) => this.removeIndex(ix),
    }),
  ];
  protected readonly problemOf = (error: unknown) => (error ? errorMessage(error) : null);

  protected selectTab(index: number): void {
    void this.#router.navigate([], { queryParams: { tab: this.kinds[index].tab }, replaceUrl: true });
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
