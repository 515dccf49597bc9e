import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatError, MatFormField, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { emailSchema } from '../../../shared/schemas';
import { safeReturnUrl } from '../core/auth-guards';
import { AuthStore } from '../core/auth-store';
import { PublicFrame } from '../shared/public-frame';
import { zodValidator } from '../shared/zod-validator';
import { FieldError } from '../shared/field-error';
import { runBusy } from '../shared/run-busy';

@Component({
  selector: 'np-sign-in',
  imports: [
    ReactiveFormsModule,
    RouterLink,
    PublicFrame,
    MatFormField,
    MatLabel,
    MatError,
    FieldError,
    MatSuffix,
    MatInput,
    MatIcon,
    MatButton,
    MatIconButton,
    MatProgressBar,
  ],
  templateUrl: './sign-in.html',
  styleUrl: './sign-in.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignIn {
  // services
  readonly #auth = inject(AuthStore);
  readonly #router = inject(Router);

  // inputs
  /** Where to go after signing in (query parameter, set by the guards). */
  readonly returnUrl = input<string>();

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, zodValidator(emailSchema)]],
    password: ['', Validators.required],
  });
  protected readonly submitting = signal(false);
  protected readonly failure = signal<string | null>(null);
  protected readonly passwordVisible = signal(false);
  protected readonly startupProblem = this.#auth.startupProblem;

  protected async signIn(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const { email, password } = this.form.getRawValue();
    await runBusy(
      this.submitting,
      async () => {
        await this.#auth.signIn(email.trim(), password);
        await this.#router.navigateByUrl(safeReturnUrl(this.returnUrl()));
      },
      this.failure,
    );
  }
}
