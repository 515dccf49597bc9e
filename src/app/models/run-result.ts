import { DatePipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router, RouterLink } from '@angular/router';
import type { Item } from '../../../shared/api-types';
import { skillSummary } from '../../../shared/skill-words';
import { ACCESS } from '../core/access';
import { errorMessage, errorStatus } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { SettingsStore } from '../core/settings-store';
import { CautionNote } from '../shared/caution-note';
import { BacktestSection } from './backtest-section';
import { CoefficientSheets } from './coefficient-sheets';
import { ElasticityTable, type MatrixItem } from './elasticity-table';
import { FitDiagnostics } from './fit-diagnostics';
import { FittedSection } from './fitted-section';
import { ItemLabels, shortHash } from './model-format';
import { ACTIVE_STATES, type ModelSummary, type RunDetail, type RunStatus } from './models-api-types';
import { ModelsApi } from './models-api';
import { PlainReadingPanel } from './plain-reading-panel';
import { ResidualSection } from './residual-section';
import { ResponseSection } from './response-section';
import { RunProvenance } from './run-provenance';
import { RunStateBadge } from './run-state-badge';
import { pollRunStatuses } from './run-status-poller';
import { LoadProblem } from '../shared/load-problem';
import { runBusy } from '../shared/run-busy';

/** `/models/runs/:runId`: one run's result, read for planners and explained for the board. */
@Component({
  selector: 'np-run-result',
  imports: [
    DatePipe,
    RouterLink,
    MatAnchor,
    MatButton,
    MatIcon,
    MatProgressBar,
    CautionNote,
    BacktestSection,
    CoefficientSheets,
    ElasticityTable,
    FitDiagnostics,
    FittedSection,
    PlainReadingPanel,
    ResidualSection,
    ResponseSection,
    RunProvenance,
    RunStateBadge,
    LoadProblem,
  ],
  templateUrl: './run-result.html',
  styleUrl: './run-result.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RunResult {
  // services
  readonly #api = inject(ModelsApi);
  readonly #auth = inject(AuthStore);
  readonly #router = inject(Router);
  readonly #snackBar = inject(MatSnackBar);
  readonly #settings = inject(SettingsStore);

  // inputs
  /** Route parameter. */
  readonly runId = input.required<string>();

  protected readonly run = httpResource<RunDetail>(() => `/api/model-runs/${encodeURIComponent(this.runId())}`);
  protected readonly model = httpResource<ModelSummary>(() => (this.run.hasValue() ? `/api/models/${this.run.value().modelId}` : undefined));
  /** The run this one repeats, to show that the numbers came out the same. */
  protected readonly original = httpResource<RunDetail>(() => {
    const r = this.run.hasValue() ? this.run.value() : null;
    return r?.rerunOf && r.status === 'succeeded' ? `/api/model-runs/${r.rerunOf}` : undefined;
  });
  protected readonly items = httpResource<Item[]>(() => '/api/items');

  protected readonly labels = computed(() => new ItemLabels(this.items.hasValue() ? this.items.value() : []));
  protected readonly currency = computed(() => this.#settings.settings()?.currency ?? 'EUR');
  protected readonly canWrite = computed(() => this.#auth.hasRole(ACCESS.modelsWrite));
  protected readonly busy = signal(false);
  protected readonly shortHash = shortHash;

  protected readonly detail = computed(() => (this.run.hasValue() ? this.run.value() : null));
  protected readonly result = computed(() => this.detail()?.result ?? null);
  protected readonly matrixItems = computed<MatrixItem[]>(() =>
    (this.result()?.summary.items ?? []).map((i) => ({ code: i.name, name: this.labels().name(i.name), role: i.role })),
  );
  /**
   * What the plain reading reads: for a per-hectare run the per-hectare model's elasticities (its
   * items in the same order as the farm-totals fit), otherwise the farm-totals fit's.
   */
  protected readonly readingElasticities = computed(() => {
    const r = this.result();
    if (!r) return null;
    const f = r.forecast?.fit;
    const sameOrder = !!f && f.layout.items.length === r.summary.items.length && f.layout.items.every((it, i) => it.name === r.summary.items[i]!.name);
    if (r.spec === 'per-hectare' && r.forecastElasticities && sameOrder)
      return { perHectare: true, elasticities: r.forecastElasticities.elasticities, standardErrors: r.forecastElasticities.standardErrors };
    return { perHectare: false, elasticities: r.summary.elasticities, standardErrors: r.summary.elasticityStandardErrors };
  });
  /** The forecasting model's back-test in plain words (skill and band coverage), when the run has one. */
  protected readonly skillText = computed(() => {
    const s = this.result()?.skill;
    return s && s.items.length ? skillSummary(s, (c) => this.labels().name(c)).text : '';
  });
  protected readonly sample = computed(() => {
    const r = this.result();
    if (!r || r.fittedBySeason.length === 0) return null;
    return { firstSeason: r.fittedBySeason[0]!.season, lastSeason: r.fittedBySeason.at(-1)!.season, observations: r.fit.observations };
  });
  protected readonly longRunItems = computed<MatrixItem[]>(() =>
    (this.result()?.longRun?.items ?? []).map((code) => ({
      code,
      name: this.labels().name(code),
      role: this.result()!.summary.items.find((i) => i.name === code)?.role ?? 'input',
    })),
  );

  /** The engine's reason without its "long run:" prefix. */
  /** The engine's reason, with the land factor's code (land_ha) in words. */
  protected readonly longRunReason = computed(() =>
    (this.result()?.longRunError ?? '').replace(/^long run:\s*/i, '').replace(/\bland_ha\b/g, 'land'),
  );

  readonly #watched = computed<RunStatus[]>(() => {
    const d = this.detail();
    return d && ACTIVE_STATES.includes(d.status) ? [d] : [];
  });
  readonly #poll = pollRunStatuses(this.#watched, () => this.run.reload());
  protected readonly live = computed(() => {
    const d = this.detail();
    return d ? (this.#poll.live().get(d.id) ?? d) : null;
  });

  protected readonly problem = computed(() => {
    const error = this.run.error();
    if (!error) return null;
    return errorStatus(error) === 404 ? 'There is no such run; its model may have been deleted.' : errorMessage(error);
  });

  /** The page's own table of contents (plain `#id` links would leave the app because of `<base href>`). */
  protected jump(id: string): void {
    document.getElementById(id)?.scrollIntoView({ behavior: 'smooth', block: 'start' });
  }

  protected async rerun(): Promise<void> {
    const d = this.detail();
    if (!d) return;
    await runBusy(
      this.busy,
      async () => {
        const again = await this.#api.rerun(d.id);
        this.#snackBar.open(`Run #${again.id} repeats run #${d.id} on the same data snapshot.`);
        await this.#router.navigate(['/models/runs', again.id]);
      },
      (error) => this.#snackBar.open(errorMessage(error)),
    );
  }

  protected async cancel(): Promise<void> {
    const d = this.detail();
    if (!d) return;
    await runBusy(
      this.busy,
      async () => {
        await this.#api.cancel(d.id);
        this.run.reload();
      },
      (error) => this.#snackBar.open(errorMessage(error)),
    );
  }
}
