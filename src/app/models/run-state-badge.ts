import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { StatusPill, type PillTone } from '../shared/status-pill';
import { STATE_LABELS } from './model-format';
import type { RunState } from './models-api-types';

const LOOKS: Record<RunState, { icon: string; tone: PillTone }> = {
  queued: { icon: 'hourglass_empty', tone: 'pending' },
  running: { icon: 'autorenew', tone: 'pending' },
  succeeded: { icon: 'check_circle', tone: 'success' },
  failed: { icon: 'error', tone: 'error' },
  cancelled: { icon: 'block', tone: 'neutral' },
};

/** A run's state in words and an icon, never by colour alone. */
@Component({
  selector: 'np-run-state-badge',
  imports: [StatusPill],
  template: `<np-status-pill [label]="label()" [icon]="look().icon" [tone]="look().tone" />`,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RunStateBadge {
  readonly state = input.required<RunState>();
  protected readonly label = computed(() => STATE_LABELS[this.state()]);
  protected readonly look = computed(() => LOOKS[this.state()]);
}
