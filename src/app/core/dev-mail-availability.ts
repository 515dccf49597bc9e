import { httpResource } from '@angular/common/http';
import { Injectable, computed, inject } from '@angular/core';
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
