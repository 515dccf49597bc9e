import { ChangeDetectionStrategy, Component, computed, effect, input, signal } from '@angular/core';
import type { AbstractControl, ValidationErrors } from '@angular/forms';

/** A field's own words for the errors that depend on what the field is (the rest have one wording everywhere). */
export interface FieldErrorWords {
  required?: string;
  min?: string;
  max?: string;
  minlength?: string;
  maxlength?: string;
  pattern?: string;
}

/** The keys said first, in this order; any other key (a zod `schema` message, a group's own check) follows, and `server` comes last. */
const FIRST = ['required', 'minlength', 'maxlength', 'min', 'max', 'email', 'pattern'] as const;

/**
 * One message for a control's errors, in plain words: the field's own wording where it gives one,
 * otherwise the number the validator carries ("Use at most 120 characters"). Errors that carry
 * their message as a string — `schema` (the shared zod schemas, see zod-validator.ts), `server`
 * (the server's field message, see dialog-save.ts) or a form's own check — are said as they are.
 * Returns null when the control has no error.
 */
export function fieldErrorMessage(errors: ValidationErrors | null | undefined, words: FieldErrorWords = {}): string | null {
  if (!errors) return null;
  const keys = Object.keys(errors);
  if (keys.length === 0) return null;
  const ordered = [...FIRST.filter((k) => k in errors), ...keys.filter((k) => !(FIRST as readonly string[]).includes(k) && k !== 'server'), ...keys.filter((k) => k === 'server')];
  const key = ordered[0];
  const own = (words as Record<string, string | undefined>)[key];
  if (own) return own;
  const error = errors[key] as unknown;
  switch (key) {
    case 'required':
      return 'Fill in this field';
    case 'minlength':
      return `Use at least ${(error as { requiredLength: number }).requiredLength} characters`;
    case 'maxlength':
      return `Use at most ${(error as { requiredLength: number }).requiredLength} characters`;
    case 'min':
      return `Use ${(error as { min: number }).min} or more`;
    case 'max':
      return `Use ${(error as { max: number }).max} or less`;
    case 'email':
      return 'Enter an e-mail address such as name@example.org';
    case 'pattern':
      return 'This is not in the expected form';
  }
  return typeof error === 'string' && error.trim() !== '' ? error : 'Check this value';
}

/**
 * The message under a form field: `<mat-error><np-field-error [control]="form.controls.name" required="Name the model" /></mat-error>`.
 * Material shows the `mat-error` only while the control is invalid and touched; this component
 * says which error in the words of {@link fieldErrorMessage}, and follows the control's changes
 * (typing, server messages set after a save) on its own.
 */
@Component({
  selector: 'np-field-error',
  template: '{{ message() }}',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FieldError {
  readonly control = input.required<AbstractControl>();
  readonly required = input<string>();
  readonly min = input<string>();
  readonly max = input<string>();
  readonly minlength = input<string>();
  readonly maxlength = input<string>();
  readonly pattern = input<string>();

  /** Counts the control's events: errors are not a signal, so the message is read again on each. */
  readonly #changes = signal(0);
  protected readonly message = computed(() => {
    this.#changes();
    const words: FieldErrorWords = { required: this.required(), min: this.min(), max: this.max(), minlength: this.minlength(), maxlength: this.maxlength(), pattern: this.pattern() };
    return fieldErrorMessage(this.control().errors, words);
  });

  constructor() {
    effect((onCleanup) => {
      const subscription = this.control().events.subscribe(() => this.#changes.update((n) => n + 1));
      onCleanup(() => subscription.unsubscribe());
    });
  }
}
