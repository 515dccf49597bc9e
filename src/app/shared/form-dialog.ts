import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatDialogActions, MatDialogClose, MatDialogContent, MatDialogTitle } from '@angular/material/dialog';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { FieldError } from './field-error';

/**
 * The foot of a form dialog: Cancel, and the submit button of the dialog's form (named by its id,
 * since the form sits in the dialog's content). The button's words are the content:
 * `<np-dialog-actions form="farm-form" [disabled]="saving()">Add farm</np-dialog-actions>`.
 */
@Component({
  selector: 'np-dialog-actions',
  imports: [MatDialogActions, MatDialogClose, MatButton],
  template: `
    <mat-dialog-actions align="end">
      <button matButton type="button" mat-dialog-close>Cancel</button>
      <button matButton="filled" type="submit" [attr.form]="form()" [disabled]="disabled()"><ng-content /></button>
    </mat-dialog-actions>
  `,
  styles: `
    :host {
      display: contents;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DialogActions {
  /** The id of the form the submit button sends. */
  readonly form = input.required<string>();
  /** True while saving (or while the form cannot be sent). */
  readonly disabled = input(false);
}

/** What a form dialog's template uses: the dialog parts, a form field with its hint and error, and the foot. */
export const FORM_DIALOG_IMPORTS = [
  ReactiveFormsModule,
  MatDialogTitle,
  MatDialogContent,
  MatFormField,
  MatLabel,
  MatHint,
  MatError,
  MatSuffix,
  MatInput,
  FieldError,
  DialogActions,
] as const;
