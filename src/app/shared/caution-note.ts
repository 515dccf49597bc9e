import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIcon } from '@angular/material/icon';

/** A caution placed next to figures that could drive a money or fertiliser decision. */
@Component({
  selector: 'np-caution-note',
  imports: [MatIcon],
  template: `
    <aside class="note" [attr.aria-label]="label()">
      <mat-icon aria-hidden="true">info</mat-icon>
      <div class="body"><ng-content /></div>
    </aside>
  `,
  styles: `
    .note {
      display: flex;
      gap: 12px;
      align-items: flex-start;
      padding: 12px 16px;
      border-radius: var(--mat-sys-corner-medium);
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
      font: var(--mat-sys-body-medium);
    }
    mat-icon {
      flex: none;
    }
    .body ::ng-deep p {
      margin: 0;
    }
    .body ::ng-deep p + p {
      margin-top: 6px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CautionNote {
  readonly label = input('Caution');
}
