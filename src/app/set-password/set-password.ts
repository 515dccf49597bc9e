import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import {
  NonNullableFormBuilder,
  ReactiveFormsModule,
  Validators,
  type AbstractControl,
  type ValidationErrors,
} from '@angular/forms';
import { DatePipe } from '@angular/common';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import type { TokenInfo } from '../../../shared/api-types';
import { PASSWORD_MIN_LENGTH } from '../../../shared/schemas';
import { TEXT_MAX } from '../../../shared/field-limits';
import { ApiRequestError, errorMessage, errorStatus } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { PublicFrame } from '../shared/public-frame';
import { FieldError } from '../shared/field-error';
import { runBusy } from '../shared/run-busy';

function passwordsMatch(group: AbstractControl): ValidationErrors | null {
  const password = group.get('password')?.value as string;
  const confirm = group.get('confirm')?.value as string;
  return confirm && password !== confirm ? { mismatch: true } : null;
}

type LinkState = 'loading' | 'ready' | 'unknown' | 'gone' | 'failed';

/** Where an invitation link (`/invite/:token`) or a reset link (`/reset/:token`) lands: choose a password, then go home signed in. */
@Component({
  selector: 'np-set-password',
  imports: [
    ReactiveFormsModule,
    RouterLink,
    DatePipe,
    PublicFrame,
    MatFormField,
    MatLabel,
    MatError,
    FieldError,
    MatHint,
    MatSuffix,
    MatInput,
    MatIcon,
    MatButton,
    MatIconButton,
    MatProgressBar,
  ],
  templateUrl: './set-password.html',
  styleUrl: '../sign-in/sign-in.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SetPassword {
  // services
  readonly #auth = inject(AuthStore);
  readonly #router = inject(Router);

  // inputs (route parameter and route data)
  readonly token = input.required<string>();
  readonly purpose = input<'invite' | 'reset'>('reset');

  protected readonly minLength = PASSWORD_MIN_LENGTH;
  protected readonly link = httpResource<TokenInfo>(() => `/api/auth/tokens/${encodeURIComponent(this.token())}`);
  /** Set when the link stopped working between opening the page and sending the password. */
  readonly #goneOnSubmit = signal(false);

  protected readonly state = computed<LinkState>(() => {
    if (this.#goneOnSubmit()) return 'gone';
    if (this.link.isLoading()) return 'loading';
    if (this.link.hasValue()) return 'ready';
    const status = errorStatus(this.link.error());
    // 400: the server rejects a malformed token before looking it up; to the person it is the same bad link.
    if (status === 404 || status === 400) return 'unknown';
    if (status === 410) return 'gone';
    return 'failed';
  });
  protected readonly info = computed(() => (this.link.hasValue() ? this.link.value() : null));
  protected readonly isInvite = computed(() => (this.info()?.purpose ?? this.purpose()) === 'invite');
  protected readonly heading = computed(() => {
    const state = this.state();
    if (state === 'unknown' || state === 'gone') return 'This link cannot be used';
    return this.isInvite() ? 'Welcome to Netput' : 'Choose a new password';
  });
  protected readonly signedIn = this.#auth.signedIn;
  protected readonly loadProblem = computed(() => errorMessage(this.link.error()));

  protected readonly form = inject(NonNullableFormBuilder).group(
    {
      password: ['', [Validators.required, Validators.minLength(PASSWORD_MIN_LENGTH), Validators.maxLength(TEXT_MAX.password)]],
      confirm: ['', Validators.required],
    },
    { validators: passwordsMatch },
  );
  protected readonly submitting = signal(false);
  protected readonly failure = signal<string | null>(null);
  protected readonly passwordVisible = signal(false);

  protected async savePassword(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.failure.set(null);
    await runBusy(
      this.submitting,
      async () => {
        await this.#auth.setPasswordWithToken(this.token(), this.form.controls.password.value);
        await this.#router.navigateByUrl('/', { replaceUrl: true });
      },
      (error) => {
        if (error instanceof ApiRequestError && error.status === 410) {
          this.#goneOnSubmit.set(true);
        } else if (error instanceof ApiRequestError && error.detailFor('password')) {
          this.form.controls.password.setErrors({ server: error.detailFor('password') });
        } else {
          this.failure.set(errorMessage(error));
        }
      },
    );
  }
}
