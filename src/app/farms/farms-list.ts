import { DecimalPipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router } from '@angular/router';
import type { ColDef, GridApi, GridReadyEvent, ICellRendererParams, RowClickedEvent } from 'ag-grid-community';
import { farmMemberNames, type FarmSummary } from '../../../shared/api-types';
import { ACCESS, roleAllows } from '../core/access';
import { errorMessage } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { safeCsvCell } from '../data-desk/data-grid';
import { AgGridAngular } from '../shared/grid';
import { openFarmDialog } from './farm-dialog';
import { HistoryLink } from '../shared/history-link';
import { LoadProblem } from '../shared/load-problem';
import { GridSearch } from '../shared/grid-search';

const landFormat = new Intl.NumberFormat(undefined, { minimumFractionDigits: 1, maximumFractionDigits: 1 });

/** `/farms`: every farm of the co-op; a row opens the farm's records. Planners add and edit farms. */
@Component({
  selector: 'np-farms-list',
  imports: [DecimalPipe, AgGridAngular, GridSearch, MatIcon, MatButton, MatProgressBar, HistoryLink, LoadProblem],
  templateUrl: './farms-list.html',
  styleUrl: './farms-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmsList {
  readonly #auth = inject(AuthStore);
  readonly #dialog = inject(MatDialog);
  readonly #router = inject(Router);
  readonly #snackBar = inject(MatSnackBar);

  protected readonly farms = httpResource<FarmSummary[]>(() => '/api/farms', { defaultValue: [] });
  protected readonly rows = computed(() => (this.farms.hasValue() ? this.farms.value() : []));
  protected readonly problem = computed(() => (this.farms.error() ? errorMessage(this.farms.error()) : null));
  protected readonly totalLand = computed(() => this.rows().reduce((sum, f) => sum + f.landHa, 0));
  protected readonly canEdit = computed(() => roleAllows(this.#auth.role(), ACCESS.dataEdit));
  protected readonly quickFilter = signal('');
  readonly #grid = signal<GridApi<FarmSummary> | null>(null);

  protected readonly columns: ColDef<FarmSummary>[] = [
    {
      field: 'code',
      headerName: 'Code',
      width: 110,
      filter: 'agTextColumnFilter',
      sort: 'asc',
      // A real link, so the records open by keyboard, middle-click or a click on the code.
      cellRenderer: (p: ICellRendererParams<FarmSummary>) => {
        const a = document.createElement('a');
        a.textContent = p.value ?? '';
        if (p.data) {
          a.href = `/farms/${p.data.id}`;
          a.addEventListener('click', (event) => {
            if (event.ctrlKey || event.metaKey || event.shiftKey || event.button !== 0) return;
            event.preventDefault();
            void this.#router.navigate(['/farms', p.data!.id]);
          });
        }
        return a;
      },
    },
    { field: 'name', headerName: 'Farm', flex: 2, minWidth: 180, filter: 'agTextColumnFilter' },
    { field: 'region', headerName: 'Region', flex: 1, minWidth: 140, filter: 'agTextColumnFilter' },
    {
      field: 'landHa',
      headerName: 'Land (ha)',
      type: 'numericColumn',
      width: 130,
      filter: 'agNumberColumnFilter',
      valueFormatter: (p) => (p.value == null ? '' : landFormat.format(p.value as number)),
    },
    {
      colId: 'members',
      headerName: 'Members',
      flex: 1,
      minWidth: 160,
      filter: 'agTextColumnFilter',
      valueGetter: (p) => farmMemberNames(p.data?.members ?? []),
    },
  ];

  protected gridReady(event: GridReadyEvent<FarmSummary>): void {
    this.#grid.set(event.api);
  }

  protected rowClicked(event: RowClickedEvent<FarmSummary>): void {
    const target = event.event?.target as HTMLElement | null;
    if (target?.closest('a') || !event.data) return;
    void this.#router.navigate(['/farms', event.data.id]);
  }

  protected addFarm(): void {
    openFarmDialog(this.#dialog, null, this.rows()).subscribe((saved) => {
      if (!saved) return;
      this.farms.reload();
      this.#snackBar.open(`${saved.name} (${saved.code}) added. Open it to enter its records.`, 'OK');
    });
  }

  protected exportCsv(): void {
    this.#grid()?.exportDataAsCsv({ fileName: 'netput-farms.csv', processCellCallback: safeCsvCell });
  }
}
