import { ApiRequestError } from '../../core/api-error';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, Validators, type AbstractControl, type ValidationErrors, type ValidatorFn } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { MatOption, MatSelect } from '@angular/material/select';
import { DateTime } from 'luxon';
import type { PriceRow } from '../../../../shared/api-types';
import { markName, parseNumber, type DecimalMark } from '../../../../shared/cell-parsers';
import { priceSchema } from '../../../../shared/data-schemas';
import { TEXT_MAX } from '../../../../shared/field-limits';
import { saveAndClose } from '../../shared/dialog-save';
import { FORM_DIALOG_IMPORTS } from '../../shared/form-dialog';
import { ItemField, newestSeasonId, SeasonField } from '../../shared/lookup-fields';
import { zodValidator } from '../../shared/zod-validator';
import { DataDeskApi } from '../data-desk-api';
import type { Lookups } from '../reference-store';
import { seasonSpan } from '../season-dates';

export interface PriceDialogData {
  lookups: Lookups;
  currency: string;
  /** How the co-op writes decimals: the price is typed and read that way, as in the grid. */
  decimalMark: DecimalMark;
  existing: readonly PriceRow[];
}

/**
 * The typed price read in the co-op's convention by the grid's parser (shared/cell-parsers.ts), then
 * checked by the shared schema: "204,5" under a decimal point is refused with the reason, never
 * read as 2045. The browser's number input would ignore the setting, so the field is text.
 */
export function priceTextValidator(mark: () => DecimalMark): ValidatorFn {
  const schema = zodValidator(priceSchema.shape.price);
  return (control: AbstractControl<string>): ValidationErrors | null => {
    const text = control.value ?? '';
    if (text.trim() === '') return null;
    const parsed = parseNumber(text, mark());
    if (!parsed.ok) return { schema: `${parsed.message} (the co-op writes ${markName(mark())})` };
    return schema({ value: parsed.value } as AbstractControl);
  };
}

/** Adds one price observation. Closes with the stored row. */
@Component({
  selector: 'np-price-dialog',
  imports: [FORM_DIALOG_IMPORTS, MatSelect, MatOption, SeasonField, ItemField],
  templateUrl: './price-dialog.html',
  styleUrl: '../../shared/form-dialog.scss',
  host: { style: '--np-dialog-form-width: 560px' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PriceDialog {
  readonly #api = inject(DataDeskApi);
  readonly #dialogRef = inject<MatDialogRef<PriceDialog, PriceRow[]>>(MatDialogRef);
  protected readonly data = inject<PriceDialogData>(MAT_DIALOG_DATA);
  protected readonly lookups = this.data.lookups;
  protected readonly textMax = TEXT_MAX;

  protected readonly form = inject(NonNullableFormBuilder).group({
    itemId: [null as number | null, Validators.required],
    seasonId: [newestSeasonId(this.lookups.seasons), Validators.required],
    deliveryPointId: [null as number | null, Validators.required],
    price: ['', [Validators.required, priceTextValidator(() => this.data.decimalMark)]],
    currency: [this.data.currency, [Validators.required, zodValidator(priceSchema.shape.currency)]],
    source: ['', [Validators.required, zodValidator(priceSchema.shape.source)]],
    observedOn: [DateTime.now().toISODate(), [Validators.required, zodValidator(priceSchema.shape.observedOn)]],
  });

  readonly #value = toSignal(this.form.valueChanges, { initialValue: this.form.getRawValue() });
  protected readonly item = computed(() => {
    const id = this.#value().itemId;
    return id == null ? null : (this.lookups.itemById.get(id) ?? null);
  });
  /** The season's months, and a word when the date falls outside them (allowed: forward prices exist). */
  protected readonly dateHint = computed(() => {
    const v = this.#value();
    const season = v.seasonId == null ? undefined : this.lookups.seasonById.get(v.seasonId);
    if (!season) return '';
    const span = seasonSpan(season);
    const date = v.observedOn ? DateTime.fromISO(v.observedOn, { zone: 'utc' }) : null;
    const outside = date?.isValid && (date < span.start || date > span.end);
    return `${season.label} runs ${span.text}${outside ? ' — this date is outside it' : ''}`;
  });
  /** An example price in the co-op's convention, for the field's placeholder. */
  protected readonly example = this.data.decimalMark === 'comma' ? '204,50' : '204.50';
  protected readonly saving = signal(false);
  protected readonly failure = signal<string | null>(null);
  /** The body the server last asked about (422 needs_confirmation). */
  #doubted: string | null = null;

  protected async save(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const v = this.form.getRawValue();
    const body = {
      itemId: v.itemId!,
      seasonId: v.seasonId!,
      deliveryPointId: v.deliveryPointId!,
      price: (parseNumber(v.price, this.data.decimalMark) as { value: number }).value,
      currency: v.currency.trim().toUpperCase(),
      source: v.source.trim(),
      observedOn: v.observedOn,
    };
    const twin = this.data.existing.find(
      (e) => e.itemId === body.itemId && e.seasonId === body.seasonId && e.deliveryPointId === body.deliveryPointId && e.observedOn === body.observedOn,
    );
    if (twin) {
      this.failure.set(`${twin.itemName} at ${twin.deliveryPoint} on ${twin.observedOn} is already stored (${twin.price} ${twin.currency}); change that row in the grid instead.`);
      return;
    }
    // A price far from its history is answered with the reason; saving the same price again confirms it.
    const key = JSON.stringify(body);
    const confirmed = this.#doubted === key;
    await saveAndClose(async () => {
      try {
        return await this.#api.createPrices([body], confirmed);
      } catch (error) {
        if (error instanceof ApiRequestError && error.error.code === 'needs_confirmation') this.#doubted = key;
        throw error;
      }
    }, {
      ref: this.#dialogRef,
      saving: this.saving,
      failure: this.failure,
      controls: this.form.controls,
      // Field messages come back as body.rows.0.<field>.
      detailPath: (path) => path.replace(/^body\.rows\.0\./, ''),
    });
  }
}
