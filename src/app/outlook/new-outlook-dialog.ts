import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, Validators } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { MatOption, MatSelect } from '@angular/material/select';
import { seasonLabelSchema } from '../../../shared/outlook-schemas';
import { zodValidator } from '../shared/zod-validator';
import { OutlookApi } from './outlook-api';
import type { OutlookDraft } from './outlook-api-types';
import { FORM_DIALOG_IMPORTS } from '../shared/form-dialog';
import { saveAndClose } from '../shared/dialog-save';

export interface RunChoice {
  id: number;
  label: string;
}

export interface NewOutlookDialogData {
  /** Suggested season label (the one after the latest recorded). */
  season: string;
  runs: RunChoice[];
  /** Seasons that already have an outlook. */
  taken: string[];
  /** The run the back-test favours, and why; chosen at the start. */
  favoured: { runId: number; reason: string } | null;
}

/** Opens the draft outlook of a season with a finished model run. */
@Component({
  selector: 'np-new-outlook-dialog',
  imports: [FORM_DIALOG_IMPORTS, MatSelect, MatOption],
  template: `
    <h2 mat-dialog-title>Open a season outlook</h2>
    <mat-dialog-content>
      <form id="new-outlook" class="form" [formGroup]="form" (ngSubmit)="save()" novalidate aria-label="Open a season outlook">
        <mat-form-field>
          <mat-label>Season</mat-label>
          <input matInput formControlName="season" required autocomplete="off" cdkFocusInitial />
          <mat-hint>e.g. 2026/27; a season not recorded yet is added</mat-hint>
          <mat-error><np-field-error [control]="form.controls.season" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Title</mat-label>
          <input matInput formControlName="title" autocomplete="off" [placeholder]="'Season outlook ' + form.controls.season.value" />
          <mat-hint>Optional</mat-hint>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Model run</mat-label>
          <mat-select formControlName="modelRunId">
            @for (r of data.runs; track r.id) {
              <mat-option [value]="r.id">{{ r.label }}{{ data.favoured?.runId === r.id ? ' · favoured by the back-test' : '' }}</mat-option>
            }
          </mat-select>
          <mat-hint>{{ data.runs.length ? 'Each item of the model starts at last season’s price' : 'No model run has finished yet: fit one under Models first' }}</mat-hint>
          <mat-error><np-field-error [control]="form.controls.modelRunId" required="Choose a finished model run" /></mat-error>
        </mat-form-field>
        @if (data.favoured; as f) {
          <p class="favoured">{{ f.reason }}</p>
        }
        @if (failure(); as message) {
          <p class="np-error-text" role="alert">{{ message }}</p>
        }
      </form>
    </mat-dialog-content>
    <np-dialog-actions form="new-outlook" [disabled]="saving()">Open the draft</np-dialog-actions>
  `,
  styles: `
    .form {
      display: flex;
      flex-direction: column;
      gap: 12px;
      min-width: min(420px, 80vw);
      padding-top: 4px;
    }
    .favoured {
      margin: 0;
      max-width: 60ch;
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NewOutlookDialog {
  // services
  readonly #api = inject(OutlookApi);
  readonly #ref = inject<MatDialogRef<NewOutlookDialog, OutlookDraft>>(MatDialogRef);
  protected readonly data = inject<NewOutlookDialogData>(MAT_DIALOG_DATA);

  protected readonly form = inject(NonNullableFormBuilder).group({
    season: [this.data.season, [zodValidator(seasonLabelSchema)]],
    title: [''],
    // The run the back-test favours, else the newest.
    modelRunId: [(this.data.runs.find((r) => r.id === this.data.favoured?.runId)?.id ?? this.data.runs[0]?.id ?? null) as number | null, [Validators.required]],
  });
  protected readonly saving = signal(false);
  protected readonly failure = signal<string | null>(null);

  protected async save(): Promise<void> {
    this.form.markAllAsTouched();
    const v = this.form.getRawValue();
    if (this.data.taken.includes(v.season.trim())) {
      this.form.controls.season.setErrors({ server: `An outlook for ${v.season.trim()} exists already; open it from the list` });
      return;
    }
    if (this.form.invalid) return;
    await saveAndClose(() => this.#api.create({ season: v.season.trim(), modelRunId: v.modelRunId, ...(v.title.trim() ? { title: v.title.trim() } : {}) }), {
      ref: this.#ref,
      saving: this.saving,
      failure: this.failure,
      controls: this.form.controls,
    });
  }
}
