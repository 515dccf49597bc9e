import type { WritableSignal } from '@angular/core';
import type { AbstractControl, FormGroup } from '@angular/forms';
import type { MatDialogRef } from '@angular/material/dialog';
import { ApiRequestError, errorMessage } from '../core/api-error';
import { runBusy } from './run-busy';
import { applyServerDetails } from './zod-validator';

/** What a form dialog hands to {@link saveAndClose}. */
export interface DialogSave<T> {
  ref: MatDialogRef<unknown, T>;
  /** True while the request is out (the dialog disables its save button). */
  saving: WritableSignal<boolean>;
  /** The dialog's message line for problems no field owns. */
  failure: WritableSignal<string | null>;
  /** The controls the server's field messages (`details[].path`) land on. */
  controls: Record<string, AbstractControl>;
  /** Said instead of the server's own words when it answers 409 (the record exists already). */
  conflict?: string;
  /** When the server answers 409, its words go onto this control instead (e.g. the name already taken). */
  conflictControl?: AbstractControl;
  /** Rewrites a detail's path before it is matched to a control (e.g. drops `body.rows.0.`). */
  detailPath?: (path: string) => string;
}

/**
 * Sends a dialog's request and closes the dialog with the saved record; on failure the server's
 * field messages go onto their controls, anything else to the dialog's message line, and the dialog
 * stays open with what the person typed.
 */
export async function saveAndClose<T>(request: () => Promise<T>, o: DialogSave<T>): Promise<void> {
  o.failure.set(null);
  await runBusy(
    o.saving,
    async () => o.ref.close(await request()),
    (error) => {
      if (o.conflictControl && error instanceof ApiRequestError && error.status === 409) {
        o.conflictControl.setErrors({ server: error.message });
        return;
      }
      const details = error instanceof ApiRequestError ? error.error.details : undefined;
      const mapped = o.detailPath ? details?.map((d) => ({ ...d, path: o.detailPath!(d.path) })) : details;
      if (!applyServerDetails(o.controls, mapped)) {
        o.failure.set(o.conflict && error instanceof ApiRequestError && error.status === 409 ? o.conflict : errorMessage(error));
      }
    },
  );
}

/** The form's value to save, or null while the form is invalid (then every field shows its problem). */
export function formToSave<F extends FormGroup>(form: F): ReturnType<F['getRawValue']> | null {
  if (form.invalid) {
    form.markAllAsTouched();
    return null;
  }
  return form.getRawValue();
}
