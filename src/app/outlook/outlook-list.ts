import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import type { Season } from '../../../shared/api-types';
import { ACCESS } from '../core/access';
import { errorMessage } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { NewOutlookDialog, type NewOutlookDialogData } from './new-outlook-dialog';
import { OutlookCautions } from './outlook-cautions';
import { formatDateTime, suggestedOutlookSeason } from './outlook-format';
import { finishedRuns, type ModelListRow, type OutlookDraft, type OutlookListRow, type ProjectionStatus, type RunChoiceAnswer } from './outlook-api-types';
import { LoadProblem } from '../shared/load-problem';
import { StatusPill, type PillTone } from '../shared/status-pill';

export const PROJECTION_WORDS: Record<ProjectionStatus, string> = {
  none: 'not projected',
  queued: 'waiting for a worker',
  running: 'projecting',
  succeeded: 'projected',
  failed: 'projection failed',
};

/** The colour of each projection state's pill on the list. */
const PROJECTION_TONES: Record<ProjectionStatus, PillTone> = {
  none: 'neutral',
  queued: 'pending',
  running: 'pending',
  succeeded: 'success',
  failed: 'error',
};

/** `/outlook`: every season's outlook, its projection state and published versions; planners open new ones. */
@Component({
  selector: 'np-outlook-list',
  imports: [RouterLink, MatAnchor, MatButton, MatIcon, MatProgressBar, OutlookCautions, LoadProblem, StatusPill],
  templateUrl: './outlook-list.html',
  styleUrl: './outlook-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class OutlookList {
  // services
  readonly #auth = inject(AuthStore);
  readonly #dialog = inject(MatDialog);
  readonly #router = inject(Router);

  protected readonly outlooks = httpResource<OutlookListRow[]>(() => '/api/outlooks');
  protected readonly rows = computed(() => (this.outlooks.hasValue() ? this.outlooks.value() : []));
  protected readonly problem = computed(() => (this.outlooks.error() ? errorMessage(this.outlooks.error()) : null));
  protected readonly canWrite = computed(() => this.#auth.hasRole(ACCESS.outlookWrite));
  protected readonly canReadLog = computed(() => this.#auth.hasRole(ACCESS.outlookLog));
  readonly #models = httpResource<ModelListRow[]>(() => (this.canWrite() ? '/api/models' : undefined));
  readonly #seasons = httpResource<Season[]>(() => (this.canWrite() ? '/api/seasons' : undefined));
  readonly #choice = httpResource<RunChoiceAnswer>(() => (this.canWrite() ? '/api/outlooks/run-choice' : undefined));
  protected readonly words = PROJECTION_WORDS;
  protected readonly tones = PROJECTION_TONES;
  protected readonly formatDateTime = formatDateTime;

  protected openNew(): void {
    const seasons = this.#seasons.hasValue() ? this.#seasons.value() : [];
    const data: NewOutlookDialogData = {
      season: suggestedOutlookSeason(seasons, this.rows().map((r) => r.season)),
      runs: finishedRuns(this.#models.hasValue() ? this.#models.value() : []),
      taken: this.rows().map((r) => r.season),
      favoured: this.#choice.hasValue() ? this.#choice.value().favoured : null,
    };
    this.#dialog
      .open<NewOutlookDialog, NewOutlookDialogData, OutlookDraft>(NewOutlookDialog, { data, autoFocus: 'first-tabbable' })
      .afterClosed()
      .subscribe((created) => {
        if (created) void this.#router.navigate(['/outlook', created.id]);
      });
  }
}
