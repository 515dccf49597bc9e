import { HttpXsrfTokenExtractor } from '@angular/common/http';
import { Injectable, computed, inject, signal } from '@angular/core';
import type { Me } from '../../../shared/api-types';
import type { Role } from '../../../shared/roles';
import { ApiRequestError, errorMessage } from './api-error';
import { AuthApi } from './auth-api';

/** Who is signed in. Loaded once at start-up (`GET /api/auth/session`) and kept current by sign-in, sign-out and one-time links. */
@Injectable({ providedIn: 'root' })
export class AuthStore {
  // services
  readonly #api = inject(AuthApi);
  readonly #xsrf = inject(HttpXsrfTokenExtractor);

  // state
  readonly #user = signal<Me | null>(null);
  readonly #startupProblem = signal<string | null>(null);

  readonly user = this.#user.asReadonly();
  readonly signedIn = computed(() => this.#user() !== null);
  readonly role = computed<Role | null>(() => this.#user()?.role ?? null);
  /** Set when the server could not be asked who is signed in (it is down, or answered garbage). */
  readonly startupProblem = this.#startupProblem.asReadonly();

  /** Start-up probe; never rejects, so a server that is down still leaves a usable sign-in page. */
  async load(): Promise<void> {
    try {
      // 200 `{ user: null }` when signed out: nothing for the browser to log as an error.
      const { user } = await this.#api.session();
      this.#user.set(user);
      this.#startupProblem.set(null);
    } catch (error) {
      this.#user.set(null);
      const unauthenticated = error instanceof ApiRequestError && error.status === 401;
      this.#startupProblem.set(unauthenticated ? null : errorMessage(error));
    }
    await this.ensureXsrfCookie().catch(() => undefined);
  }

  /**
   * The server sets the `XSRF-TOKEN` cookie on any response that lacks it; every POST must echo it
   * back. Ask for it explicitly when it is missing (first visit, cleared cookies).
   */
  async ensureXsrfCookie(): Promise<void> {
    if (this.#xsrf.getToken()) return;
    await this.#api.csrf();
  }

  async signIn(email: string, password: string): Promise<Me> {
    await this.ensureXsrfCookie();
    const { user } = await this.#api.login(email, password);
    this.#user.set(user);
    this.#startupProblem.set(null);
    return user;
  }

  async signOut(): Promise<void> {
    try {
      await this.#api.logout();
    } finally {
      this.#user.set(null);
    }
  }

  /** Asks for a password-reset link. The server answers 202 whether or not the account exists. */
  async requestPasswordReset(email: string): Promise<void> {
    await this.ensureXsrfCookie();
    await this.#api.requestPasswordReset(email);
  }

  /** Redeems an invitation or reset link; the server signs the person in. */
  async setPasswordWithToken(token: string, password: string): Promise<Me> {
    await this.ensureXsrfCookie();
    const { user } = await this.#api.redeemToken(token, password);
    this.#user.set(user);
    return user;
  }

  /** Forgets the session locally, e.g. after the server answered 401 to a request. */
  clear(): void {
    this.#user.set(null);
  }

  hasRole(allowed: readonly Role[]): boolean {
    const role = this.role();
    return role !== null && allowed.includes(role);
  }
}
