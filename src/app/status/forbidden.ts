import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { ROLE_LABELS } from '../../../shared/roles';
import { AuthStore } from '../core/auth-store';

@Component({
  selector: 'np-forbidden',
  imports: [RouterLink, MatButton, MatIcon],
  template: `
    <div class="np-page status">
      <mat-icon aria-hidden="true" class="big">lock</mat-icon>
      <h1>Your role cannot open this page</h1>
      <p>
        You are signed in as {{ roleLabel() }}. If you need this page for your work, ask the co-op's
        administrator to change your role.
      </p>
      <a matButton="filled" routerLink="/">Go to the home page</a>
    </div>
  `,
  styleUrl: './status-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Forbidden {
  readonly #auth = inject(AuthStore);
  protected readonly roleLabel = computed(() => {
    const role = this.#auth.role();
    return role ? ROLE_LABELS[role].toLowerCase() : 'nobody';
  });
}
