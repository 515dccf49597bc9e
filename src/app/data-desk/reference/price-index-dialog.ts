import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, Validators } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import type { PriceIndex } from '../../../../shared/api-types';
import { priceIndexSchema } from '../../../../shared/data-schemas';
import { saveAndClose } from '../../shared/dialog-save';
import { FORM_DIALOG_IMPORTS } from '../../shared/form-dialog';
import { zodValidator } from '../../shared/zod-validator';
import { DataDeskApi } from '../data-desk-api';
import { parseTable, readIndexValues } from '../paste';
import { ProblemList } from '../problem-list';
import type { Lookups } from '../reference-store';

export interface PriceIndexDialogData {
  lookups: Lookups;
  index?: PriceIndex;
}

/** Adds a price index (to deflate prices with), or corrects a stored one: its name, base, source and a value per season, typed, pasted or read from a CSV file. */
@Component({
  selector: 'np-price-index-dialog',
  imports: [FORM_DIALOG_IMPORTS, ProblemList],
  templateUrl: './price-index-dialog.html',
  styleUrl: './ref-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PriceIndexDialog {
  readonly #api = inject(DataDeskApi);
  readonly #dialogRef = inject<MatDialogRef<PriceIndexDialog, PriceIndex>>(MatDialogRef);
  readonly #data = inject<PriceIndexDialogData>(MAT_DIALOG_DATA);
  protected readonly lookups = this.#data.lookups;
  /** The index being corrected, or null for a new one. */
  protected readonly editing = this.#data.index ?? null;

  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', [Validators.required, zodValidator(priceIndexSchema.shape.name)]],
    base: ['', [Validators.required, zodValidator(priceIndexSchema.shape.base)]],
    source: ['', [Validators.required, zodValidator(priceIndexSchema.shape.source)]],
    values: ['', Validators.required],
  });
  readonly #text = toSignal(this.form.controls.values.valueChanges, { initialValue: this.#initialValues() });

  constructor() {
    if (this.editing) {
      this.form.setValue({ name: this.editing.name, base: this.editing.base, source: this.editing.source, values: this.#initialValues() });
    }
  }

  /** The stored values as the two tab-separated columns the planner would paste. */
  #initialValues(): string {
    return this.#data.index ? this.#data.index.values.map((v) => `${v.season}\t${v.value}`).join('\n') : '';
  }
  protected readonly read = computed(() => readIndexValues(parseTable(this.#text()), this.lookups));
  protected readonly missing = computed(() => {
    const have = new Set(this.read().values.map((v) => v.seasonId));
    return this.lookups.seasons.filter((s) => !have.has(s.id)).map((s) => s.label);
  });
  protected readonly saving = signal(false);
  protected readonly failure = signal<string | null>(null);

  protected async fileChosen(event: Event): Promise<void> {
    const input = event.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (!file) return;
    if (file.size > 1024 * 1024) {
      this.failure.set(`${file.name} is larger than 1 MB; an index has one value per season.`);
      return;
    }
    this.form.controls.values.setValue(await file.text());
    if (!this.form.controls.name.value) this.form.controls.name.setValue(file.name.replace(/\.[^.]+$/, ''));
  }

  protected async save(): Promise<void> {
    const read = this.read();
    if (this.form.invalid || read.problems.length > 0 || read.values.length === 0) {
      this.form.markAllAsTouched();
      return;
    }
    const v = this.form.getRawValue();
    const body = { name: v.name.trim(), base: v.base.trim(), source: v.source.trim(), values: read.values };
    await saveAndClose(() => (this.editing ? this.#api.updatePriceIndex(this.editing.id, body) : this.#api.createPriceIndex(body)), {
      ref: this.#dialogRef,
      saving: this.saving,
      failure: this.failure,
      controls: this.form.controls,
      conflict: `An index named “${body.name}” exists already.`,
    });
  }
}
