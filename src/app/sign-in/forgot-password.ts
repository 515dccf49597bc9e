import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { RouterLink } from '@angular/router';
import { emailSchema } from '../../../shared/schemas';
import { AuthStore } from '../core/auth-store';
import { PublicFrame } from '../shared/public-frame';
import { zodValidator } from '../shared/zod-validator';
import { FieldError } from '../shared/field-error';
import { runBusy } from '../shared/run-busy';

@Component({
  selector: 'np-forgot-password',
  imports: [ReactiveFormsModule, RouterLink, PublicFrame, MatFormField, MatLabel, MatError, FieldError, MatInput, MatButton],
  template: `
    <np-public-frame heading="Forgot your password?">
      @if (sentTo(); as email) {
        <p class="sent" role="status">
          If an account exists for {{ email }}, we have sent it a link to choose a new password. The link
          works once and expires; check the spam folder if nothing arrives within a few minutes.
        </p>
      } @else {
        <p class="intro">Enter the e-mail address you sign in with and we will send a link to choose a new password.</p>
        <form [formGroup]="form" (ngSubmit)="requestLink()" novalidate>
          <mat-form-field>
            <mat-label>E-mail</mat-label>
            <input matInput formControlName="email" type="email" autocomplete="username" required />
            <mat-error><np-field-error [control]="form.controls.email" required="Enter your e-mail address" /></mat-error>
          </mat-form-field>
          @if (failure(); as message) {
            <p class="problem" role="alert">{{ message }}</p>
          }
          <button matButton="filled" type="submit" class="submit" [disabled]="submitting()">Send the link</button>
        </form>
      }
      <p class="links"><a routerLink="/sign-in">Back to sign-in</a></p>
    </np-public-frame>
  `,
  styleUrl: './sign-in.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ForgotPassword {
  readonly #auth = inject(AuthStore);

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, zodValidator(emailSchema)]],
  });
  protected readonly submitting = signal(false);
  protected readonly failure = signal<string | null>(null);
  protected readonly sentTo = signal<string | null>(null);

  protected async requestLink(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const email = this.form.controls.email.value.trim();
    await runBusy(
      this.submitting,
      async () => {
        await this.#auth.requestPasswordReset(email);
        this.sentTo.set(email);
      },
      this.failure,
    );
  }
}
