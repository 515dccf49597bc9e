import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { formatPercent, formatPrice, formatSignedPercent } from './outlook-format';
import type { ItemExpectation } from './outlook-api-types';

export interface MissingExpectation {
  code: string;
  name: string;
  priceUnit: string;
}

/** The expected prices of the season: method, low/base/high and the method's past errors, with how each was made. */
@Component({
  selector: 'np-expectations-table',
  imports: [MatButton, MatIcon],
  template: `
    <div class="np-table-scroll" tabindex="0">
      <table [attr.aria-label]="label()">
        <thead>
          <tr>
            <th scope="col">Item</th>
            <th scope="col" class="num">Low</th>
            <th scope="col" class="num">Base</th>
            <th scope="col" class="num">High</th>
            @if (!compact()) {
              <th scope="col">Method</th>
              <th scope="col" class="num">Past error (RMS)</th>
            }
            @if (editable()) {
              <th scope="col"><span class="np-sr-only">Change</span></th>
            }
          </tr>
        </thead>
        <tbody>
          @for (e of expectations(); track e.item) {
            <tr class="main">
              <th scope="row">
                <span class="name">{{ e.name }}</span>
                <span class="meta">{{ e.role === 'output' ? 'Output' : 'Input' }}, {{ e.priceUnit }}</span>
                @if (compact()) {
                  <span class="meta">{{ e.methodLabel }}</span>
                }
              </th>
              <td class="num">{{ formatPrice(e.low) }}</td>
              <td class="num base">{{ formatPrice(e.base) }}</td>
              <td class="num">{{ formatPrice(e.high) }}</td>
              @if (!compact()) {
                <td class="method">{{ e.methodLabel }}</td>
                <td class="num">
                  @if (e.errors.rmsPct !== null) {
                    {{ formatPercent(e.errors.rmsPct) }}
                    <span class="meta">{{ e.errors.seasons.length }} seasons, mean {{ formatSignedPercent(e.errors.meanPct) }}</span>
                  } @else {
                    <span class="np-muted">none</span>
                  }
                </td>
              }
              @if (editable()) {
                <td class="action">
                  <button matButton type="button" (click)="choose.emit(e.item)" [attr.aria-label]="'Change the expected price of ' + e.name">
                    <mat-icon>tune</mat-icon>Change
                  </button>
                </td>
              }
            </tr>
            <tr class="explain">
              <td [attr.colspan]="columns()">
                @if (compact()) {
                  <details>
                    <summary>How this price was set</summary>
                    {{ e.explanation }}
                  </details>
                } @else {
                  {{ e.explanation }}
                }
                @if (e.note) {
                  <span class="note">Planner's note: {{ e.note }}</span>
                }
              </td>
            </tr>
          }
          @for (m of missing(); track m.code) {
            <tr class="main missing">
              <th scope="row">
                <span class="name">{{ m.name }}</span>
                <span class="meta">{{ m.priceUnit }}</span>
              </th>
              <td [attr.colspan]="columns() - 2" class="np-error-text">No expected price yet: the projection needs one for every item of the model.</td>
              <td class="action">
                <button matButton="filled" type="button" (click)="choose.emit(m.code)" [attr.aria-label]="'Set the expected price of ' + m.name">Set</button>
              </td>
            </tr>
          }
        </tbody>
      </table>
    </div>
  `,
  styles: `
    :host {
      display: block;
    }
    table {
      border-collapse: collapse;
    }
    th,
    td {
      padding: 8px 12px;
      text-align: left;
      vertical-align: top;
    }
    thead th {
      font: var(--mat-sys-label-large);
      background: var(--mat-sys-surface-container);
      border-bottom: 1px solid var(--mat-sys-outline-variant);
      white-space: nowrap;
    }
    tbody th {
      font-weight: 400;
    }
    tr.main th,
    tr.main td {
      padding-bottom: 2px;
    }
    tr.explain td {
      padding-top: 0;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
    tr.missing th,
    tr.missing td {
      border-bottom: 1px solid var(--mat-sys-outline-variant);
      padding-bottom: 8px;
    }
    .name {
      display: block;
      font-weight: 500;
    }
    .meta {
      display: block;
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
    summary {
      cursor: pointer;
      color: var(--mat-sys-primary);
    }
    .note {
      display: block;
      margin-top: 2px;
      color: var(--mat-sys-on-surface);
    }
    .num {
      text-align: right;
      white-space: nowrap;
      font-variant-numeric: tabular-nums;
    }
    .base {
      font-weight: 500;
    }
    .action {
      text-align: right;
      white-space: nowrap;
      padding-top: 2px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ExpectationsTable {
  // inputs
  readonly expectations = input.required<readonly ItemExpectation[]>();
  readonly missing = input<readonly MissingExpectation[]>([]);
  readonly editable = input(false);
  /** Method under the item name, no error column: for a phone. */
  readonly compact = input(false);
  readonly label = input('Expected prices');

  readonly choose = output<string>();

  protected readonly formatPrice = formatPrice;
  protected readonly formatPercent = formatPercent;
  protected readonly formatSignedPercent = formatSignedPercent;

  protected columns(): number {
    return 4 + (this.compact() ? 0 : 2) + (this.editable() ? 1 : 0);
  }
}
