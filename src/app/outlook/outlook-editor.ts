import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, linkedSignal, signal, untracked } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatExpansionPanel, MatExpansionPanelHeader, MatExpansionPanelTitle } from '@angular/material/expansion';
import { MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { JobProgress } from '../shared/job-progress';
import { MatRadioButton, MatRadioGroup } from '@angular/material/radio';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { RouterLink } from '@angular/router';
import type { Item, Season } from '../../../shared/api-types';
import { TEXT_MAX } from '../../../shared/field-limits';
import { ACCESS } from '../core/access';
import { errorMessage, errorStatus } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { ContractedSection } from '../contracts/contracted-section';
import { SeasonStatus } from '../core/season-status';
import { SettingsStore } from '../core/settings-store';
import { calendarWords, DEFAULT_SEASON_CALENDAR } from '../../../shared/season-calendar';
import { ExpectationDialog, type ExpectationDialogData } from './expectation-dialog';
import { ExpectationsTable, type MissingExpectation } from './expectations-table';
import { FuturesQuotes } from './futures-quotes';
import { OutlookApi } from './outlook-api';
import { OutlookCautions } from './outlook-cautions';
import { formatDateTime, formatPriceIn } from './outlook-format';
import { PROJECTION_WORDS } from './outlook-list';
import { finishedRuns, type ModelListRow, type OutlookDraft, type OutlookPatch, type ProjectionAnswer, type ProjectionState, type RunChoiceAnswer, type ScenarioRule } from './outlook-api-types';
import { ProjectionReport } from './projection-report';
import { PublishDialog, type PublishChoice, type PublishDialogData } from './publish-dialog';
import { LoadProblem } from '../shared/load-problem';

/** How often a queued or running projection is asked for its progress. */
export const PROJECTION_POLL_MS = 1000;

const ACTIVE = new Set(['queued', 'running']);

/**
 * `/outlook/:id`: the draft of a season's outlook. The planner sets an expected price per item,
 * chooses the run and scenario rule, projects the season (a background job with progress), writes
 * the commentary and publishes a version. Treasurers and admins read it.
 */
@Component({
  selector: 'np-outlook-editor',
  imports: [
    ContractedSection,
    FormsModule,
    RouterLink,
    MatAnchor,
    MatButton,
    MatIcon,
    MatFormField,
    MatLabel,
    MatHint,
    MatInput,
    MatSelect,
    MatOption,
    MatRadioGroup,
    MatRadioButton,
    MatProgressBar,
    JobProgress,
    MatExpansionPanel,
    MatExpansionPanelHeader,
    MatExpansionPanelTitle,
    ExpectationsTable,
    FuturesQuotes,
    ProjectionReport,
    OutlookCautions,
    LoadProblem,
  ],
  templateUrl: './outlook-editor.html',
  styleUrl: './outlook-editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class OutlookEditor {
  // services
  readonly #api = inject(OutlookApi);
  readonly #auth = inject(AuthStore);
  readonly #dialog = inject(MatDialog);
  readonly #snackBar = inject(MatSnackBar);
  readonly #settings = inject(SettingsStore);
  readonly #seasonStatus = inject(SeasonStatus);

  // inputs
  /** Route parameter. */
  readonly id = input.required<string>();
  /** Whoever reads full outlooks may evaluate the season's contracts (a computation, not a change). */
  protected readonly canEvaluate = computed(() => this.#auth.hasRole(ACCESS.contracts));

  protected readonly draft = httpResource<OutlookDraft>(() => `/api/outlooks/${encodeURIComponent(this.id())}`);
  protected readonly projection = httpResource<ProjectionAnswer>(() => `/api/outlooks/${encodeURIComponent(this.id())}/projection`);
  protected readonly models = httpResource<ModelListRow[]>(() => '/api/models');
  /** Every finished run's back-test in words and the run it favours. */
  protected readonly choice = httpResource<RunChoiceAnswer>(() => '/api/outlooks/run-choice');
  protected readonly items = httpResource<Item[]>(() => '/api/items');
  protected readonly seasons = httpResource<Season[]>(() => '/api/seasons');

  protected readonly textMax = TEXT_MAX;
  protected readonly d = computed(() => (this.draft.hasValue() ? this.draft.value() : null));
  /** The season's months in the co-op's calendar, as the budget books them. */
  protected readonly calendarLine = computed(() => {
    const d = this.d();
    return d ? calendarWords(this.#settings.settings()?.seasonCalendar ?? DEFAULT_SEASON_CALENDAR, d.seasonStartYear) : '';
  });
  protected readonly notFound = computed(() => errorStatus(this.draft.error()) === 404);
  protected readonly problem = computed(() => (this.draft.error() && !this.notFound() ? errorMessage(this.draft.error()) : null));
  protected readonly canWrite = computed(() => this.#auth.hasRole(ACCESS.outlookWrite));
  protected readonly canReadLog = computed(() => this.#auth.hasRole(ACCESS.outlookLog));
  protected readonly currency = computed(() => this.#settings.settings()?.currency ?? 'EUR');

  protected readonly runs = computed(() => finishedRuns(this.models.hasValue() ? this.models.value() : []));
  protected readonly run = computed(() => this.runs().find((r) => r.id === this.d()?.modelRunId) ?? null);
  protected readonly favoured = computed(() => (this.choice.hasValue() ? this.choice.value().favoured : null));
  /** The items of the draft's model (as codes); the expected prices must cover them all. */
  protected readonly modelItems = computed<Item[]>(() => {
    const all = this.items.hasValue() ? this.items.value() : [];
    const codes = this.run()?.items ?? this.d()?.expectations.map((e) => e.item) ?? [];
    return codes.map((c) => all.find((i) => i.code === c)).filter((i): i is Item => !!i);
  });
  protected readonly missing = computed<MissingExpectation[]>(() => {
    const have = new Set(this.d()?.expectations.map((e) => e.item) ?? []);
    return this.modelItems()
      .filter((i) => !have.has(i.code))
      .map((i) => ({ code: i.code, name: i.name, priceUnit: `${this.currency()}/${i.unit}` }));
  });

  /** The projection's state: the draft's, then what polling learns while the job waits or runs. */
  protected readonly state = linkedSignal<ProjectionState | null>(() => this.d()?.projection ?? null);
  protected readonly active = computed(() => ACTIVE.has(this.state()?.status ?? 'none'));
  protected readonly percent = computed(() => Math.round((this.state()?.progress ?? 0) * 100));
  protected readonly result = computed(() => (this.projection.hasValue() ? this.projection.value().result : null));
  /** The draft's cautions and those the projection adds (e.g. many draws breaking convexity), as a version will carry them. */
  protected readonly cautions = computed(() => [...(this.d()?.cautions ?? []), ...(this.result()?.cautions ?? [])]);
  protected readonly pollProblem = signal<string | null>(null);
  protected readonly words = PROJECTION_WORDS;
  protected readonly formatDateTime = formatDateTime;

  protected readonly busy = signal<string | null>(null);
  protected readonly commentary = linkedSignal(() => this.d()?.commentary ?? '');
  protected readonly commentaryChanged = computed(() => this.commentary() !== (this.d()?.commentary ?? ''));
  protected readonly draws = linkedSignal(() => this.d()?.draws ?? 2000);
  protected readonly seed = linkedSignal(() => this.d()?.seed ?? 1);
  protected readonly title = linkedSignal(() => this.d()?.title ?? '');
  protected readonly nextVersion = computed(() => (this.d()?.versions.reduce((m, v) => Math.max(m, v.version), 0) ?? 0) + 1);
  protected readonly canPublish = computed(() => this.state()?.status === 'succeeded' && !!this.state()?.upToDate && !this.busy());

  constructor() {
    const timer = setInterval(() => void this.#poll(), PROJECTION_POLL_MS);
    inject(DestroyRef).onDestroy(() => clearInterval(timer));
  }

  async #poll(): Promise<void> {
    const s = untracked(this.state);
    const d = untracked(this.d);
    if (!d || !s || !ACTIVE.has(s.status) || this.#polling) return;
    this.#polling = true;
    try {
      const next = await this.#api.projectionState(d.id);
      this.state.set(next);
      this.pollProblem.set(null);
      if (!ACTIVE.has(next.status)) {
        if (next.status === 'succeeded') this.#snackBar.open('The projection has finished.', 'OK');
        else if (next.status === 'failed') this.#snackBar.open(`The projection failed: ${next.error ?? 'no reason given'}`, 'Dismiss');
        this.projection.reload();
        this.draft.reload();
      }
    } catch {
      this.pollProblem.set('The progress could not be read just now; trying again.');
    } finally {
      this.#polling = false;
    }
  }
  #polling = false;

  protected openExpectation(code: string): void {
    const d = this.d();
    if (!d) return;
    const item = this.modelItems().find((i) => i.code === code);
    const e = d.expectations.find((x) => x.item === code);
    const data: ExpectationDialogData = {
      outlookId: d.id,
      season: d.season,
      item: { code, name: e?.name ?? item?.name ?? code, priceUnit: e?.priceUnit ?? `${this.currency()}/${item?.unit ?? ''}` },
      settings: d.expectationSettings,
      canEdit: this.canWrite(),
    };
    this.#dialog
      .open<ExpectationDialog, ExpectationDialogData, OutlookDraft>(ExpectationDialog, { data, width: '960px', maxWidth: '96vw', autoFocus: 'dialog' })
      .afterClosed()
      .subscribe((saved) => {
        if (!saved) return;
        this.draft.set(saved);
        const x = saved.expectations.find((i) => i.item === code);
        this.#snackBar.open(x ? `${x.name}: ${x.methodLabel}, base ${formatPriceIn(x.base, x.priceUnit)}.` : 'Expected prices saved.', 'OK');
      });
  }

  protected async patch(change: OutlookPatch, done: string): Promise<void> {
    const d = this.d();
    if (!d) return;
    this.busy.set('saving');
    try {
      this.draft.set(await this.#api.update(d.id, change));
      this.#snackBar.open(done, 'OK');
    } catch (error) {
      this.#snackBar.open(errorMessage(error), 'Dismiss');
      this.draft.reload();
    } finally {
      this.busy.set(null);
    }
  }

  protected setRun(modelRunId: number): void {
    void this.patch({ modelRunId }, `The outlook now uses model run #${modelRunId}. Project it again.`);
  }

  protected setRule(scenarioRule: ScenarioRule): void {
    void this.patch({ scenarioRule }, scenarioRule === 'margin' ? 'Scenarios: margin squeeze and relief.' : 'Scenarios: every price low or high together.');
  }

  protected saveSimulation(): void {
    void this.patch({ draws: Number(this.draws()), seed: Number(this.seed()) }, `Simulation: ${this.draws()} draws, seed ${this.seed()}.`);
  }

  protected saveTitle(): void {
    void this.patch({ title: this.title().trim() }, 'Title saved.');
  }

  protected saveCommentary(): void {
    void this.patch({ commentary: this.commentary() }, 'Commentary saved.');
  }

  protected async project(): Promise<void> {
    const d = this.d();
    if (!d) return;
    this.busy.set('projecting');
    try {
      await this.#api.startProjection(d.id);
      this.state.set({ status: 'queued', progress: 0, stage: 'Waiting for a worker', error: null, projectedAt: this.state()?.projectedAt ?? null, upToDate: false });
    } catch (error) {
      this.#snackBar.open(errorMessage(error), 'Dismiss');
    } finally {
      this.busy.set(null);
    }
  }

  protected publish(): void {
    const d = this.d();
    if (!d) return;
    const data: PublishDialogData = { season: d.season, version: this.nextVersion(), hasCommentary: this.commentary().trim().length > 0, weakItems: d.skill?.weakItems ?? [] };
    this.#dialog
      .open<PublishDialog, PublishDialogData, PublishChoice>(PublishDialog, { data })
      .afterClosed()
      .subscribe(async (choice) => {
        if (!choice) return;
        this.busy.set('publishing');
        try {
          const done = await this.#api.publish(d.id, { commentary: this.commentary(), notifyMembers: choice.notifyMembers, acceptWeakSkill: choice.acceptWeakSkill });
          const mails = choice.notifyMembers ? ` ${done.mails.queued} e-mails queued, ${done.mails.skipped} members skipped.` : ' No e-mails sent.';
          this.#snackBar.open(`Version ${done.version} of ${done.season} is published.${mails}`, 'OK');
          this.draft.reload();
          // The frame's header says "published" at once, not after the next navigation.
          this.#seasonStatus.refresh();
        } catch (error) {
          this.#snackBar.open(errorMessage(error), 'Dismiss');
        } finally {
          this.busy.set(null);
        }
      });
  }
}
