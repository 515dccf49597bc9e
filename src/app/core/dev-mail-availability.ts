import { HttpClient, httpResource } from '@angular/common/http';
import { Injectable, computed, inject } from '@angular/core';
import type { CanMatchFn } from '@angular/router';
import { catchError, map, of } from 'rxjs';
import { AuthStore } from './auth-store';

/**
 * Whether the server runs in development mode, where it keeps the mails its local fake SMTP server
 * received. `GET /api/dev/mail/status` says so (admins only); the mailbox itself, `GET /api/dev/mail`,
 * exists only then.
 */
@Injectable({ providedIn: 'root' })
export class DevMailAvailability {
  readonly #auth = inject(AuthStore);
  readonly #status = httpResource<{ available: boolean }>(() => (this.#auth.role() === 'admin' ? '/api/dev/mail/status' : undefined));

  readonly available = computed(() => (this.#status.hasValue() ? this.#status.value().available : false));
}

/** Matches the mail page only when the server keeps mail (so production shows the not-found page). */
export const devMailGuard: CanMatchFn = () =>
  inject(HttpClient)
    .get<{ available: boolean }>('/api/dev/mail/status')
    .pipe(
      map((status) => status.available),
      catchError(() => of(false)),
    );
