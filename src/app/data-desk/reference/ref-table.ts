import { ChangeDetectionStrategy, Component, computed, input, output, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import type { ColDef, GetRowIdParams, RowDoubleClickedEvent, RowSelectionOptions, SelectionChangedEvent } from 'ag-grid-community';
import { AgGridAngular } from '../data-grid';

/**
 * A reference table: the rows in a grid, and for planners Add, Edit and Delete on the selected row
 * (a double-click edits). The page owns the dialogs and the writes.
 */
@Component({
  selector: 'np-ref-table',
  imports: [AgGridAngular, MatButton, MatIcon, MatProgressBar],
  template: `
    <div class="bar">
      <p class="np-muted about"><ng-content /></p>
      @if (canEdit()) {
        <button matButton="filled" type="button" (click)="add.emit()">
          <mat-icon>add</mat-icon>
          Add {{ label() }}
        </button>
        <button matButton="outlined" type="button" [disabled]="!selected()" (click)="edit.emit(selected()!)">
          <mat-icon>edit</mat-icon>
          Edit
        </button>
        <button matButton="outlined" type="button" class="danger" [disabled]="!selected()" (click)="remove.emit(selected()!)">
          <mat-icon>delete</mat-icon>
          Delete
        </button>
      }
    </div>
    @if (loading()) {
      <mat-progress-bar mode="indeterminate" [attr.aria-label]="'Loading ' + plural()" />
    }
    @if (problem(); as p) {
      <p class="np-error-text" role="alert">The {{ plural() }} could not be loaded: {{ p }}</p>
    }
    <ag-grid-angular
      class="grid"
      [attr.aria-label]="caption()"
      [rowData]="rows()"
      [columnDefs]="columns()"
      [defaultColDef]="defaultColDef"
      [getRowId]="getRowId"
      [rowSelection]="selection()"
      domLayout="autoHeight"
      [overlayNoRowsTemplate]="'Nothing here yet.'"
      (selectionChanged)="selectionChanged($event)"
      (rowDoubleClicked)="doubleClicked($event)"
    />
  `,
  styles: `
    :host {
      display: flex;
      flex-direction: column;
      gap: 12px;
      padding-top: 16px;
    }
    .bar {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px 12px;
    }
    .about {
      flex: 1 1 320px;
      margin: 0;
    }
    .danger:not([disabled]) {
      --mat-button-outlined-label-text-color: var(--mat-sys-error);
    }
    .grid {
      width: 100%;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RefTable<T extends { id: number }> {
  readonly rows = input.required<T[]>();
  readonly columns = input.required<ColDef<T>[]>();
  /** e.g. "item", for the buttons. */
  readonly label = input.required<string>();
  readonly plural = input.required<string>();
  readonly caption = input.required<string>();
  readonly canEdit = input(false);
  readonly loading = input(false);
  readonly problem = input<string | null>(null);

  readonly add = output<void>();
  readonly edit = output<T>();
  readonly remove = output<T>();

  protected readonly defaultColDef: ColDef = { filter: 'agTextColumnFilter' };
  protected readonly getRowId = (p: GetRowIdParams<T>) => String(p.data.id);
  protected readonly selected = signal<T | null>(null);
  protected readonly selection = computed<RowSelectionOptions | undefined>(() =>
    this.canEdit() ? { mode: 'singleRow', checkboxes: false, enableClickSelection: true } : undefined,
  );

  protected selectionChanged(event: SelectionChangedEvent<T>): void {
    this.selected.set(event.api.getSelectedRows()[0] ?? null);
  }

  protected doubleClicked(event: RowDoubleClickedEvent<T>): void {
    if (this.canEdit() && event.data) this.edit.emit(event.data);
  }
}
