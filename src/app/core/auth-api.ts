import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { Me } from '../../../shared/api-types';

/** The sign-in API (`/api/auth/…`); AuthStore keeps who is signed in. */
@Injectable({ providedIn: 'root' })
export class AuthApi {
  readonly #http = inject(HttpClient);

  /** 200 `{ user: null }` when signed out. */
  session(): Promise<{ user: Me | null }> {
    return firstValueFrom(this.#http.get<{ user: Me | null }>('/api/auth/session'));
  }

  /** Any answer sets the `XSRF-TOKEN` cookie when it is missing; this one exists only for that. */
  csrf(): Promise<unknown> {
    return firstValueFrom(this.#http.get('/api/auth/csrf', { responseType: 'text' }));
  }

  login(email: string, password: string): Promise<{ user: Me }> {
    return firstValueFrom(this.#http.post<{ user: Me }>('/api/auth/login', { email, password }));
  }

  logout(): Promise<unknown> {
    return firstValueFrom(this.#http.post('/api/auth/logout', null, { responseType: 'text' }));
  }

  requestPasswordReset(email: string): Promise<unknown> {
    return firstValueFrom(this.#http.post('/api/auth/password-reset', { email }, { responseType: 'text' }));
  }

  /** Redeems an invitation or reset link with the new password; the server signs the person in. */
  redeemToken(token: string, password: string): Promise<{ user: Me }> {
    return firstValueFrom(this.#http.post<{ user: Me }>(`/api/auth/tokens/${encodeURIComponent(token)}`, { password }));
  }
}
