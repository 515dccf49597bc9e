import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, Validators } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { MatOption, MatSelect } from '@angular/material/select';
import type { Item, Season } from '../../../shared/api-types';
import { CONTRACT_STATUSES, CONTRACT_STATUS_LABELS, contractSchema, type ContractRow } from '../../../shared/contract-schemas';
import { TEXT_MAX } from '../../../shared/field-limits';
import { formToSave, saveAndClose } from '../shared/dialog-save';
import { FORM_DIALOG_IMPORTS } from '../shared/form-dialog';
import { ItemField, newestSeasonId, SeasonField } from '../shared/lookup-fields';
import { zodValidator } from '../shared/zod-validator';
import { ContractsApi } from './contracts-api';

export interface ContractDialogData {
  farms: readonly { id: number; code: string; name: string }[];
  items: readonly Item[];
  seasons: readonly Season[];
  currency: string;
  /** The season chosen on the page (new contracts start there). */
  seasonId: number | null;
  /** The contract to change; absent for a new one. */
  contract?: ContractRow;
}

/** Records or changes one delivery contract. Closes with the stored row. */
@Component({
  selector: 'np-contract-dialog',
  imports: [FORM_DIALOG_IMPORTS, MatSelect, MatOption, SeasonField, ItemField],
  templateUrl: './contract-dialog.html',
  styleUrl: '../shared/form-dialog.scss',
  host: { style: '--np-dialog-form-width: 560px' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ContractDialog {
  readonly #api = inject(ContractsApi);
  readonly #ref = inject<MatDialogRef<ContractDialog, ContractRow>>(MatDialogRef);
  protected readonly data = inject<ContractDialogData>(MAT_DIALOG_DATA);
  protected readonly outputs = this.data.items.filter((i) => i.role === 'output');
  protected readonly textMax = TEXT_MAX;
  protected readonly statuses = CONTRACT_STATUSES.map((s) => ({ value: s, label: CONTRACT_STATUS_LABELS[s] }));
  readonly #c = this.data.contract;
  readonly #shape = contractSchema.shape;

  protected readonly form = inject(NonNullableFormBuilder).group({
    reference: [this.#c?.reference ?? '', [Validators.required, zodValidator(this.#shape.reference)]],
    farmId: [this.#c?.farmId ?? (null as number | null), Validators.required],
    seasonId: [this.#c?.seasonId ?? this.data.seasonId ?? newestSeasonId(this.data.seasons), Validators.required],
    itemId: [this.#c?.itemId ?? this.outputs[0]?.id ?? (null as number | null), Validators.required],
    quantity: [this.#c?.quantity ?? (null as number | null), [Validators.required, zodValidator(this.#shape.quantity)]],
    price: [this.#c?.price ?? (null as number | null), [Validators.required, zodValidator(this.#shape.price)]],
    currency: [this.#c?.currency ?? this.data.currency, [Validators.required, zodValidator(this.#shape.currency)]],
    deliveryFrom: [this.#c?.deliveryFrom ?? '', [Validators.required, zodValidator(this.#shape.deliveryFrom)]],
    deliveryTo: [this.#c?.deliveryTo ?? '', [Validators.required, zodValidator(this.#shape.deliveryTo)]],
    status: [this.#c?.status ?? ('signed' as ContractRow['status']), Validators.required],
  });

  readonly #value = toSignal(this.form.valueChanges, { initialValue: this.form.getRawValue() });
  protected readonly unit = computed(() => this.data.items.find((i) => i.id === this.#value().itemId)?.unit ?? 'unit');
  protected readonly saving = signal(false);
  protected readonly failure = signal<string | null>(null);

  protected async save(): Promise<void> {
    const v = formToSave(this.form);
    if (!v) return;
    if (v.deliveryFrom > v.deliveryTo) {
      this.form.controls.deliveryTo.setErrors({ server: 'The last delivery month is before the first' });
      this.form.controls.deliveryTo.markAsTouched();
      return;
    }
    const body = { ...v, farmId: v.farmId!, seasonId: v.seasonId!, itemId: v.itemId!, quantity: v.quantity!, price: v.price!, currency: v.currency.trim().toUpperCase(), reference: v.reference.trim() };
    await saveAndClose(() => (this.#c ? this.#api.update(this.#c.id, body, this.#c.version) : this.#api.create(body)), {
      ref: this.#ref,
      saving: this.saving,
      failure: this.failure,
      controls: this.form.controls,
      detailPath: (path) => path.replace(/^body\./, ''),
    });
  }
}
