import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { type AbstractControl, NonNullableFormBuilder, type ValidationErrors, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatCheckbox } from '@angular/material/checkbox';
import { MAT_DIALOG_DATA, MatDialog, MatDialogActions, MatDialogClose, MatDialogRef } from '@angular/material/dialog';
import { MatOption, MatSelect } from '@angular/material/select';
import { firstValueFrom } from 'rxjs';
import type { UnitSystem } from '../../../shared/units';
import { TEXT_MAX } from '../../../shared/field-limits';
import { errorMessage } from '../core/api-error';
import { formToSave, saveAndClose } from '../shared/dialog-save';
import { ConfirmDialog, type ConfirmDialogData } from '../shared/confirm-dialog';
import { BudgetApi } from './budget-api';
import { GRADE_FIELDS, type FertiliserProduct, type FertiliserProductInput, type ProductForm } from './budget-api-types';
import { pricePerTFromShown, pricePerTToShown, productFromShown, productToShown, unitLabels } from './budget-units';
import { FORM_DIALOG_IMPORTS } from '../shared/form-dialog';

export interface ProductDialogData {
  /** The product to change; absent when adding one. */
  product?: FertiliserProduct;
  currency: string;
  system: UnitSystem;
}

/** A grade carries at least one nutrient and at most 100 % in all (the server's rule, said the same way). */
function gradeValidator(group: AbstractControl): ValidationErrors | null {
  const v = group.value as { nPct: number | null; p2o5Pct: number | null; k2oPct: number | null };
  const sum = (v.nPct ?? 0) + (v.p2o5Pct ?? 0) + (v.k2oPct ?? 0);
  if (sum <= 0) return { grade: 'A fertiliser product carries at least one of N, P2O5, K2O' };
  if (sum > 100) return { grade: `N + P2O5 + K2O add up to ${+sum.toFixed(3)} %, more than 100 %` };
  return null;
}

/** Adds a fertiliser product or changes one (prices and lots typed in the units shown). Closes with the saved product, or 'deleted'. */
@Component({
  selector: 'np-product-dialog',
  imports: [FORM_DIALOG_IMPORTS, MatDialogActions, MatDialogClose, MatSelect, MatOption, MatCheckbox, MatButton],
  templateUrl: './product-dialog.html',
  styleUrl: './product-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProductDialog {
  // services
  readonly #api = inject(BudgetApi);
  readonly #dialog = inject(MatDialog);
  readonly #dialogRef = inject<MatDialogRef<ProductDialog, FertiliserProduct | 'deleted'>>(MatDialogRef);
  protected readonly data = inject<ProductDialogData>(MAT_DIALOG_DATA);

  protected readonly editing = this.data.product !== undefined;
  protected readonly labels = unitLabels(this.data.system, this.data.product?.currency ?? this.data.currency);
  protected readonly nutrients = GRADE_FIELDS;
  protected readonly forms: { value: ProductForm; label: string }[] = [
    { value: 'solid', label: 'Solid (granular, prilled)' },
    { value: 'liquid', label: 'Liquid (solution)' },
    { value: 'gas', label: 'Gas (pressurised, e.g. anhydrous ammonia)' },
  ];

  readonly #fb = inject(NonNullableFormBuilder);
  protected readonly form = this.#fb.group({
    name: [this.data.product?.name ?? '', [Validators.required, Validators.maxLength(TEXT_MAX.name)]],
    grade: this.#fb.group(
      {
        nPct: this.#fb.control<number | null>(this.data.product?.nPct ?? 0, [Validators.min(0), Validators.max(100)]),
        p2o5Pct: this.#fb.control<number | null>(this.data.product?.p2o5Pct ?? 0, [Validators.min(0), Validators.max(100)]),
        k2oPct: this.#fb.control<number | null>(this.data.product?.k2oPct ?? 0, [Validators.min(0), Validators.max(100)]),
      },
      { validators: gradeValidator },
    ),
    form: [this.data.product?.form ?? ('solid' as ProductForm), Validators.required],
    price: this.#fb.control<number | null>(this.data.product ? round(pricePerTToShown(this.data.product.pricePerT, this.data.system)) : null, [Validators.required, Validators.min(0.000001)]),
    lot: this.#fb.control<number | null>(this.data.product ? round(productToShown(this.data.product.lotT, this.data.system)) : null, [Validators.required, Validators.min(0.000001)]),
    supplier: [this.data.product?.supplier ?? '', Validators.maxLength(TEXT_MAX.name)],
    gradeSource: [this.data.product?.gradeSource ?? '', Validators.maxLength(TEXT_MAX.productNote)],
    priceNote: [this.data.product?.priceNote ?? '', Validators.maxLength(TEXT_MAX.productNote)],
    active: [this.data.product?.active ?? true],
  });
  protected readonly saving = signal(false);
  protected readonly failure = signal<string | null>(null);

  protected async save(): Promise<void> {
    const v = formToSave(this.form);
    if (!v) return;
    const p = this.data.product;
    // An untouched price or lot keeps its stored metric value exactly (no round trip through the units shown).
    const pricePerT = p && this.form.controls.price.pristine ? p.pricePerT : pricePerTFromShown(v.price!, this.data.system);
    const lotT = p && this.form.controls.lot.pristine ? p.lotT : productFromShown(v.lot!, this.data.system);
    const body: FertiliserProductInput = {
      name: v.name.trim(),
      nPct: v.grade.nPct ?? 0,
      p2o5Pct: v.grade.p2o5Pct ?? 0,
      k2oPct: v.grade.k2oPct ?? 0,
      form: v.form,
      pricePerT,
      currency: p?.currency ?? this.data.currency,
      lotT,
      supplier: v.supplier.trim(),
      gradeSource: v.gradeSource.trim(),
      priceNote: v.priceNote.trim(),
      active: v.active,
    };
    const c = this.form.controls;
    const g = c.grade.controls;
    await saveAndClose(() => (p ? this.#api.updateProduct(p.id, body) : this.#api.createProduct(body)), {
      ref: this.#dialogRef,
      saving: this.saving,
      failure: this.failure,
      controls: { name: c.name, nPct: g.nPct, p2o5Pct: g.p2o5Pct, k2oPct: g.k2oPct, form: c.form, pricePerT: c.price, lotT: c.lot, supplier: c.supplier, gradeSource: c.gradeSource, priceNote: c.priceNote },
      conflictControl: c.name,
    });
  }

  protected async remove(): Promise<void> {
    const p = this.data.product;
    if (!p) return;
    const data: ConfirmDialogData = {
      title: `Delete ${p.name}?`,
      message: 'Saved budgets keep their own copy of the product and do not change. New budgets can no longer choose it. To keep it on the list but out of new budgets, untick "Plan with this product" instead.',
      confirmLabel: 'Delete product',
      destructive: true,
    };
    if (!(await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed()))) return;
    this.saving.set(true);
    try {
      await this.#api.removeProduct(p.id);
      this.#dialogRef.close('deleted');
    } catch (error) {
      this.failure.set(errorMessage(error));
    } finally {
      this.saving.set(false);
    }
  }

  /** The server names fields as body.nPct, body.pricePerT...; put each message on its control. */}

function round(v: number): number {
  return Math.round(v * 1e6) / 1e6;
}
