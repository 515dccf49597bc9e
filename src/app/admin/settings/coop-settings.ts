import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, effect, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import type { CoopSettings, ServerSetup } from '../../../../shared/api-types';
import { settingsSchema } from '../../../../shared/schemas';
import { calendarWords, DEFAULT_SEASON_CALENDAR, MONTH_NAMES, seasonCalendarSchema, YEAR_WORDS, type MonthRef } from '../../../../shared/season-calendar';
import { ApiRequestError, errorMessage } from '../../core/api-error';
import { SettingsStore } from '../../core/settings-store';
import { applyServerDetails, zodValidator } from '../../shared/zod-validator';
import { FieldError } from '../../shared/field-error';
import { runBusy } from '../../shared/run-busy';

/** `/admin/settings`: the co-op's name, currency, units and capacities. */
@Component({
  selector: 'np-coop-settings',
  imports: [
    ReactiveFormsModule,
    MatFormField,
    MatLabel,
    MatHint,
    MatError,
    FieldError,
    MatSuffix,
    MatInput,
    MatSelect,
    MatOption,
    MatButton,
    MatProgressBar,
  ],
  templateUrl: './coop-settings.html',
  styleUrl: './coop-settings.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CoopSettingsPage {
  // services
  readonly #store = inject(SettingsStore);
  readonly #snackBar = inject(MatSnackBar);

  protected readonly resource = this.#store.resource;
  /** The server's address for e-mail links and how mail leaves (from its environment, read-only here). */
  protected readonly server = httpResource<ServerSetup>(() => '/api/settings/server');
  readonly #fb = inject(NonNullableFormBuilder);
  readonly #monthRef = (r: MonthRef) => this.#fb.group({ month: [r.month, Validators.required], year: [r.year, Validators.required] });
  protected readonly form = this.#fb.group({
    coopName: ['', [Validators.required, zodValidator(settingsSchema.shape.coopName)]],
    currency: ['', [Validators.required, zodValidator(settingsSchema.shape.currency)]],
    unitSystem: ['metric' as CoopSettings['unitSystem'], Validators.required],
    decimalMark: ['point' as CoopSettings['decimalMark'], Validators.required],
    storageCapacityT: [0, [Validators.required, zodValidator(settingsSchema.shape.storageCapacityT)]],
    handlingCapacityTPerDay: [0, [Validators.required, zodValidator(settingsSchema.shape.handlingCapacityTPerDay)]],
    seasonCalendar: this.#fb.group(
      {
        inputsFrom: this.#monthRef(DEFAULT_SEASON_CALENDAR.inputsFrom),
        inputsTo: this.#monthRef(DEFAULT_SEASON_CALENDAR.inputsTo),
        cropFrom: this.#monthRef(DEFAULT_SEASON_CALENDAR.cropFrom),
        cropTo: this.#monthRef(DEFAULT_SEASON_CALENDAR.cropTo),
      },
      { validators: zodValidator(seasonCalendarSchema) },
    ),
  });
  protected readonly months = MONTH_NAMES.map((name, i) => ({ value: i + 1, name }));
  protected readonly years = ([-1, 0, 1] as const).map((value) => ({ value, name: YEAR_WORDS[value] }));
  protected readonly calendarFields = [
    { key: 'inputsFrom', label: 'Inputs bought from' },
    { key: 'inputsTo', label: 'Inputs bought until' },
    { key: 'cropFrom', label: 'Crop delivered from' },
    { key: 'cropTo', label: 'Crop delivered until' },
  ] as const;
  readonly #calendar = toSignal(this.form.controls.seasonCalendar.valueChanges, { initialValue: this.form.controls.seasonCalendar.getRawValue() });
  /** The calendar read for the coming season, e.g. "Season 2027/28: inputs bought Aug 2026 – Mar 2027, …". */
  protected readonly calendarExample = computed(() => {
    const parsed = seasonCalendarSchema.safeParse(this.#calendar());
    return parsed.success ? calendarWords(parsed.data, new Date().getFullYear() + 1) : null;
  });
  protected readonly saving = signal(false);
  protected readonly failure = signal<string | null>(null);

  constructor() {
    // Fill the form once the settings arrive, and again after a save; never over someone's edits.
    effect(() => {
      const settings = this.#store.settings();
      if (settings && this.form.pristine) this.form.reset(settings);
    });
  }

  protected upperCaseCurrency(): void {
    const control = this.form.controls.currency;
    control.setValue(control.value.trim().toUpperCase());
  }

  protected async saveSettings(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.failure.set(null);
    await runBusy(
      this.saving,
      async () => {
        const value = this.form.getRawValue();
        const saved = await this.#store.save({ ...value, coopName: value.coopName.trim() });
        this.form.reset(saved);
        this.#snackBar.open('Settings saved.', 'OK');
      },
      (error) => {
        if (!(error instanceof ApiRequestError && applyServerDetails(this.form.controls, error.error.details))) {
          this.failure.set(errorMessage(error));
        }
      },
    );
  }

  protected discardChanges(): void {
    const settings = this.#store.settings();
    if (settings) this.form.reset(settings);
  }
}
