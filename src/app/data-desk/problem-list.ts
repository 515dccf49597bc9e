import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIcon } from '@angular/material/icon';

/** A problem with one row (and column) of a file or a pasted block. `row` null: the file as a whole. */
export interface RowProblem {
  row: number | null;
  column: string | null;
  message: string;
}

/** "12 problems in 9 rows" (or the file-level count when no row is named). */
export function problemSummary(problems: readonly RowProblem[], total: number, rowWord = 'row'): string {
  const rows = new Set(problems.filter((p) => p.row !== null).map((p) => p.row)).size;
  const word = total === 1 ? 'problem' : 'problems';
  if (rows === 0) return `${total.toLocaleString('en-GB')} ${word}`;
  return `${total.toLocaleString('en-GB')} ${word} in ${rows.toLocaleString('en-GB')} ${rows === 1 ? rowWord : `${rowWord}s`}${total > problems.length ? ' listed' : ''}`;
}

/**
 * Every bad row of a file or pasted block, as row, column and message, in file order. Used by the
 * imports page (rows as the spreadsheet numbers them) and the paste dialog (lines of the block).
 */
@Component({
  selector: 'np-problem-list',
  imports: [DecimalPipe, MatIcon],
  template: `
    <section class="problems" [attr.aria-label]="heading()">
      <h3 class="summary">
        <mat-icon aria-hidden="true">error</mat-icon>
        <span>{{ heading() }}: {{ summary() }}</span>
      </h3>
      <div class="scroll" tabindex="0" [attr.aria-label]="heading() + ', scrollable'">
        <table class="list">
          <thead>
            <tr>
              <th scope="col" class="num">{{ rowLabel() }}</th>
              <th scope="col">Column</th>
              <th scope="col">What is wrong</th>
            </tr>
          </thead>
          <tbody>
            @for (p of problems(); track $index) {
              <tr class="problem">
                <td class="num">{{ p.row === null ? '—' : (p.row | number) }}</td>
                <td class="column">{{ p.column ?? (p.row === headerRow() ? '(header)' : '(whole row)') }}</td>
                <td class="message">{{ p.message }}</td>
              </tr>
            }
          </tbody>
        </table>
      </div>
      @if (notShown() > 0) {
        <p class="more">…and {{ notShown() | number }} more not listed. Fix the ones above and check again to see the rest.</p>
      }
    </section>
  `,
  styles: `
    .problems {
      border: 1px solid var(--mat-sys-error);
      border-radius: var(--mat-sys-corner-medium);
      background: var(--mat-sys-surface-container-lowest);
      overflow: hidden;
    }
    .summary {
      display: flex;
      gap: 8px;
      align-items: center;
      margin: 0;
      padding: 10px 16px;
      font: var(--mat-sys-title-small);
      color: var(--mat-sys-on-error-container);
      background: var(--mat-sys-error-container);
    }
    .scroll {
      max-height: 360px;
      overflow: auto;
    }
    .list {
      width: 100%;
      border-collapse: collapse;
      font: var(--mat-sys-body-medium);
    }
    th {
      position: sticky;
      top: 0;
      text-align: left;
      font: var(--mat-sys-label-large);
      background: var(--mat-sys-surface-container);
      padding: 8px 12px;
    }
    td {
      padding: 6px 12px;
      border-top: 1px solid var(--mat-sys-outline-variant);
      vertical-align: top;
    }
    .num {
      text-align: right;
      width: 4.5em;
      font-variant-numeric: tabular-nums;
    }
    .column {
      white-space: nowrap;
      font-weight: 500;
    }
    .message {
      overflow-wrap: anywhere;
    }
    .more {
      margin: 0;
      padding: 8px 16px;
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProblemList {
  readonly problems = input.required<readonly RowProblem[]>();
  /** How many problems there are in all (the list may hold only the first ones). */
  readonly total = input<number | null>(null);
  readonly heading = input('Problems');
  readonly rowLabel = input('Row');
  /** The header's row number, so its problems read "(header)" rather than "(whole row)". */
  readonly headerRow = input<number | null>(1);

  protected readonly count = computed(() => this.total() ?? this.problems().length);
  protected readonly notShown = computed(() => Math.max(0, this.count() - this.problems().length));
  protected readonly summary = computed(() => problemSummary(this.problems(), this.count(), this.rowLabel().toLowerCase()));
}
