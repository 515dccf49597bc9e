import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatSlideToggle } from '@angular/material/slide-toggle';
import { errorMessage } from '../core/api-error';
import { OutlookApi } from '../outlook/outlook-api';
import { runBusy } from '../shared/run-busy';

export interface MailPreferences {
  email: string;
  outlookEmails: boolean;
}

/** A member's choice to receive (or not) the personal e-mail sent with each published outlook. */
@Component({
  selector: 'np-mail-preferences',
  imports: [MatSlideToggle],
  template: `
    <section class="prefs" aria-labelledby="mail-heading">
      <h2 id="mail-heading">E-mails</h2>
      @if (prefs.hasValue()) {
        <mat-slide-toggle [checked]="on()" [disabled]="saving()" (change)="save($event.checked)">
          E-mail me the season outlook with my farm's figures when the co-op publishes one
        </mat-slide-toggle>
        <p class="np-muted" role="status">
          {{ on() ? 'Outlook e-mails go to ' + prefs.value().email + '.' : 'You get no outlook e-mails; published outlooks stay readable under Season outlook.' }}
        </p>
      } @else if (prefs.isLoading()) {
        <p class="np-muted">Loading your mail preferences…</p>
      }
      @if (loadProblem() ?? failure(); as f) {
        <p class="np-error-text" role="alert">{{ f }}</p>
      }
    </section>
  `,
  styles: `
    .prefs {
      display: flex;
      flex-direction: column;
      gap: 8px;
    }
    h2 {
      font: var(--mat-sys-title-large);
      margin: 0;
    }
    p {
      margin: 0;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MailPreferencesToggle {
  readonly #api = inject(OutlookApi);

  protected readonly prefs = httpResource<MailPreferences>(() => '/api/account/mail-preferences');
  protected readonly on = computed(() => (this.prefs.hasValue() ? this.prefs.value().outlookEmails : false));
  protected readonly saving = signal(false);
  protected readonly loadProblem = computed(() => (this.prefs.error() ? `Your mail preferences could not be loaded: ${errorMessage(this.prefs.error())}` : null));
  protected readonly failure = signal<string | null>(null);

  protected async save(outlookEmails: boolean): Promise<void> {
    this.failure.set(null);
    await runBusy(
      this.saving,
      async () => this.prefs.set(await this.#api.setMailPreferences(outlookEmails)),
      (error) => {
        this.failure.set(`Your choice was not saved: ${errorMessage(error)}`);
        this.prefs.reload();
      },
    );
  }
}
