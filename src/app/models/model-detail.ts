import { DatePipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router, RouterLink } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import type { Item } from '../../../shared/api-types';
import { SPEC_WORDS, specOf } from '../../../shared/model-schemas';
import { ACCESS } from '../core/access';
import { errorMessage, errorStatus } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { CautionNote } from '../shared/caution-note';
import { ConfirmDialog, type ConfirmDialogData } from '../shared/confirm-dialog';
import { CURVATURE_LABELS, FORM_LABELS, ItemLabels, sampleSeasons, shortHash } from './model-format';
import { ACTIVE_STATES, type ModelSummary, type RunStatus } from './models-api-types';
import { ModelsApi } from './models-api';
import { pollRunStatuses } from './run-status-poller';
import { RunStateBadge } from './run-state-badge';
import { JobProgress } from '../shared/job-progress';
import { LoadProblem } from '../shared/load-problem';

/** `/models/:id`: one model's definition and its runs, with progress, cancel and run-again. */
@Component({
  selector: 'np-model-detail',
  imports: [DatePipe, RouterLink, MatAnchor, MatButton, MatIcon, MatProgressBar, JobProgress, CautionNote, RunStateBadge, LoadProblem],
  templateUrl: './model-detail.html',
  styleUrl: './model-detail.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ModelDetail {
  // services
  readonly #api = inject(ModelsApi);
  readonly #auth = inject(AuthStore);
  readonly #dialog = inject(MatDialog);
  readonly #router = inject(Router);
  readonly #snackBar = inject(MatSnackBar);

  // inputs
  /** Route parameter. */
  readonly id = input.required<string>();

  protected readonly model = httpResource<ModelSummary>(() => `/api/models/${encodeURIComponent(this.id())}`);
  protected readonly items = httpResource<Item[]>(() => '/api/items');
  protected readonly labels = computed(() => new ItemLabels(this.items.hasValue() ? this.items.value() : []));
  protected readonly canWrite = computed(() => this.#auth.hasRole(ACCESS.modelsWrite));
  protected readonly formLabels = FORM_LABELS;
  protected readonly specWords = SPEC_WORDS;
  protected readonly specOf = specOf;
  protected readonly curvatureLabels = CURVATURE_LABELS;
  protected readonly sampleSeasons = sampleSeasons;
  protected readonly shortHash = shortHash;
  protected readonly busy = signal<string | null>(null);

  readonly #runs = computed<RunStatus[]>(() => (this.model.hasValue() ? this.model.value().runs : []));
  readonly #poll = pollRunStatuses(this.#runs, (settled) => {
    this.model.reload();
    if (settled.status === 'succeeded') this.#snackBar.open(`Run #${settled.id} finished.`);
    else if (settled.status === 'failed') this.#snackBar.open(`Run #${settled.id} failed: ${settled.error ?? 'no reason given'}`);
  });
  protected readonly pollProblem = this.#poll.problem;
  /** Each run with its latest known status (polled while it waits or runs). */
  protected readonly runs = computed(() => {
    const live = this.#poll.live();
    return this.#runs().map((r) => {
      const s = live.get(r.id);
      const current = s && (ACTIVE_STATES.includes(r.status) || s.status === r.status) ? s : r;
      return { ...current, active: ACTIVE_STATES.includes(current.status), percent: Math.round(current.progress * 100) };
    });
  });
  protected readonly succeededRuns = computed(() => this.runs().filter((r) => r.status === 'succeeded'));

  protected readonly definition = computed(() => (this.model.hasValue() ? this.model.value().definition : null));
  protected readonly outputs = computed(() => {
    const def = this.definition();
    const items = this.items.hasValue() ? this.items.value() : [];
    return def ? def.items.filter((c) => items.find((i) => i.code === c)?.role === 'output') : [];
  });
  protected readonly inputs = computed(() => {
    const def = this.definition();
    return def ? def.items.filter((c) => !this.outputs().includes(c)) : [];
  });
  protected readonly problem = computed(() => {
    const error = this.model.error();
    if (!error) return null;
    return errorStatus(error) === 404 ? 'There is no such model; it may have been deleted.' : errorMessage(error);
  });

  protected names(codes: string[]): string {
    return codes.map((c) => this.labels().name(c)).join(', ') || 'none';
  }

  protected duration(run: RunStatus): string {
    if (!run.startedAt || !run.finishedAt) return '';
    const s = (Date.parse(run.finishedAt) - Date.parse(run.startedAt)) / 1000;
    return s < 60 ? `${s.toFixed(1)} s` : `${Math.floor(s / 60)} min ${Math.round(s % 60)} s`;
  }

  protected async runNow(): Promise<void> {
    const model = this.model.value();
    if (!model) return;
    await this.#act('run', async () => {
      const run = await this.#api.startRun(model.id);
      this.#snackBar.open(`Run #${run.id} is queued; it fits in the background.`);
    });
  }

  protected async cancel(run: RunStatus): Promise<void> {
    await this.#act(`cancel-${run.id}`, async () => {
      const after = await this.#api.cancel(run.id);
      this.#snackBar.open(after.status === 'cancelled' ? `Run #${run.id} is cancelled.` : `Run #${run.id} is being stopped.`);
    });
  }

  protected async rerun(run: RunStatus): Promise<void> {
    await this.#act(`rerun-${run.id}`, async () => {
      const again = await this.#api.rerun(run.id);
      this.#snackBar.open(`Run #${again.id} repeats run #${run.id} on the same data snapshot.`);
    });
  }

  protected async deleteModel(): Promise<void> {
    const model = this.model.value();
    if (!model) return;
    const data: ConfirmDialogData = {
      title: `Delete "${model.name}"?`,
      message: `The definition and its ${model.runs.length} stored run(s) are deleted for good, and draft outlooks lose the link to them. A model whose run a published outlook rests on cannot be deleted.`,
      confirmLabel: 'Delete model',
      destructive: true,
    };
    const confirmed = await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed());
    if (!confirmed) return;
    await this.#act('delete', async () => {
      await this.#api.remove(model.id);
      this.#snackBar.open(`Model "${model.name}" deleted.`);
      await this.#router.navigate(['/models']);
    });
  }

  async #act(what: string, body: () => Promise<void>): Promise<void> {
    this.busy.set(what);
    try {
      await body();
      this.model.reload();
    } catch (error) {
      this.#snackBar.open(errorMessage(error));
      this.model.reload();
    } finally {
      this.busy.set(null);
    }
  }
}
