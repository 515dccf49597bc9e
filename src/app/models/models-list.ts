import { DatePipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { Router, RouterLink } from '@angular/router';
import type { FarmSummary, Item, Season } from '../../../shared/api-types';
import { ACCESS } from '../core/access';
import { errorMessage } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { CautionNote } from '../shared/caution-note';
import { ModelForm, type ModelSaved } from './model-form';
import { ItemLabels, STATE_LABELS, definitionLine } from './model-format';
import { type ModelSummary } from './models-api-types';
import { ModelsApi } from './models-api';
import { RunStateBadge } from './run-state-badge';
import { LoadProblem } from '../shared/load-problem';

/** `/models`: the co-op's model definitions with their latest run, and the form to define one. */
@Component({
  selector: 'np-models-list',
  imports: [
    DatePipe,
    RouterLink,
    MatAnchor,
    MatButton,
    MatIcon,
    MatProgressBar,
    MatTableModule,
    CautionNote,
    ModelForm,
    RunStateBadge,
    LoadProblem,
  ],
  templateUrl: './models-list.html',
  styleUrl: './models-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ModelsList {
  // services
  readonly #api = inject(ModelsApi);
  readonly #router = inject(Router);
  readonly #snackBar = inject(MatSnackBar);
  readonly #auth = inject(AuthStore);

  protected readonly models = httpResource<ModelSummary[]>(() => '/api/models');
  protected readonly items = httpResource<Item[]>(() => '/api/items');
  protected readonly canWrite = computed(() => this.#auth.hasRole(ACCESS.modelsWrite));
  protected readonly defining = signal(false);
  // Only the form needs these; they load when it opens.
  protected readonly seasons = httpResource<Season[]>(() => (this.defining() ? '/api/seasons' : undefined));
  protected readonly farms = httpResource<FarmSummary[]>(() => (this.defining() ? '/api/farms' : undefined));
  readonly #factorNames = httpResource<{ factor: string; farms: number; seasons: number }[]>(() => (this.defining() ? '/api/records/factor-names' : undefined));
  /** Fixed factors recorded besides land, for the form to offer. */
  protected readonly otherFactors = computed(() => (this.#factorNames.hasValue() ? this.#factorNames.value().filter((f) => f.factor !== 'land_ha') : []));
  protected readonly stateLabels = STATE_LABELS;
  protected readonly columns = ['name', 'definition', 'latest', 'runs', 'created'];

  readonly #labels = computed(() => new ItemLabels(this.items.hasValue() ? this.items.value() : []));
  protected readonly rows = computed(() =>
    (this.models.hasValue() ? this.models.value() : []).map((m) => ({
      ...m,
      line: definitionLine(m.definition, this.#labels()),
      latest: m.runs[0] ?? null,
    })),
  );
  protected readonly formReady = computed(() => this.items.hasValue() && this.seasons.hasValue() && this.farms.hasValue());
  protected readonly problem = computed(() => {
    const error = this.models.error() ?? this.items.error() ?? this.seasons.error() ?? this.farms.error();
    return error ? errorMessage(error) : null;
  });

  protected async modelSaved({ model, run }: ModelSaved): Promise<void> {
    this.defining.set(false);
    this.models.reload();
    if (!run) {
      this.#snackBar.open(`Model "${model.name}" saved.`);
      await this.#router.navigate(['/models', model.id]);
      return;
    }
    try {
      await this.#api.startRun(model.id);
      this.#snackBar.open(`Model "${model.name}" saved; its fit is running.`);
    } catch (error) {
      this.#snackBar.open(`Model "${model.name}" saved, but the run could not start: ${errorMessage(error)}`);
    }
    await this.#router.navigate(['/models', model.id]);
  }
}
