import { DecimalPipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, linkedSignal, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { RouterLink } from '@angular/router';
import type { ColDef, RowClickedEvent } from 'ag-grid-community';
import { firstValueFrom } from 'rxjs';
import type { FarmSummary } from '../../../shared/api-types';
import { BINDING_STATUSES, CONTRACT_STATUS_LABELS, type ContractRow } from '../../../shared/contract-schemas';
import { ACCESS, roleAllows } from '../core/access';
import { errorMessage } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { SettingsStore } from '../core/settings-store';
import { AgGridAngular } from '../shared/grid';
import { ReferenceStore } from '../data-desk/reference-store';
import { ContractDialog, type ContractDialogData } from './contract-dialog';
import { deliveryWindow } from './contract-format';
import { HistoryLink } from '../shared/history-link';
import { LoadProblem } from '../shared/load-problem';
import { GridSearch } from '../shared/grid-search';

const qty = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 1 });
const money = new Intl.NumberFormat('en-GB', { minimumFractionDigits: 2, maximumFractionDigits: 2 });

/** `/contracts`: the members' forward delivery contracts of a season (planners and administrators record and change them). */
@Component({
  selector: 'np-contracts-page',
  imports: [DecimalPipe, RouterLink, AgGridAngular, MatButton, MatFormField, MatLabel, MatIcon, MatSelect, MatOption, MatProgressBar, HistoryLink, LoadProblem, GridSearch],
  templateUrl: './contracts-page.html',
  styleUrl: './contracts-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ContractsPage {
  readonly #auth = inject(AuthStore);
  readonly #dialog = inject(MatDialog);
  readonly #snackBar = inject(MatSnackBar);
  readonly #settings = inject(SettingsStore);
  protected readonly ref = inject(ReferenceStore);

  protected readonly canEdit = computed(() => roleAllows(this.#auth.role(), ACCESS.contractsEdit));
  protected readonly canImport = computed(() => roleAllows(this.#auth.role(), ACCESS.imports));

  protected readonly contracts = httpResource<ContractRow[]>(() => '/api/contracts');
  readonly #farms = httpResource<FarmSummary[]>(() => '/api/farms');
  protected readonly all = computed(() => (this.contracts.hasValue() ? this.contracts.value() : []));
  protected readonly problem = computed(() => (this.contracts.error() ? errorMessage(this.contracts.error()) : null));

  /** The seasons with contracts, newest first; the page opens on the newest. */
  protected readonly seasons = computed(() => {
    const seen = new Map<number, string>();
    for (const c of this.all()) seen.set(c.seasonId, c.season);
    return [...seen.entries()].map(([id, label]) => ({ id, label })).sort((a, b) => b.label.localeCompare(a.label));
  });
  protected readonly seasonId = linkedSignal<number | null>(() => this.seasons()[0]?.id ?? null);
  protected readonly rows = computed(() => this.all().filter((c) => c.seasonId === this.seasonId()));
  protected readonly quickFilter = signal('');
  /** Committed tonnage per output for the signed and delivered contracts shown. */
  protected readonly totals = computed(() => {
    const by = new Map<string, { name: string; unit: string; quantity: number; value: number; n: number }>();
    for (const c of this.rows().filter((r) => BINDING_STATUSES.includes(r.status))) {
      const t = by.get(c.itemCode) ?? { name: c.itemName, unit: c.unit, quantity: 0, value: 0, n: 0 };
      t.quantity += c.quantity;
      t.value += c.quantity * c.price;
      t.n++;
      by.set(c.itemCode, t);
    }
    return [...by.values()].map((t) => ({ ...t, meanPrice: t.value / t.quantity }));
  });
  protected readonly currency = computed(() => this.#settings.settings()?.currency ?? 'EUR');

  protected readonly columns: ColDef<ContractRow>[] = [
    { field: 'reference', headerName: 'Contract', minWidth: 120, filter: 'agTextColumnFilter', sort: 'asc' },
    { colId: 'farm', headerName: 'Farm', minWidth: 170, filter: 'agTextColumnFilter', valueGetter: (p) => (p.data ? `${p.data.farmCode} · ${p.data.farmName}` : '') },
    { field: 'itemName', headerName: 'Output', minWidth: 120, filter: 'agTextColumnFilter' },
    {
      field: 'quantity',
      headerName: 'Quantity',
      type: 'numericColumn',
      filter: 'agNumberColumnFilter',
      valueFormatter: (p) => (p.data ? `${qty.format(p.data.quantity)} ${p.data.unit}` : ''),
    },
    {
      field: 'price',
      headerName: 'Contract price',
      type: 'numericColumn',
      filter: 'agNumberColumnFilter',
      valueFormatter: (p) => (p.data ? `${money.format(p.data.price)} ${p.data.currency}/${p.data.unit}` : ''),
    },
    { colId: 'window', headerName: 'Delivery', minWidth: 130, valueGetter: (p) => (p.data ? deliveryWindow(p.data.deliveryFrom, p.data.deliveryTo) : '') },
    { field: 'status', headerName: 'Status', minWidth: 110, filter: 'agTextColumnFilter', valueFormatter: (p) => (p.data ? CONTRACT_STATUS_LABELS[p.data.status] : '') },
  ];

  #dialogData(contract?: ContractRow): ContractDialogData {
    const farms = (this.#farms.hasValue() ? this.#farms.value() : []).map((f) => ({ id: f.id, code: f.code, name: f.name }));
    return { farms, items: this.ref.items(), seasons: this.ref.seasons(), currency: this.currency(), seasonId: this.seasonId(), contract };
  }

  protected async add(): Promise<void> {
    const saved = await firstValueFrom(this.#dialog.open<ContractDialog, ContractDialogData, ContractRow>(ContractDialog, { data: this.#dialogData(), autoFocus: 'first-tabbable' }).afterClosed());
    if (!saved) return;
    this.contracts.reload();
    this.seasonId.set(saved.seasonId);
    this.#snackBar.open(`Contract ${saved.reference} recorded: ${qty.format(saved.quantity)} ${saved.unit} of ${saved.itemName.toLowerCase()} at ${money.format(saved.price)} ${saved.currency}/${saved.unit}`, 'OK', { duration: 5000 });
  }

  protected async rowClicked(event: RowClickedEvent<ContractRow>): Promise<void> {
    if (!this.canEdit() || !event.data) return;
    const saved = await firstValueFrom(this.#dialog.open<ContractDialog, ContractDialogData, ContractRow>(ContractDialog, { data: this.#dialogData(event.data), autoFocus: 'first-tabbable' }).afterClosed());
    if (saved) {
      this.contracts.reload();
      this.#snackBar.open(`Contract ${saved.reference} saved`, 'OK', { duration: 4000 });
    }
  }
}
