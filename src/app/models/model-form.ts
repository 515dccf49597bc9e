import { ChangeDetectionStrategy, Component, computed, effect, inject, input, output, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatRadioButton, MatRadioGroup } from '@angular/material/radio';
import { MatOption, MatSelect } from '@angular/material/select';
import type { FarmSummary, Item, Season } from '../../../shared/api-types';
import { TEXT_MAX } from '../../../shared/field-limits';
import { FORECAST_SPECS, MAX_BACKTEST_SEASONS, modelDefinitionSchema, SPEC_WORDS, type ForecastSpecName, type ModelDefinition } from '../../../shared/model-schemas';
import { ApiRequestError, errorMessage } from '../core/api-error';
import { applyServerDetails } from '../shared/zod-validator';
import { CURVATURE_LABELS } from './model-format';
import type { ModelSummary } from './models-api-types';
import { ModelsApi } from './models-api';
import { FieldError } from '../shared/field-error';

export interface ModelSaved {
  model: ModelSummary;
  /** The planner chose "Save and run". */
  run: boolean;
}

/** The planner's definition of a model: items, numeraire, fixed factors, trend, sample and form. */
@Component({
  selector: 'np-model-form',
  imports: [
    ReactiveFormsModule,
    MatButton,
    MatCheckbox,
    MatFormField,
    MatLabel,
    MatHint,
    MatError,
    FieldError,
    MatInput,
    MatSelect,
    MatOption,
    MatRadioGroup,
    MatRadioButton,
  ],
  templateUrl: './model-form.html',
  styleUrl: './model-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ModelForm {
  // services
  readonly #api = inject(ModelsApi);

  // inputs
  readonly items = input.required<readonly Item[]>();
  readonly seasons = input.required<readonly Season[]>();
  readonly farms = input.required<readonly FarmSummary[]>();
  /** Fixed factors recorded besides land (GET /api/records/factor-names), offered as more fixed factors. */
  readonly factorNames = input<readonly { factor: string; farms: number; seasons: number }[]>([]);

  readonly saved = output<ModelSaved>();
  readonly cancelled = output<void>();

  protected readonly curvatureLabels = CURVATURE_LABELS;
  protected readonly curvatureChoices = Object.keys(CURVATURE_LABELS) as ModelDefinition['curvature'][];
  protected readonly specWords = SPEC_WORDS;
  protected readonly specChoices = FORECAST_SPECS;

  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', [Validators.required, Validators.maxLength(TEXT_MAX.name)]],
    items: [[] as string[]],
    numeraire: [''],
    land: [true],
    otherFactors: [[] as string[]],
    trend: [true],
    form: ['nq' as ModelDefinition['form']],
    curvature: ['auto' as ModelDefinition['curvature']],
    /** '' stands for "the first (last) season with data", which the API spells null. */
    fromSeason: [''],
    toSeason: [''],
    allFarms: [true],
    farms: [[] as string[]],
    backtestSeasons: [5, [Validators.required, Validators.min(0), Validators.max(MAX_BACKTEST_SEASONS)]],
    /** Per hectare by default; pooled when the planner chooses it or land is left out. */
    spec: ['per-hectare' as ForecastSpecName],
  });

  readonly #value = toSignal(this.form.valueChanges, { initialValue: this.form.getRawValue() });
  protected readonly chosen = computed(() => this.#value().items ?? []);
  protected readonly outputs = computed(() => this.items().filter((i) => i.role === 'output'));
  protected readonly inputs = computed(() => this.items().filter((i) => i.role === 'input'));
  protected readonly numeraireChoices = computed(() => this.items().filter((i) => this.chosen().includes(i.code)));
  protected readonly allFarms = computed(() => this.#value().allFarms ?? true);
  protected readonly landChosen = computed(() => this.#value().land ?? true);
  protected readonly saving = signal<'run' | 'save' | null>(null);
  protected readonly failure = signal<string | null>(null);
  /** The items control has no form field of its own; its message shows under the checkboxes. */
  protected readonly itemsProblem = signal<string | null>(null);

  constructor() {
    // Start with every item chosen and hired labour (or the last input) as numeraire.
    let started = false;
    effect(() => {
      const items = this.items();
      if (started || items.length === 0) return;
      started = true;
      this.form.controls.items.setValue(items.map((i) => i.code));
      this.#keepNumeraire();
    });
    // Without land there is no per-hectare model: fall back to pooled, and back when land returns.
    this.form.controls.land.valueChanges.subscribe((land) => this.form.controls.spec.setValue(land ? 'per-hectare' : 'pooled'));
  }

  protected isFactorChosen(name: string): boolean {
    return (this.#value().otherFactors ?? []).includes(name);
  }

  protected toggleFactor(name: string, on: boolean): void {
    const order = this.factorNames().map((f) => f.factor);
    const next = new Set(this.form.controls.otherFactors.value);
    if (on) next.add(name);
    else next.delete(name);
    this.form.controls.otherFactors.setValue(order.filter((f) => next.has(f)));
  }

  protected isChosen(code: string): boolean {
    return this.chosen().includes(code);
  }

  protected toggleItem(code: string, on: boolean): void {
    const order = this.items().map((i) => i.code);
    const next = new Set(this.chosen());
    if (on) next.add(code);
    else next.delete(code);
    this.form.controls.items.setValue(order.filter((c) => next.has(c)));
    this.itemsProblem.set(null);
    this.#keepNumeraire();
  }

  /** The numeraire must be one of the chosen items: keep the planner's choice while it is, else pick a sensible one. */
  #keepNumeraire(): void {
    const chosen = this.form.controls.items.value;
    const current = this.form.controls.numeraire.value;
    if (chosen.includes(current)) return;
    const inputs = this.items().filter((i) => i.role === 'input' && chosen.includes(i.code));
    const preferred = inputs.find((i) => i.category === 'labour') ?? inputs.at(-1);
    this.form.controls.numeraire.setValue(preferred?.code ?? chosen.at(-1) ?? '');
  }

  /** The definition as the API takes it, checked with the same schema the server uses. */
  #definition(): ModelDefinition | null {
    const v = this.form.getRawValue();
    if (!v.allFarms && v.farms.length === 0) {
      this.#showProblem('farms', 'Choose at least one farm, or take every farm');
      return null;
    }
    const parsed = modelDefinitionSchema.safeParse({
      items: v.items,
      numeraire: v.numeraire,
      fixedFactors: [...(v.land ? ['land_ha'] : []), ...v.otherFactors],
      trend: v.trend,
      form: v.form,
      curvature: v.curvature,
      fromSeason: v.fromSeason || null,
      toSeason: v.toSeason || null,
      farms: v.allFarms ? null : v.farms,
      backtestSeasons: v.backtestSeasons,
      spec: v.spec,
    });
    if (parsed.success) return parsed.data;
    for (const issue of parsed.error.issues) this.#showProblem(String(issue.path[0] ?? ''), issue.message);
    return null;
  }

  #showProblem(field: string, message: string): void {
    if (field === 'items') {
      this.itemsProblem.set(message);
      return;
    }
    const control = this.#controlFor(field);
    if (control) {
      control.setErrors({ ...control.errors, server: message });
      control.markAsTouched();
    } else {
      this.failure.set(message);
    }
  }

  #controlFor(field: string) {
    const c = this.form.controls;
    const map: Record<string, (typeof c)[keyof typeof c]> = {
      name: c.name,
      numeraire: c.numeraire,
      fixedFactors: c.land,
      fromSeason: c.fromSeason,
      toSeason: c.toSeason,
      farms: c.farms,
      backtestSeasons: c.backtestSeasons,
      spec: c.spec,
    };
    return map[field] ?? null;
  }

  protected async save(run: boolean): Promise<void> {
    this.failure.set(null);
    this.itemsProblem.set(null);
    // Check the whole form at once, so every problem shows on the first try.
    const definition = this.#definition();
    if (this.form.invalid || !definition) {
      this.form.markAllAsTouched();
      return;
    }
    this.saving.set(run ? 'run' : 'save');
    try {
      const model = await this.#api.create(this.form.getRawValue().name.trim(), definition);
      this.saved.emit({ model, run });
    } catch (error) {
      const details = error instanceof ApiRequestError ? error.error.details : undefined;
      const controls: Record<string, (typeof this.form.controls)[keyof typeof this.form.controls]> = { name: this.form.controls.name };
      for (const key of ['numeraire', 'fixedFactors', 'fromSeason', 'toSeason', 'farms', 'backtestSeasons', 'spec']) {
        const control = this.#controlFor(key);
        if (control) controls[`definition.${key}`] = control;
      }
      const itemsDetail = details?.find((d) => /definition\.items$/.test(d.path));
      if (itemsDetail) this.itemsProblem.set(itemsDetail.message);
      if (!applyServerDetails(controls, details) && !itemsDetail) this.failure.set(errorMessage(error));
    } finally {
      this.saving.set(null);
    }
  }
}
