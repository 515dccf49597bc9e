import type { AbstractControl, ValidationErrors, ValidatorFn } from '@angular/forms';
import type { ZodType } from 'zod';
import { fieldOfDetail } from '../core/api-error';

/**
 * A form validator that applies one of the shared zod schemas (the same ones the server parses
 * with), so the form and the server say the same thing in the same words. The message lands in
 * the `schema` error key.
 */
export function zodValidator(schema: ZodType): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const result = schema.safeParse(control.value);
    return result.success ? null : { schema: result.error.issues[0]?.message ?? 'Not valid' };
  };
}

/** Puts the server's field messages (`details[].path`) onto the matching controls; returns whether any matched. */
export function applyServerDetails(
  controls: Record<string, AbstractControl>,
  details: readonly { path: string; message: string }[] | undefined,
): boolean {
  let matched = false;
  for (const detail of details ?? []) {
    const control = controls[fieldOfDetail(detail.path)];
    if (control) {
      control.setErrors({ ...control.errors, server: detail.message });
      control.markAsTouched();
      matched = true;
    }
  }
  return matched;
}
