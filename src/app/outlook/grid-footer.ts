import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import type { AgGridAngular } from '../shared/grid';
import { csvCell } from './outlook-format';

/**
 * The line under an outlook grid (the farms grid, the projection grid): what the figures are, in
 * the projected words, and Export CSV, which writes the grid's rows with every figure unrounded.
 * `<np-grid-footer [grid]="grid" [fileName]="fileName()">Base scenario at the estimates.</np-grid-footer>`
 */
@Component({
  selector: 'np-grid-footer',
  imports: [MatButton, MatIcon],
  template: `
    <span class="np-muted"><ng-content /></span>
    <button matButton type="button" (click)="exportCsv()"><mat-icon>download</mat-icon>Export CSV</button>
  `,
  styles: `
    :host {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      justify-content: space-between;
      gap: 4px 16px;
      margin-top: 4px;
      font: var(--mat-sys-body-small);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class GridFooter {
  /** The grid whose rows Export CSV writes. */
  readonly grid = input.required<AgGridAngular>();
  /** The CSV file name, without extension. */
  readonly fileName = input.required<string>();

  protected exportCsv(): void {
    this.grid().api?.exportDataAsCsv({ fileName: `${this.fileName()}.csv`, processCellCallback: csvCell });
  }
}
