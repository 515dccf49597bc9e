import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, Validators } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { MatOption, MatSelect } from '@angular/material/select';
import type { DeliveryPoint } from '../../../../shared/api-types';
import { deliveryPointSchema } from '../../../../shared/data-schemas';
import { formToSave, saveAndClose } from '../../shared/dialog-save';
import { FORM_DIALOG_IMPORTS } from '../../shared/form-dialog';
import { zodValidator } from '../../shared/zod-validator';
import { DataDeskApi } from '../data-desk-api';

/** Adds or edits a delivery point (an elevator, a store, a depot) or a price region. */
@Component({
  selector: 'np-delivery-point-dialog',
  imports: [FORM_DIALOG_IMPORTS, MatSelect, MatOption],
  template: `
    <h2 mat-dialog-title>{{ point ? 'Edit ' + point.name : 'Add a delivery point or region' }}</h2>
    <mat-dialog-content>
      <form id="point-form" [formGroup]="form" (ngSubmit)="save()" novalidate>
        <mat-form-field class="wide">
          <mat-label>Name</mat-label>
          <input matInput formControlName="name" required autocomplete="off" cdkFocusInitial />
          <mat-hint>As files and price sheets name it, e.g. Ashby elevator</mat-hint>
          <mat-error><np-field-error [control]="form.controls.name" required="Enter a name" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Kind</mat-label>
          <mat-select formControlName="kind" required>
            <mat-option value="delivery point">Delivery point</mat-option>
            <mat-option value="region">Price region</mat-option>
          </mat-select>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Region</mat-label>
          <input matInput formControlName="region" required autocomplete="off" />
          <mat-error><np-field-error [control]="form.controls.region" required="Enter the region" /></mat-error>
        </mat-form-field>
        @if (failure(); as message) {
          <p class="problem" role="alert">{{ message }}</p>
        }
      </form>
    </mat-dialog-content>
    <np-dialog-actions form="point-form" [disabled]="saving()">{{ point ? 'Save changes' : 'Add' }}</np-dialog-actions>
  `,
  styleUrl: './ref-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeliveryPointDialog {
  readonly #api = inject(DataDeskApi);
  readonly #dialogRef = inject<MatDialogRef<DeliveryPointDialog, DeliveryPoint>>(MatDialogRef);
  protected readonly point = inject<DeliveryPoint | null>(MAT_DIALOG_DATA);
  protected readonly form = inject(NonNullableFormBuilder).group({
    name: [this.point?.name ?? '', [Validators.required, zodValidator(deliveryPointSchema.shape.name)]],
    kind: [this.point?.kind ?? ('delivery point' as DeliveryPoint['kind']), Validators.required],
    region: [this.point?.region ?? '', [Validators.required, zodValidator(deliveryPointSchema.shape.region)]],
  });
  protected readonly saving = signal(false);
  protected readonly failure = signal<string | null>(null);

  protected async save(): Promise<void> {
    const v = formToSave(this.form);
    if (!v) return;
    const body = { name: v.name.trim(), kind: v.kind, region: v.region.trim() };
    await saveAndClose(() => this.point ? this.#api.updateDeliveryPoint(this.point.id, body) : this.#api.createDeliveryPoint(body), {
      ref: this.#dialogRef,
      saving: this.saving,
      failure: this.failure,
      controls: this.form.controls,
      conflict: `A delivery point named “${body.name}” exists already.`,
    });
  }
}
