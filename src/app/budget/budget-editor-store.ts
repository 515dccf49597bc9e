import { httpResource } from '@angular/common/http';
import { DestroyRef, Injectable, computed, effect, inject, linkedSignal, signal, untracked } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder } from '@angular/forms';
import { MatDialog } from '@angular/material/dialog';
import { MatSnackBar } from '@angular/material/snack-bar';
import { ActivatedRoute, Router } from '@angular/router';
import { EMPTY, Subject, catchError, debounceTime, firstValueFrom, map, merge, of, switchMap } from 'rxjs';
import type { UnitSystem } from '../../../shared/units';
import { ACCESS, roleAllows } from '../core/access';
import { ApiRequestError, errorMessage, errorStatus } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { SettingsStore } from '../core/settings-store';
import { DEFAULT_SEASON_CALENDAR } from '../../../shared/season-calendar';
import { ConfirmDialog, type ConfirmDialogData } from '../shared/confirm-dialog';
import { BudgetApi, exportUrl } from './budget-api';
import {
  buildBudgetForm,
  bookingProblems,
  convertFormUnits,
  defaultBooking,
  emptyPreserved,
  formValueFromStored,
  monthGroup,
  productGroup,
  productValuesFromList,
  resetArray,
  scenarioGroup,
  scenarioName,
  seasonStartYear,
  syncSourceValidators,
  toBudgetInput,
  whereOf,
  type BudgetFormValue,
  type Preserved,
  type ScenarioValue,
  type SourceValue,
} from './budget-form';
import { formatMonth, formatPct, formatPrice, formatTonnes } from './budget-format';
import type {
  BudgetPreview,
  BudgetResult,
  BudgetView,
  FertiliserProduct,
  ModelWithRuns,
  OutlookVersionRow,
  OutlookVersionScenarios,
  SourceKind,
} from './budget-api-types';
import { BudgetUnitsStore, pricePerTToShown, unitLabels } from './budget-units';
import { scenarioLabel } from '../outlook/outlook-api-types';
import { runBusy } from '../shared/run-busy';

/** The cautions every budget carries, shown before the first result arrives (the server sends its own with each result). */
const STANDING_CAUTIONS = [
  'A budget sizes the co-op’s fertiliser purchases; it is not an application recommendation for any field, farm or crop.',
  'Application rates follow soil tests, local agronomic guidance and nutrient-management rules, and a certified adviser has the last word.',
];

function blankValue(): BudgetFormValue {
  return {
    name: '',
    source: { kind: 'manual', outlookVersionId: null, outlookScenario: 'base', outlookPricing: 'outlook', sideBySide: true, runId: null, contractOutlookId: null, season: null, nitrogen: 0, phosphate: 0, potash: 0 },
    booking: defaultBooking(new Date().getFullYear() + 1),
    scenarios: [],
    products: [],
    lotRule: 'round-up',
  };
}

interface RunOption {
  id: number;
  label: string;
}

/**
 * The state of one budget page (`/budget/new`, `/budget/:id`), provided by the editor component and
 * shared by its sections: the five reads (saved budget, product list, outlook versions and the
 * chosen version's scenarios, models), the form and its loading, the unit conversion of typed
 * figures, the debounced server preview, and save, discard, delete and leave. Signals throughout;
 * the sections read and call it, the component only lays them out.
 */
@Injectable()
export class BudgetEditorStore {
  // services
  readonly #api = inject(BudgetApi);
  readonly #auth = inject(AuthStore);
  readonly #router = inject(Router);
  readonly #dialog = inject(MatDialog);
  readonly #snackBar = inject(MatSnackBar);
  readonly #fb = inject(NonNullableFormBuilder);
  readonly #destroyRef = inject(DestroyRef);
  readonly #settings = inject(SettingsStore);
  /** The co-op's season calendar: a new budget books in its season's input months. */
  readonly #calendar = () => untracked(() => this.#settings.settings()?.seasonCalendar) ?? DEFAULT_SEASON_CALENDAR;
  readonly units = inject(BudgetUnitsStore);

  /** The route's `:id`; absent on `/budget/new`. */
  readonly id = toSignal(inject(ActivatedRoute).paramMap.pipe(map((p) => p.get('id') ?? undefined)), { requireSync: true });

  readonly isNew = computed(() => this.id() === undefined);
  readonly budgetId = computed(() => {
    const v = Number(this.id());
    return Number.isInteger(v) && v > 0 ? v : null;
  });
  readonly canEdit = computed(() => roleAllows(this.#auth.role(), ACCESS.budgetEdit));
  readonly system = this.units.system;

  // reads
  readonly saved = httpResource<BudgetView>(() => {
    const id = this.budgetId();
    return id === null ? undefined : { url: `/api/budgets/${id}`, params: { units: this.system() } };
  });
  /** The saved budget, kept on screen while it is read again in other units. */
  readonly savedView = linkedSignal<BudgetView | null, BudgetView | null>({
    source: () => (this.saved.hasValue() ? this.saved.value() : null),
    computation: (now, previous) => now ?? previous?.value ?? null,
  });
  readonly productList = httpResource<FertiliserProduct[]>(() => (this.canEdit() ? '/api/fertiliser-products' : undefined));
  readonly versions = httpResource<OutlookVersionRow[]>(() => (this.canEdit() ? '/api/outlooks/versions' : undefined));
  readonly models = httpResource<ModelWithRuns[]>(() => (this.canEdit() ? '/api/models' : undefined));
  /** Season outlooks, whose contracted evaluation a contracted-output source reads. */
  readonly outlooks = httpResource<{ id: number; season: string; title: string }[]>(() => (this.canEdit() ? '/api/outlooks' : undefined));

  // the form
  readonly form = buildBudgetForm(this.#fb, blankValue());
  #preserved: Preserved = emptyPreserved();
  /** The unit system the form's typed masses and prices are in. */
  #formSystem: UnitSystem = 'metric';
  readonly formReady = signal(false);
  readonly dirty = signal(false);
  readonly invalid = signal(false);
  /** The source kind and outlook version chosen, as signals (set on load and on each change). */
  readonly sourceKind = signal<SourceKind>(this.form.controls.source.controls.kind.value);
  readonly #versionId = signal<number | null>(null);
  readonly versionDetail = httpResource<OutlookVersionScenarios>(() => {
    const id = this.#versionId();
    return this.canEdit() && id ? `/api/outlooks/versions/${id}` : undefined;
  });

  // preview and save
  readonly #refresh = new Subject<void>();
  readonly preview = signal<BudgetPreview | null>(null);
  readonly previewing = signal(false);
  readonly problems = signal<string[]>([]);
  readonly saving = signal(false);

  readonly versionOptions = computed(() => (this.versions.hasValue() ? this.versions.value() : []));
  readonly contractOutlookOptions = computed(() => (this.outlooks.hasValue() ? this.outlooks.value() : []));
  readonly runOptions = computed<RunOption[]>(() => {
    const models = this.models.hasValue() ? this.models.value() : [];
    return models
      .flatMap((m) =>
        m.runs
          .filter((r) => r.status === 'succeeded')
          .map((r) => ({ id: r.id, label: `Run #${r.id} · ${m.name}`, finished: r.finishedAt ?? r.createdAt })),
      )
      .sort((a, b) => b.id - a.id)
      .map(({ id, label, finished }) => ({ id, label: `${label} · ${new Date(finished).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric' })}` }));
  });
  readonly scenarioLabel = scenarioLabel;
  readonly outlookScenarios = computed(() => {
    const names = this.versionDetail.hasValue() ? this.versionDetail.value().scenarios.map((s) => s.name) : [];
    const current = this.form.controls.source.controls.outlookScenario.value;
    return names.length ? names : [current];
  });

  /** The figures shown: the preview of unsaved edits, else the saved budget. */
  readonly result = computed<BudgetResult | null>(() => {
    const saved = this.savedView()?.result ?? null;
    if (this.canEdit() && (this.isNew() || this.dirty())) return this.preview()?.result ?? saved;
    return saved;
  });
  /** The figures shown are not those of the inputs on screen (computing, or the inputs have a problem). */
  readonly stale = computed(
    () =>
      this.canEdit() && (this.isNew() || this.dirty())
        ? this.previewing() || this.invalid() || this.problems().length > 0 || !this.preview()
        : this.saved.isLoading(),
  );
  readonly currency = computed(() => this.result()?.currency ?? this.#settings.settings()?.currency ?? '');
  readonly labels = computed(() => unitLabels(this.system(), this.currency()));
  readonly cautions = computed(() => this.result()?.cautions ?? STANDING_CAUTIONS);
  readonly title = computed(() => {
    if (this.isNew()) return 'New fertiliser budget';
    return this.savedView()?.name ?? 'Fertiliser budget';
  });
  readonly loadProblem = computed(() => {
    const error = this.saved.error();
    if (error) return errorStatus(error) === 404 ? 'There is no such budget; it may have been deleted.' : errorMessage(error);
    const products = this.productList.error();
    return products ? `the fertiliser product list did not load (${errorMessage(products)})` : null;
  });

  // which scenario the plan and the cash show
  readonly shownName = signal('Base');
  readonly shown = computed(() => {
    const r = this.result();
    if (!r) return null;
    return r.scenarios.find((s) => s.name === this.shownName()) ?? r.scenarios[0] ?? null;
  });
  readonly base = computed(() => this.result()?.scenarios[0] ?? null);

  readonly formatMonth = formatMonth;
  readonly formatPct = formatPct;
  readonly formatTonnes = formatTonnes;
  readonly exportUrl = exportUrl;

  constructor() {
    // Load the form once its data is there: the saved budget (edit) or the sources (new).
    effect(() => {
      if (this.formReady() || !this.canEdit() || !this.productList.hasValue()) return;
      const list = this.productList.value();
      if (this.isNew()) {
        const sourcesKnown = (this.versions.hasValue() || this.versions.error()) && (this.models.hasValue() || this.models.error());
        if (sourcesKnown) untracked(() => this.#load(this.#newValue(list), emptyPreserved()));
      } else if (this.saved.hasValue()) {
        const view = this.saved.value();
        untracked(() => {
          const { value, preserved } = formValueFromStored(view.name, view, list, this.system());
          this.#load(value, preserved);
        });
      }
    });

    // A unit switch re-expresses typed masses and prices, so the same tonnes and prices stay.
    effect(() => {
      const to = this.system();
      untracked(() => {
        if (!this.formReady() || to === this.#formSystem) return;
        const converted = convertFormUnits(this.form.getRawValue(), this.#formSystem, to);
        this.form.controls.source.patchValue(converted.source, { emitEvent: false });
        this.form.controls.products.patchValue(converted.products, { emitEvent: false });
        this.#formSystem = to;
        this.#refresh.next();
      });
    });

    this.form.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => {
      this.dirty.set(this.form.dirty);
      this.invalid.set(this.form.invalid);
    });

    this.form.controls.source.controls.kind.valueChanges.pipe(takeUntilDestroyed()).subscribe((kind) => {
      this.sourceKind.set(kind);
      syncSourceValidators(this.form);
      this.#suggestNameAndBooking();
    });
    this.form.controls.source.controls.outlookVersionId.valueChanges.pipe(takeUntilDestroyed()).subscribe((id) => {
      this.#versionId.set(id);
      this.#suggestNameAndBooking();
    });
    this.form.controls.source.controls.runId.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => this.#suggestNameAndBooking());

    // Every edit is computed on the server (debounced; a newer edit cancels an older preview).
    merge(this.form.valueChanges, this.#refresh)
      .pipe(
        debounceTime(350),
        map(() => this.#previewInput()),
        switchMap((request) => {
          if (!request) {
            this.previewing.set(false);
            return EMPTY;
          }
          this.previewing.set(true);
          return this.#api.preview(request.input, request.system).pipe(
            map((preview) => ({ preview, error: null as unknown })),
            catchError((error: unknown) => of({ preview: null, error })),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe(({ preview, error }) => {
        this.previewing.set(false);
        if (preview) {
          this.preview.set(preview);
          this.problems.set([]);
          if (!preview.result.scenarios.some((s) => s.name === this.shownName())) this.shownName.set('Base');
        } else this.problems.set(this.#problemLines(error));
      });
  }

  // --- form rows ---------------------------------------------------------------------------------

  get monthRows() {
    return this.form.controls.booking.controls.months.controls;
  }

  get scenarioRows() {
    return this.form.controls.scenarios.controls;
  }

  get productRows() {
    return this.form.controls.products.controls;
  }

  addMonth(): void {
    const months = this.form.controls.booking.controls.months;
    const last = months.at(months.length - 1)?.controls.month.value;
    months.push(monthGroup(this.#fb, { month: last ? nextMonth(last) : `${new Date().getFullYear()}-08`, sharePct: null, prepay: true }));
    this.#edited();
  }

  removeMonth(i: number): void {
    this.form.controls.booking.controls.months.removeAt(i);
    this.#edited();
  }

  addScenario(changes: Partial<Pick<ScenarioValue, 'nitrogen' | 'phosphate' | 'potash'>> = {}): void {
    const value: ScenarioValue = { name: '', nitrogen: changes.nitrogen ?? null, phosphate: changes.phosphate ?? null, potash: changes.potash ?? null };
    value.name = this.#uniqueName(scenarioName(value));
    const group = scenarioGroup(this.#fb, value);
    // The name follows the price changes until the treasurer types one of their own.
    merge(group.controls.nitrogen.valueChanges, group.controls.phosphate.valueChanges, group.controls.potash.valueChanges)
      .pipe(takeUntilDestroyed(this.#destroyRef))
      .subscribe(() => {
        if (group.controls.name.dirty) return;
        group.controls.name.setValue(this.#uniqueName(scenarioName(group.getRawValue()), group.controls.name.value));
      });
    this.form.controls.scenarios.push(group);
    this.#edited();
  }

  removeScenario(i: number): void {
    this.form.controls.scenarios.removeAt(i);
    this.#edited();
  }

  shareSum(): number {
    return this.form.controls.booking.controls.months.getRawValue().reduce((a, m) => a + (m.sharePct ?? 0), 0);
  }

  /** The same tolerance as the booking check: 33.3 + 33.3 + 33.4 is 100 %. */
  sharesOff(): boolean {
    return Math.abs(this.shareSum() - 100) > 1e-4;
  }

  bookingProblems(): string[] {
    return this.form.controls.booking.touched || this.form.controls.booking.dirty ? bookingProblems(this.form.controls.booking.getRawValue()) : [];
  }

  includedCount(): number {
    return this.form.controls.products.getRawValue().filter((p) => p.include && !p.gone).length;
  }

  listPriceNote(i: number): string | null {
    const p = this.form.controls.products.at(i).getRawValue();
    if (p.gone) return 'No longer in the co-op’s product list';
    if (p.listPricePerT === null || p.price === null) return null;
    const list = this.#listShown(p.listPricePerT);
    return Math.abs(list - p.price) > 1e-6 * Math.max(1, list) ? `Budget quote; list price ${formatPrice(list, this.currency())}` : null;
  }

  // --- actions -------------------------------------------------------------------------------------

  async save(): Promise<void> {
    this.form.markAllAsTouched();
    const input = this.form.valid ? toBudgetInput(this.form.getRawValue(), this.#formSystem, this.#preserved) : null;
    if (!input) {
      this.#snackBar.open('Some fields need attention before the budget can be saved; they are marked.', 'OK');
      return;
    }
    await runBusy(
      this.saving,
      async () => {
        const id = this.budgetId();
        if (this.isNew() || id === null) {
          const created = await this.#api.create(input, this.#formSystem);
          this.#snackBar.open(`“${created.name}” is saved.`, 'OK');
          await this.#router.navigate(['/budget', created.id], { replaceUrl: true });
          return;
        }
        const updated = await this.#api.update(id, input, this.#formSystem);
        this.saved.set(updated);
        this.#reloadFromSaved(updated);
        this.#snackBar.open('The budget is saved.', 'OK');
      },
      (error) => {
        this.problems.set(this.#problemLines(error));
        this.#snackBar.open('The budget was not saved; the problem is shown at the top of the page.', 'OK');
      },
    );
  }

  discard(): void {
    const view = this.savedView();
    if (view) this.#reloadFromSaved(view);
  }

  async deleteBudget(): Promise<void> {
    const id = this.budgetId();
    if (id === null) return;
    const data: ConfirmDialogData = {
      title: `Delete “${this.title()}”?`,
      message: 'The budget, its scenarios and its booking plan are removed. Exports already downloaded stay as they are. The audit log keeps a record.',
      confirmLabel: 'Delete budget',
      destructive: true,
    };
    if (!(await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed()))) return;
    try {
      await this.#api.remove(id);
      this.#snackBar.open('The budget is deleted.', 'OK');
      await this.#router.navigate(['/budget']);
    } catch (error) {
      this.#snackBar.open(errorMessage(error), 'Dismiss');
    }
  }

  /** Asked by the route before leaving: unsaved edits are lost unless the treasurer stays. */
  async confirmLeave(): Promise<boolean> {
    if (!this.canEdit() || !this.formReady() || this.saving() || !(this.isNew() ? this.form.dirty : this.dirty())) return true;
    const data: ConfirmDialogData = {
      title: 'Leave without saving?',
      message: this.isNew() ? 'This new budget has not been saved; it is lost if you leave.' : 'Your changes to this budget are not saved; they are lost if you leave.',
      confirmLabel: 'Leave without saving',
      destructive: true,
    };
    return Boolean(await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed()));
  }

  // --- internals -----------------------------------------------------------------------------------

  #load(value: BudgetFormValue, preserved: Preserved): void {
    resetArray(this.form.controls.booking.controls.months, value.booking.months, (v) => monthGroup(this.#fb, v));
    resetArray(this.form.controls.scenarios, value.scenarios, (v) => scenarioGroup(this.#fb, v));
    resetArray(this.form.controls.products, value.products, (v) => productGroup(this.#fb, v));
    this.form.reset(value, { emitEvent: false });
    this.#preserved = preserved;
    this.sourceKind.set(value.source.kind);
    this.#versionId.set(value.source.outlookVersionId);
    this.#formSystem = untracked(() => this.system());
    syncSourceValidators(this.form);
    this.form.markAsPristine();
    this.form.markAsUntouched();
    this.form.updateValueAndValidity({ emitEvent: false });
    this.dirty.set(false);
    this.invalid.set(this.form.invalid);
    this.preview.set(null);
    this.problems.set([]);
    this.formReady.set(true);
    this.#refresh.next();
  }

  #reloadFromSaved(view: BudgetView): void {
    const list = this.productList.hasValue() ? this.productList.value() : [];
    const { value, preserved } = formValueFromStored(view.name, view, list, this.system());
    this.#load(value, preserved);
  }

  /** A new budget starts from the latest published outlook, else the latest model run, else typed amounts. */
  #newValue(list: FertiliserProduct[]): BudgetFormValue {
    const version = this.versionOptions()[0];
    const run = this.runOptions()[0];
    const kind: SourceKind = version ? 'outlook' : run ? 'model-run' : 'manual';
    const source: SourceValue = {
      kind,
      outlookVersionId: version?.id ?? null,
      outlookScenario: 'base',
      outlookPricing: 'outlook',
      sideBySide: true,
      runId: run?.id ?? null,
      contractOutlookId: this.contractOutlookOptions()[0]?.id ?? null,
      season: null,
      nitrogen: kind === 'manual' ? null : 0,
      phosphate: kind === 'manual' ? null : 0,
      potash: kind === 'manual' ? null : 0,
    };
    const year = (kind === 'outlook' ? seasonStartYear(version?.season) : null) ?? new Date().getFullYear() + 1;
    return {
      name: this.#suggestedName(source),
      source,
      booking: defaultBooking(year, this.#calendar()),
      scenarios: [],
      products: productValuesFromList(list, untracked(() => this.system())),
      lotRule: 'round-up',
    };
  }

  #suggestedName(source: SourceValue): string {
    if (source.kind === 'outlook') {
      const v = this.versionOptions().find((o) => o.id === source.outlookVersionId);
      return v ? `Fertiliser purchases ${v.season}` : 'Fertiliser purchases';
    }
    if (source.kind === 'model-run' && source.runId !== null) return `Fertiliser purchases, model run #${source.runId}`;
    if (source.kind === 'contracted') {
      const o = this.contractOutlookOptions().find((x) => x.id === source.contractOutlookId);
      return o ? `Fertiliser purchases ${o.season}, on contracts` : 'Fertiliser purchases, on contracts';
    }
    return 'Fertiliser purchases';
  }

  setOutlookPricing(fromOutlook: boolean): void {
    const c = this.form.controls.source.controls.outlookPricing;
    c.setValue(fromOutlook ? 'outlook' : 'list');
    c.markAsDirty();
  }

  /** On a new budget, an untouched name and booking plan follow the source chosen. */
  #suggestNameAndBooking(): void {
    if (!this.formReady() || !this.isNew()) return;
    const source = this.form.controls.source.getRawValue();
    const name = this.form.controls.name;
    if (name.pristine) name.setValue(this.#suggestedName(source), { emitEvent: false });
    const booking = this.form.controls.booking;
    if (booking.pristine && source.kind === 'outlook') {
      const year = seasonStartYear(this.versionOptions().find((o) => o.id === source.outlookVersionId)?.season);
      const plan = year === null ? null : defaultBooking(year, this.#calendar());
      if (plan && booking.controls.months.at(0)?.controls.month.value !== plan.months[0]!.month) {
        resetArray(booking.controls.months, plan.months, (v) => monthGroup(this.#fb, v));
        booking.patchValue(plan, { emitEvent: false });
      }
    }
  }

  #previewInput(): { input: NonNullable<ReturnType<typeof toBudgetInput>>; system: UnitSystem } | null {
    if (!this.formReady() || !this.canEdit()) return null;
    if (!this.isNew() && !this.form.dirty) {
      this.preview.set(null);
      this.problems.set([]);
      return null;
    }
    if (this.form.invalid) return null;
    const input = toBudgetInput(this.form.getRawValue(), this.#formSystem, this.#preserved);
    return input ? { input, system: this.#formSystem } : null;
  }

  #edited(): void {
    this.form.markAsDirty();
    this.form.updateValueAndValidity();
  }

  #uniqueName(wanted: string, own?: string): string {
    const taken = new Set(
      this.form.controls.scenarios
        .getRawValue()
        .map((s) => s.name.trim().toLowerCase())
        .filter((n) => n !== own?.trim().toLowerCase()),
    );
    taken.add('base');
    if (!taken.has(wanted.toLowerCase())) return wanted;
    for (let k = 2; ; k++) if (!taken.has(`${wanted} (${k})`.toLowerCase())) return `${wanted} (${k})`;
  }

  #listShown(listPricePerT: number): number {
    return pricePerTToShown(listPricePerT, this.#formSystem);
  }

  /** The server's words, each with where in the budget it applies. */
  #problemLines(error: unknown): string[] {
    if (error instanceof ApiRequestError && error.error.details?.length) {
      const products = this.form.controls.products.getRawValue().filter((p) => p.include && !p.gone).map((p) => p.name);
      const scenarios = this.form.controls.scenarios.getRawValue().map((s) => s.name);
      return error.error.details.map((d) => `${whereOf(d.path, products, scenarios)}: ${d.message}`);
    }
    return [errorMessage(error)];
  }
}

function nextMonth(month: string): string {
  const [y, m] = month.split('-').map(Number) as [number, number];
  return m === 12 ? `${y + 1}-01` : `${y}-${String(m + 1).padStart(2, '0')}`;
}
