import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, Validators, type AbstractControl, type ValidationErrors } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { MatOption, MatSelect } from '@angular/material/select';
import type { Item } from '../../../../shared/api-types';
import { GRADE_FIELDS } from '../../../../shared/budget-types';
import { itemSchema } from '../../../../shared/data-schemas';
import { TEXT_MAX } from '../../../../shared/field-limits';
import { saveAndClose } from '../../shared/dialog-save';
import { FORM_DIALOG_IMPORTS } from '../../shared/form-dialog';
import { zodValidator } from '../../shared/zod-validator';
import { DataDeskApi, type ItemBody } from '../data-desk-api';

export const CATEGORIES: { value: Item['category']; label: string }[] = [
  { value: 'grain', label: 'Grain' },
  { value: 'oilseed', label: 'Oilseed' },
  { value: 'fertiliser', label: 'Fertiliser' },
  { value: 'fuel', label: 'Fuel' },
  { value: 'labour', label: 'Labour' },
  { value: 'other', label: 'Other' },
];

/** N + P2O5 + K2O of a fertiliser cannot pass 100 % by weight. */
function analysisTotal(group: AbstractControl): ValidationErrors | null {
  const v = group.value as { nPct: number | null; p2o5Pct: number | null; k2oPct: number | null };
  const total = (v.nPct ?? 0) + (v.p2o5Pct ?? 0) + (v.k2oPct ?? 0);
  return total > 100 ? { analysisTotal: `N + P2O5 + K2O come to ${total} %, more than 100 %` } : null;
}

const shape = itemSchema.shape;

/** Adds or edits an item of the catalogue: an output or input with its unit, and a fertiliser's analysis. */
@Component({
  selector: 'np-item-dialog',
  imports: [FORM_DIALOG_IMPORTS, MatSelect, MatOption],
  templateUrl: './item-dialog.html',
  styleUrl: './ref-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ItemDialog {
  readonly #api = inject(DataDeskApi);
  readonly #dialogRef = inject<MatDialogRef<ItemDialog, Item>>(MatDialogRef);
  protected readonly item = inject<Item | null>(MAT_DIALOG_DATA);
  protected readonly categories = CATEGORIES;
  protected readonly textMax = TEXT_MAX;
  protected readonly nutrients = GRADE_FIELDS;

  protected readonly form = inject(NonNullableFormBuilder).group({
    code: [this.item?.code ?? '', [Validators.required, zodValidator(shape.code)]],
    name: [this.item?.name ?? '', [Validators.required, zodValidator(shape.name)]],
    role: [this.item?.role ?? ('output' as Item['role']), Validators.required],
    category: [this.item?.category ?? ('grain' as Item['category']), Validators.required],
    unit: [this.item?.unit ?? '', [Validators.required, zodValidator(shape.unit)]],
    analysis: inject(NonNullableFormBuilder).group(
      {
        nPct: [this.item?.nPct ?? (null as number | null), zodValidator(shape.nPct)],
        p2o5Pct: [this.item?.p2o5Pct ?? (null as number | null), zodValidator(shape.p2o5Pct)],
        k2oPct: [this.item?.k2oPct ?? (null as number | null), zodValidator(shape.k2oPct)],
      },
      { validators: analysisTotal },
    ),
  });
  readonly #category = toSignal(this.form.controls.category.valueChanges, { initialValue: this.form.controls.category.value });
  protected readonly isFertiliser = computed(() => this.#category() === 'fertiliser');
  protected readonly saving = signal(false);
  protected readonly failure = signal<string | null>(null);

  constructor() {
    // Only fertilisers have an analysis: the fields are checked only while they are shown.
    const sync = (category: Item['category']) => {
      const group = this.form.controls.analysis;
      if (category === 'fertiliser') group.enable({ emitEvent: false });
      else group.disable({ emitEvent: false });
    };
    sync(this.form.controls.category.value);
    this.form.controls.category.valueChanges.pipe(takeUntilDestroyed()).subscribe((category) => {
      sync(category);
      // Fertiliser, fuel and labour are bought; grain and oilseed are sold: follow that until the planner chooses.
      const role = this.form.controls.role;
      if (role.pristine && category !== 'other') role.setValue(category === 'grain' || category === 'oilseed' ? 'output' : 'input');
    });
  }

  protected async save(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const v = this.form.getRawValue();
    const fert = v.category === 'fertiliser';
    const body: ItemBody = {
      code: v.code.trim(),
      name: v.name.trim(),
      role: v.role,
      category: v.category,
      unit: v.unit.trim(),
      nPct: fert ? v.analysis.nPct : null,
      p2o5Pct: fert ? v.analysis.p2o5Pct : null,
      k2oPct: fert ? v.analysis.k2oPct : null,
    };
    await saveAndClose(() => this.item ? this.#api.updateItem(this.item.id, body) : this.#api.createItem(body), {
      ref: this.#dialogRef,
      saving: this.saving,
      failure: this.failure,
      controls: { ...this.form.controls, ...this.form.controls.analysis.controls },
      conflict: `An item with the code “${body.code}” exists already.`,
    });
  }
}
