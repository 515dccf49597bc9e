import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIcon } from '@angular/material/icon';
import { STATE_LABELS, type RunState } from './model-types';

const ICONS: Record<RunState, string> = {
  queued: 'hourglass_empty',
  running: 'autorenew',
  succeeded: 'check_circle',
  failed: 'error',
  cancelled: 'block',
};

/** A run's state in words and an icon, never by colour alone. */
@Component({
  selector: 'np-run-state-badge',
  imports: [MatIcon],
  template: `<span [class]="'badge badge-' + state()"><mat-icon aria-hidden="true">{{ icon() }}</mat-icon>{{ label() }}</span>`,
  styles: `
    .badge {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      padding: 2px 10px 2px 6px;
      border-radius: 999px;
      font: var(--mat-sys-label-medium);
      white-space: nowrap;
    }
    mat-icon {
      font-size: 18px;
      width: 18px;
      height: 18px;
    }
    .badge-succeeded {
      background: var(--mat-sys-primary-container);
      color: var(--mat-sys-on-primary-container);
    }
    .badge-running,
    .badge-queued {
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
    }
    .badge-failed {
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
    }
    .badge-cancelled {
      background: var(--mat-sys-surface-container-highest);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RunStateBadge {
  readonly state = input.required<RunState>();
  protected readonly label = computed(() => STATE_LABELS[this.state()]);
  protected readonly icon = computed(() => ICONS[this.state()]);
}
