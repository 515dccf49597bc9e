import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatCard, MatCardContent } from '@angular/material/card';
import { MatIcon } from '@angular/material/icon';
import type { FarmSummary } from '../../../shared/api-types';
import { ROLE_LABELS } from '../../../shared/roles';
import { AuthStore } from '../core/auth-store';
import { MailPreferencesToggle } from '../my-farm/mail-preferences';
import { runBusy } from '../shared/run-busy';

const ROLE_DESCRIPTIONS = {
  admin: 'You invite people, set their roles and keep the co-op settings.',
  planner: 'You keep prices and farm records, fit models and publish outlooks.',
  treasurer: 'You plan purchases and cash from the outlooks, and read the models.',
  member: "You read the co-op's published outlooks and your own farm's records.",
} as const;

/** `/account`: who you are signed in as, and a way to change your password. */
@Component({
  selector: 'np-account',
  imports: [MatCard, MatCardContent, MatButton, MatIcon, MailPreferencesToggle],
  templateUrl: './account.html',
  styleUrl: './account.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Account {
  readonly #auth = inject(AuthStore);

  protected readonly user = this.#auth.user;
  protected readonly roleLabel = computed(() => {
    const role = this.#auth.role();
    return role ? ROLE_LABELS[role] : '';
  });
  protected readonly roleDescription = computed(() => {
    const role = this.#auth.role();
    return role ? ROLE_DESCRIPTIONS[role] : '';
  });
  /** A member's own farm (the server answers members with their farm only). */
  protected readonly farms = httpResource<FarmSummary[]>(() =>
    this.#auth.user()?.farmId != null ? '/api/farms' : undefined,
  );
  protected readonly farm = computed(() => {
    const farmId = this.#auth.user()?.farmId;
    return this.farms.hasValue() ? (this.farms.value().find((f) => f.id === farmId) ?? null) : null;
  });

  /** Members choose whether the outlook e-mails reach them. */
  protected readonly isMember = computed(() => this.#auth.role() === 'member');

  protected readonly sending = signal(false);
  protected readonly sent = signal(false);
  protected readonly failure = signal<string | null>(null);

  protected async requestPasswordLink(): Promise<void> {
    const email = this.user()?.email;
    if (!email) return;
    await runBusy(
      this.sending,
      async () => {
        await this.#auth.requestPasswordReset(email);
        this.sent.set(true);
      },
      this.failure,
    );
  }
}
