import { DecimalPipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatCard, MatCardContent } from '@angular/material/card';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { CoopSummary } from '../../../shared/api-types';
import { ROLE_LABELS } from '../../../shared/roles';
import { ACCESS, roleAllows } from '../core/access';
import { errorMessage } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { CautionNote } from '../shared/caution-note';

/** One thing the person could do now, worded for their role. */
export interface TodoItem {
  icon: string;
  text: string;
  link?: { path: string; label: string };
}

@Component({
  selector: 'np-coop-overview',
  imports: [DecimalPipe, RouterLink, MatCard, MatCardContent, MatIcon, MatButton, MatProgressBar, CautionNote],
  templateUrl: './coop-overview.html',
  styleUrl: './coop-overview.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CoopOverview {
  readonly #auth = inject(AuthStore);

  protected readonly summary = httpResource<CoopSummary>(() => '/api/summary');
  protected readonly data = computed(() => (this.summary.hasValue() ? this.summary.value() : null));
  protected readonly problem = computed(() => (this.summary.error() ? errorMessage(this.summary.error()) : null));
  protected readonly roleLabel = computed(() => {
    const role = this.#auth.role();
    return role ? ROLE_LABELS[role] : '';
  });
  protected readonly firstName = computed(() => this.#auth.user()?.name.split(/\s+/)[0] ?? '');
  protected readonly canOpenFarms = computed(() => roleAllows(this.#auth.role(), ACCESS.farms));

  protected readonly seasonsRange = computed(() => {
    const seasons = this.data()?.seasons;
    if (!seasons || seasons.count === 0 || !seasons.first) return seasons?.opened.length ? `none with data yet (${seasons.opened.join(', ')} opened)` : 'none yet';
    const range = seasons.first === seasons.last ? seasons.first : `${seasons.first} – ${seasons.last}`;
    return seasons.opened.length ? `${range}; ${seasons.opened.join(', ')} opened, no data yet` : range;
  });

  protected readonly todos = computed<TodoItem[]>(() => {
    const s = this.data();
    const role = this.#auth.role();
    if (!s || !role) return [];
    const todos: TodoItem[] = [];
    const farmsLink = this.canOpenFarms() ? { path: '/farms', label: 'Open farms' } : undefined;
    if (role === 'admin' && s.members === 0) {
      todos.push({
        icon: 'person_add',
        text: 'No member has an account yet. Invite the members so they can read their own figures.',
        link: { path: '/admin/users', label: 'Invite people' },
      });
    }
    if (s.farms === 0) {
      todos.push({ icon: 'agriculture', text: 'No farms are registered yet; models need farms with records.' });
    }
    if (s.priceObservations === 0) {
      todos.push({
        icon: 'price_change',
        text: 'No price history is stored yet. Every output and input needs prices before a model can be fitted.',
      });
    }
    for (const gap of s.recordGaps.slice(0, 5)) {
      const farms = gap.farmsMissing === 1 ? '1 farm has' : `${gap.farmsMissing} farms have`;
      todos.push({
        icon: 'event_busy',
        text:
          role === 'planner'
            ? `Season ${gap.season}: ${farms} no records. Fill the gap or leave those farms out of the model sample.`
            : `Season ${gap.season}: ${farms} no records yet.`,
        link: farmsLink,
      });
    }
    if (s.recordGaps.length > 5) {
      todos.push({ icon: 'more_horiz', text: `${s.recordGaps.length - 5} earlier seasons also have gaps.`, link: farmsLink });
    }
    return todos;
  });
}
