import { booleanAttribute, ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIcon } from '@angular/material/icon';

/** What a state means to the reader; each tone has its own container colour of the theme. */
export type PillTone = 'success' | 'pending' | 'error' | 'neutral';

/**
 * A state in words (and an icon when given) on a rounded pill coloured by its tone: the state is
 * never told by colour alone. `compact` shows only the icon on a phone; the words stay for screen readers.
 */
@Component({
  selector: 'np-status-pill',
  imports: [MatIcon],
  template: `
    <span class="pill" [class]="tone()" [class.with-icon]="!!icon()" [class.compact]="compact() && !!icon()">
      @if (icon(); as i) {
        <mat-icon aria-hidden="true">{{ i }}</mat-icon>
      }
      <span class="label">{{ label() }}</span>
    </span>
  `,
  styles: `
    .pill {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      padding: 0 10px;
      border-radius: 999px;
      font: var(--mat-sys-label-medium);
      white-space: nowrap;
    }
    .with-icon {
      padding: 2px 10px 2px 6px;
    }
    mat-icon {
      font-size: 18px;
      width: 18px;
      height: 18px;
    }
    .success {
      background: var(--mat-sys-primary-container);
      color: var(--mat-sys-on-primary-container);
    }
    .pending {
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
    }
    .error {
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
    }
    .neutral {
      background: var(--mat-sys-surface-container-highest);
      color: var(--mat-sys-on-surface-variant);
    }
    @media (max-width: 599.98px) {
      .compact {
        padding: 4px;
      }
      .compact .label {
        position: absolute;
        width: 1px;
        height: 1px;
        overflow: hidden;
        clip: rect(0, 0, 0, 0);
        white-space: nowrap;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class StatusPill {
  // inputs
  readonly label = input.required<string>();
  readonly tone = input<PillTone>('neutral');
  /** A Material Symbols name shown before the words. */
  readonly icon = input<string | null>(null);
  readonly compact = input(false, { transform: booleanAttribute });
}
