import { ChangeDetectionStrategy, Component, computed, effect, inject, input, output, signal, untracked } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, type AbstractControl } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { bandSchema, methodSchema } from '../../../shared/outlook-schemas';
import { TEXT_MAX } from '../../../shared/field-limits';
import type { BandRule, ExpectationKind, ExpectationMethod, ExpectationSetting } from './outlook-api-types';
import { FieldError } from '../shared/field-error';

/** The methods in the order the planner meets them, with a line on what each does. */
export const METHOD_CHOICES: { kind: ExpectationKind; label: string; hint: string }[] = [
  { kind: 'last', label: "Last season's price", hint: 'The price of the latest season before the outlook.' },
  { kind: 'moving-average', label: 'Moving average', hint: 'The mean of the last k seasons; "Olympic" drops the highest and the lowest.' },
  { kind: 'trend', label: 'Linear trend', hint: 'A least-squares line of price on season year, read at the outlook season.' },
  { kind: 'adaptive', label: 'Adaptive expectation', hint: 'Each season the expectation moves a share λ of the way to the price seen.' },
  { kind: 'futures-basis', label: 'Futures quote plus local basis', hint: 'The latest quote for the season plus the mean of local cash minus futures in past seasons.' },
  { kind: 'manual', label: 'Manual figure', hint: 'A figure you set, e.g. a dealer quote or a booked price.' },
];

export type BandKind = BandRule['kind'];

export const BAND_CHOICES: { kind: BandKind; label: string }[] = [
  { kind: 'errors', label: "From the method's past errors" },
  { kind: 'percent', label: 'Plus or minus a percentage' },
  { kind: 'manual', label: 'Low and high set by hand' },
];

/** Everything the form holds; fields of other methods keep their values while hidden. */
export interface ExpectationFormValue {
  kind: ExpectationKind;
  k: number | null;
  olympic: boolean;
  seasons: number | null;
  lambda: number | null;
  contract: string;
  basisSeasons: number | null;
  value: number | null;
  bandKind: BandKind;
  bandK: number | null;
  bandPct: number | null;
  bandLow: number | null;
  bandHigh: number | null;
  note: string;
}

export const FORM_DEFAULTS: ExpectationFormValue = {
  kind: 'last',
  k: 3,
  olympic: false,
  seasons: 10,
  lambda: 0.5,
  contract: '',
  basisSeasons: 5,
  value: null,
  bandKind: 'errors',
  bandK: 1,
  bandPct: 10,
  bandLow: null,
  bandHigh: null,
  note: '',
};

/** The form's fields for a stored setting (unknown parts keep their defaults). */
export function formValueOf(setting: ExpectationSetting | null): ExpectationFormValue {
  const v: ExpectationFormValue = { ...FORM_DEFAULTS };
  if (!setting) return v;
  const m = setting.method;
  v.kind = m.kind;
  if (m.kind === 'moving-average') {
    v.k = m.k;
    v.olympic = m.olympic ?? false;
  } else if (m.kind === 'trend') v.seasons = m.seasons;
  else if (m.kind === 'adaptive') v.lambda = m.lambda;
  else if (m.kind === 'futures-basis') {
    v.contract = m.contract ?? '';
    v.basisSeasons = m.basisSeasons;
  } else if (m.kind === 'manual') v.value = m.value;
  const band = setting.band ?? (m.kind === 'manual' ? { kind: 'percent' as const, pct: 10 } : { kind: 'errors' as const, k: 1 });
  v.bandKind = band.kind;
  if (band.kind === 'errors') v.bandK = band.k;
  else if (band.kind === 'percent') v.bandPct = band.pct;
  else {
    v.bandLow = band.low;
    v.bandHigh = band.high;
  }
  v.note = setting.note ?? '';
  return v;
}

/** The method part of the form as the API's method object (not yet validated). */
export function methodOf(v: ExpectationFormValue): Record<string, unknown> {
  switch (v.kind) {
    case 'last':
      return { kind: 'last' };
    case 'moving-average':
      return { kind: 'moving-average', k: v.k ?? undefined, olympic: v.olympic };
    case 'trend':
      return { kind: 'trend', seasons: v.seasons ?? undefined };
    case 'adaptive':
      return { kind: 'adaptive', lambda: v.lambda ?? undefined };
    case 'futures-basis':
      return { kind: 'futures-basis', contract: v.contract.trim() || null, basisSeasons: v.basisSeasons ?? undefined };
    case 'manual':
      return { kind: 'manual', value: v.value ?? undefined };
  }
}

export function bandOf(v: ExpectationFormValue): Record<string, unknown> {
  switch (v.bandKind) {
    case 'errors':
      return { kind: 'errors', k: v.bandK ?? undefined };
    case 'percent':
      return { kind: 'percent', pct: v.bandPct ?? undefined };
    case 'manual':
      return { kind: 'manual', low: v.bandLow ?? undefined, high: v.bandHigh ?? undefined };
  }
}

/** Which form field a schema issue belongs to (method fields by name; band fields carry a prefix). */
const METHOD_FIELD: Record<string, keyof ExpectationFormValue> = { k: 'k', olympic: 'olympic', seasons: 'seasons', lambda: 'lambda', contract: 'contract', basisSeasons: 'basisSeasons', value: 'value' };
const BAND_FIELD: Record<string, keyof ExpectationFormValue> = { k: 'bandK', pct: 'bandPct', low: 'bandLow', high: 'bandHigh' };

export type SettingResult = { ok: true; setting: ExpectationSetting } | { ok: false; errors: Partial<Record<keyof ExpectationFormValue, string>> };

/**
 * The form's value checked with the API's own schemas (shared/outlook-schemas.ts), so the
 * form says what the server would say, in the same words, before anything is sent.
 */
export function settingFromForm(item: string, v: ExpectationFormValue): SettingResult {
  const errors: Partial<Record<keyof ExpectationFormValue, string>> = {};
  const method = methodSchema.safeParse(methodOf(v));
  if (!method.success)
    for (const issue of method.error.issues) {
      const field = METHOD_FIELD[String(issue.path[0])] ?? 'kind';
      errors[field] ??= issue.message.startsWith('Invalid input') ? 'Enter a number' : issue.message;
    }
  if (v.kind === 'manual' && v.bandKind === 'errors') errors.bandKind = 'A manual figure has no history of errors; choose a percentage or set low and high';
  const band = bandSchema.safeParse(bandOf(v));
  if (!band.success)
    for (const issue of band.error.issues) {
      const field = BAND_FIELD[String(issue.path[0])] ?? 'bandKind';
      errors[field] ??= issue.message.startsWith('Invalid input') ? 'Enter a number' : issue.message;
    }
  if (band.success && band.data.kind === 'manual' && band.data.low > band.data.high) errors.bandHigh = 'The high price must not be below the low price';
  if (method.success && method.data.kind === 'manual' && band.success && band.data.kind === 'manual') {
    if (band.data.low > method.data.value) errors.bandLow = 'The low price must not be above the expected price';
    else if (band.data.high < method.data.value) errors.bandHigh = 'The high price must not be below the expected price';
  }
  if (v.note.length > 2000) errors.note = 'Keep the note under 2,000 characters';
  if (Object.keys(errors).length || !method.success || !band.success) return { ok: false, errors };
  const note = v.note.trim();
  return { ok: true, setting: { item, method: method.data as ExpectationMethod, band: band.data as BandRule, ...(note ? { note } : {}) } };
}

/**
 * The planner's choice of an expectation method for one item, its parameters, the low/high band and
 * a note. Emits the setting; the caller sends it (with the other items) and may hand back what the
 * server said about the method or the band.
 */
@Component({
  selector: 'np-expectation-form',
  imports: [ReactiveFormsModule, MatButton, MatCheckbox, MatError, FieldError, MatFormField, MatHint, MatLabel, MatSuffix, MatInput, MatSelect, MatOption],
  templateUrl: './expectation-form.html',
  styleUrl: './expectation-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ExpectationForm {
  // inputs
  readonly item = input.required<string>();
  readonly itemName = input.required<string>();
  /** e.g. "EUR/t" */
  readonly priceUnit = input.required<string>();
  readonly initial = input<ExpectationSetting | null>(null);
  /** What the server said about this item's method or band (422 details), shown at the part it names. */
  readonly serverErrors = input<{ method?: string; band?: string } | null>(null);
  readonly busy = input(false);

  readonly saved = output<ExpectationSetting>();
  readonly cancelled = output<void>();

  protected readonly methods = METHOD_CHOICES;
  protected readonly textMax = TEXT_MAX;
  protected readonly bands = BAND_CHOICES;

  protected readonly form = inject(NonNullableFormBuilder).group({
    kind: ['last' as ExpectationKind],
    k: [3 as number | null],
    olympic: [false],
    seasons: [10 as number | null],
    lambda: [0.5 as number | null],
    contract: [''],
    basisSeasons: [5 as number | null],
    value: [null as number | null],
    bandKind: ['errors' as BandKind],
    bandK: [1 as number | null],
    bandPct: [10 as number | null],
    bandLow: [null as number | null],
    bandHigh: [null as number | null],
    note: [''],
  });

  readonly #value = toSignal(this.form.valueChanges, { initialValue: this.form.getRawValue() });
  protected readonly kind = computed(() => this.#value().kind ?? 'last');
  protected readonly bandKind = computed(() => this.#value().bandKind ?? 'errors');
  protected readonly methodHint = computed(() => METHOD_CHOICES.find((m) => m.kind === this.kind())?.hint ?? '');
  /** Messages of the last attempt to save, by field. */
  protected readonly errors = signal<Partial<Record<keyof ExpectationFormValue, string>>>({});

  constructor() {
    effect(() => {
      const initial = this.initial();
      untracked(() => this.#load(formValueOf(initial)));
    });
    // A manual figure has no error history: move its band off "past errors".
    this.form.controls.kind.valueChanges.pipe(takeUntilDestroyed()).subscribe((kind) => {
      if (kind === 'manual' && this.form.controls.bandKind.value === 'errors') this.form.controls.bandKind.setValue('percent');
    });
  }

  /** Fills the method part from a method of the comparison ("Use this one"), keeping the band and note. */
  apply(method: ExpectationMethod): void {
    const v = formValueOf({ item: this.item(), method });
    const current = this.form.getRawValue();
    this.#load({ ...v, bandKind: method.kind === 'manual' && current.bandKind === 'errors' ? 'percent' : current.bandKind, bandK: current.bandK, bandPct: current.bandPct, bandLow: current.bandLow, bandHigh: current.bandHigh, note: current.note });
  }

  protected save(): void {
    const result = settingFromForm(this.item(), this.form.getRawValue());
    this.#clearErrors();
    if (!result.ok) {
      this.errors.set(result.errors);
      for (const [field, message] of Object.entries(result.errors)) {
        const control = this.form.get(field) as AbstractControl | null;
        control?.setErrors({ schema: message });
        control?.markAsTouched();
      }
      return;
    }
    this.errors.set({});
    this.saved.emit(result.setting);
  }

  #load(v: ExpectationFormValue): void {
    this.form.setValue(v);
    this.#clearErrors();
    this.errors.set({});
  }

  #clearErrors(): void {
    for (const control of Object.values(this.form.controls)) control.setErrors(null);
  }
}
