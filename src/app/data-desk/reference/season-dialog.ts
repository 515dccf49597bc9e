import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, Validators } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { MatOption, MatSelect } from '@angular/material/select';
import type { Season } from '../../../../shared/api-types';
import { seasonSchema } from '../../../../shared/data-schemas';
import { SEASON_LABEL_MIN, SEASON_YEARS, TEXT_MAX } from '../../../../shared/field-limits';
import { saveAndClose } from '../../shared/dialog-save';
import { FORM_DIALOG_IMPORTS } from '../../shared/form-dialog';
import { DataDeskApi } from '../data-desk-api';
import { MONTHS, seasonSpan, suggestedSeasonLabel } from '../season-dates';

export interface SeasonDialogData {
  season: Season | null;
  /** The seasons stored, to suggest the next one and to refuse a second season for a year. */
  seasons: readonly Season[];
}

/** Adds or edits a season: a crop or marketing year, its first month and its label. */
@Component({
  selector: 'np-season-dialog',
  imports: [FORM_DIALOG_IMPORTS, MatSelect, MatOption],
  templateUrl: './season-dialog.html',
  styleUrl: './ref-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SeasonDialog {
  readonly #api = inject(DataDeskApi);
  readonly #dialogRef = inject<MatDialogRef<SeasonDialog, Season>>(MatDialogRef);
  protected readonly data = inject<SeasonDialogData>(MAT_DIALOG_DATA);
  protected readonly season = this.data.season;
  protected readonly months = MONTHS;
  protected readonly textMax = TEXT_MAX;

  readonly #last = this.data.seasons[this.data.seasons.length - 1];
  readonly #startYear = this.season?.startYear ?? (this.#last ? this.#last.startYear + 1 : new Date().getFullYear());
  readonly #startMonth = this.season?.startMonth ?? this.#last?.startMonth ?? 7;

  protected readonly form = inject(NonNullableFormBuilder).group({
    startYear: [this.#startYear, [Validators.required, Validators.min(SEASON_YEARS.min), Validators.max(SEASON_YEARS.max)]],
    startMonth: [this.#startMonth, Validators.required],
    label: [this.season?.label ?? suggestedSeasonLabel(this.#startYear, this.#startMonth), [Validators.required, Validators.minLength(SEASON_LABEL_MIN), Validators.maxLength(TEXT_MAX.seasonLabel)]],
  });
  readonly #value = toSignal(this.form.valueChanges, { initialValue: this.form.getRawValue() });
  /** The season's first and last day, through luxon. */
  protected readonly span = computed(() => {
    const v = this.#value();
    if (!v.startYear || !v.startMonth || v.startYear < SEASON_YEARS.min || v.startYear > SEASON_YEARS.max) return null;
    return seasonSpan({ startYear: v.startYear, startMonth: v.startMonth }).text;
  });
  protected readonly clash = computed(() => {
    const v = this.#value();
    return this.data.seasons.find((s) => s.id !== this.season?.id && (s.startYear === v.startYear || s.label === v.label?.trim())) ?? null;
  });
  protected readonly saving = signal(false);
  protected readonly failure = signal<string | null>(null);

  constructor() {
    // The label follows the year and month until the planner types one of their own.
    let suggested = this.form.controls.label.value;
    this.form.valueChanges.pipe(takeUntilDestroyed()).subscribe((v) => {
      const label = this.form.controls.label;
      if (!v.startYear || !v.startMonth) return;
      const next = suggestedSeasonLabel(v.startYear, v.startMonth);
      if (label.value === suggested && next !== suggested) {
        label.setValue(next, { emitEvent: false });
        suggested = next;
      }
    });
  }

  protected async save(): Promise<void> {
    if (this.form.invalid || this.clash()) {
      this.form.markAllAsTouched();
      return;
    }
    const v = this.form.getRawValue();
    const parsed = seasonSchema.safeParse({ label: v.label.trim(), startYear: Number(v.startYear), startMonth: Number(v.startMonth) });
    if (!parsed.success) {
      this.failure.set(parsed.error.issues.map((i) => `${String(i.path[0])}: ${i.message}`).join('; '));
      return;
    }
    await saveAndClose(() => this.season ? this.#api.updateSeason(this.season.id, parsed.data) : this.#api.createSeason(parsed.data), {
      ref: this.#dialogRef,
      saving: this.saving,
      failure: this.failure,
      controls: this.form.controls,
      conflict: 'A season with this label or starting year exists already.',
    });
  }
}
