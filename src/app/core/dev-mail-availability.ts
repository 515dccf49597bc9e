import { HttpClient, httpResource } from '@angular/common/http';
import { Injectable, computed, inject } from '@angular/core';
import type { CanMatchFn } from '@angular/router';
import { catchError, map, of } from 'rxjs';
import type { StoredMail } from '../../../shared/api-types';
import { AuthStore } from './auth-store';

/**
 * Whether the server runs in development mode, where it keeps the mails its local fake SMTP server
 * received. The server answers `GET /api/dev/mail` with 200 only then (404 otherwise), and only to admins.
 */
@Injectable({ providedIn: 'root' })
export class DevMailAvailability {
  readonly #auth = inject(AuthStore);
  readonly #probe = httpResource<StoredMail[]>(() => (this.#auth.role() === 'admin' ? '/api/dev/mail' : undefined));

  readonly available = computed(() => this.#probe.hasValue());
}

/** Matches the mail page only when the server keeps mail (so production shows the not-found page). */
export const devMailGuard: CanMatchFn = () =>
  inject(HttpClient)
    .get('/api/dev/mail', { observe: 'response' })
    .pipe(
      map(() => true),
      catchError(() => of(false)),
    );
