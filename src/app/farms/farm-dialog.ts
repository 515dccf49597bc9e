import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, Validators } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialog, MatDialogRef } from '@angular/material/dialog';
import type { Observable } from 'rxjs';
import { farmMemberNames, type FarmSummary } from '../../../shared/api-types';
import { farmSchema } from '../../../shared/data-schemas';
import { DataDeskApi, type FarmRow } from '../data-desk/data-desk-api';
import { formToSave, saveAndClose } from '../shared/dialog-save';
import { FORM_DIALOG_IMPORTS } from '../shared/form-dialog';
import { zodValidator } from '../shared/zod-validator';

export interface FarmDialogData {
  farm: FarmSummary | null;
  /** Regions already in use, offered as suggestions. */
  regions: string[];
}

/**
 * Opens the farm dialog: to add a farm (`farm` null) or edit one, suggesting the regions `farms`
 * already use. Emits the saved farm on closing, or undefined when the dialog was cancelled.
 */
export function openFarmDialog(dialog: MatDialog, farm: FarmSummary | null, farms: readonly { region: string }[]): Observable<FarmRow | undefined> {
  const data: FarmDialogData = { farm, regions: [...new Set(farms.map((f) => f.region))].sort() };
  return dialog.open<FarmDialog, FarmDialogData, FarmRow>(FarmDialog, { data, autoFocus: 'first-tabbable' }).afterClosed();
}

/** Adds or edits a farm: code, name, region and the land it farms now. Members are linked under Users. */
@Component({
  selector: 'np-farm-dialog',
  imports: [FORM_DIALOG_IMPORTS],
  template: `
    <h2 mat-dialog-title>{{ farm ? 'Edit ' + farm.name : 'Add a farm' }}</h2>
    <mat-dialog-content>
      <form id="farm-form" [formGroup]="form" (ngSubmit)="save()" novalidate>
        <mat-form-field>
          <mat-label>Farm code</mat-label>
          <input matInput formControlName="code" required autocomplete="off" cdkFocusInitial />
          <mat-hint>The co-op's own code, e.g. F21</mat-hint>
          <mat-error><np-field-error [control]="form.controls.code" required="Enter a code" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Name</mat-label>
          <input matInput formControlName="name" required autocomplete="off" />
          <mat-error><np-field-error [control]="form.controls.name" required="Enter the farm's name" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Region</mat-label>
          <input matInput formControlName="region" required autocomplete="off" list="farm-regions" />
          <datalist id="farm-regions">
            @for (r of data.regions; track r) {
              <option [value]="r"></option>
            }
          </datalist>
          <mat-error><np-field-error [control]="form.controls.region" required="Enter the region" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Land farmed now</mat-label>
          <input matInput type="number" min="0" step="any" formControlName="landHa" required />
          <span matTextSuffix>ha</span>
          <mat-hint>Land per season is kept with the farm's records</mat-hint>
          <mat-error><np-field-error [control]="form.controls.landHa" required="Enter the land in hectares" /></mat-error>
        </mat-form-field>
        <p class="info np-muted">
          Members: {{ memberNames() }}. An administrator links members' accounts to the farm under Users.
        </p>
        @if (failure(); as message) {
          <p class="problem" role="alert">{{ message }}</p>
        }
      </form>
    </mat-dialog-content>
    <np-dialog-actions form="farm-form" [disabled]="saving()">{{ farm ? 'Save changes' : 'Add farm' }}</np-dialog-actions>
  `,
  styleUrl: '../data-desk/reference/ref-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmDialog {
  readonly #api = inject(DataDeskApi);
  readonly #dialogRef = inject<MatDialogRef<FarmDialog, FarmRow>>(MatDialogRef);
  protected readonly data = inject<FarmDialogData>(MAT_DIALOG_DATA);
  protected readonly farm = this.data.farm;
  protected readonly memberNames = () => farmMemberNames(this.farm?.members ?? []);
  protected readonly form = inject(NonNullableFormBuilder).group({
    code: [this.farm?.code ?? '', [Validators.required, zodValidator(farmSchema.shape.code)]],
    name: [this.farm?.name ?? '', [Validators.required, zodValidator(farmSchema.shape.name)]],
    region: [this.farm?.region ?? '', [Validators.required, zodValidator(farmSchema.shape.region)]],
    landHa: [this.farm?.landHa ?? (null as number | null), [Validators.required, zodValidator(farmSchema.shape.landHa)]],
  });
  protected readonly saving = signal(false);
  protected readonly failure = signal<string | null>(null);

  protected async save(): Promise<void> {
    const v = formToSave(this.form);
    if (!v) return;
    const body = { code: v.code.trim(), name: v.name.trim(), region: v.region.trim(), landHa: Number(v.landHa) };
    await saveAndClose(() => this.farm ? this.#api.updateFarm(this.farm.id, body) : this.#api.createFarm(body), {
      ref: this.#dialogRef,
      saving: this.saving,
      failure: this.failure,
      controls: this.form.controls,
      conflict: `A farm with the code “${body.code}” exists already.`,
    });
  }
}
