import { DecimalPipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, effect, inject } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatCard, MatCardContent } from '@angular/material/card';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { CoopSummary } from '../../../shared/api-types';
import { ROLE_LABELS } from '../../../shared/roles';
import { errorMessage } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { FERTILISER_RATE_CAUTION } from '../shared/base-cautions';
import { CautionNote } from '../shared/caution-note';
import { LoadProblem } from '../shared/load-problem';

/** One thing the person could do now, worded for their role. */
export interface TodoItem {
  icon: string;
  text: string;
  link?: { path: string; label: string };
}

/** One figure card on Home: an icon, a count and what it counts. */
interface Figure {
  icon: string;
  value: number;
  label: string;
}

@Component({
  selector: 'np-coop-overview',
  imports: [DecimalPipe, RouterLink, MatCard, MatCardContent, MatIcon, MatButton, MatProgressBar, CautionNote, LoadProblem],
  templateUrl: './coop-overview.html',
  styleUrl: './coop-overview.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CoopOverview {
  readonly #auth = inject(AuthStore);

  protected readonly summary = httpResource<CoopSummary>(() => '/api/summary');
  protected readonly fertiliserCaution = FERTILISER_RATE_CAUTION;
  protected readonly data = computed(() => (this.summary.hasValue() ? this.summary.value() : null));
  protected readonly problem = computed(() => (this.summary.error() ? errorMessage(this.summary.error()) : null));
  protected readonly roleLabel = computed(() => {
    const role = this.#auth.role();
    return role ? ROLE_LABELS[role] : '';
  });
  protected readonly firstName = computed(() => this.#auth.user()?.name.split(/\s+/)[0] ?? '');

  protected readonly seasonsRange = computed(() => {
    const seasons = this.data()?.seasons;
    if (!seasons || seasons.count === 0 || !seasons.first) return seasons?.opened.length ? `none with data yet (${seasons.opened.join(', ')} opened)` : 'none yet';
    const range = seasons.first === seasons.last ? seasons.first : `${seasons.first} – ${seasons.last}`;
    return seasons.opened.length ? `${range}; ${seasons.opened.join(', ')} opened, no data yet` : range;
  });

  /** The co-op's figures in the order Home shows them, one card each. */
  protected readonly figures = computed<Figure[]>(() => {
    const s = this.data();
    if (!s) return [];
    return [
      { icon: 'agriculture', value: s.farms, label: 'farms' },
      { icon: 'groups', value: s.members, label: 'members with an account' },
      { icon: 'inventory_2', value: s.items.outputs + s.items.inputs, label: `items: ${s.items.outputs} outputs, ${s.items.inputs} inputs` },
      { icon: 'calendar_month', value: s.seasons.count, label: `seasons of data: ${this.seasonsRange()}` },
      { icon: 'price_change', value: s.priceObservations, label: 'price observations' },
      { icon: 'table_rows', value: s.farmRecords, label: 'farm records' },
    ];
  });

  /** The server words the next steps for the signed-in role (server/summary/summary-service.ts). */
  protected readonly todos = computed<TodoItem[]>(() => this.data()?.nextSteps ?? []);
  protected readonly demo = computed(() => this.data()?.demo ?? null);

  constructor() {
    // While the demo co-op is being prepared, look again every few seconds until it is done.
    effect((onCleanup) => {
      if (this.demo()?.status !== 'preparing') return;
      const timer = setTimeout(() => this.summary.reload(), 3000);
      onCleanup(() => clearTimeout(timer));
    });
  }
}
