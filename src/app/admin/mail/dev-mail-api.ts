import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom, type Observable } from 'rxjs';

/** The development mailbox (`/api/dev/mail`, development mode only; the list is the page's `httpResource`). */
@Injectable({ providedIn: 'root' })
export class DevMailApi {
  readonly #http = inject(HttpClient);

  /** Whether the server keeps mail (admins only). */
  status(): Observable<{ available: boolean }> {
    return this.#http.get<{ available: boolean }>('/api/dev/mail/status');
  }

  /** Forgets every stored mail. */
  clear(): Promise<unknown> {
    return firstValueFrom(this.#http.delete('/api/dev/mail', { responseType: 'text' }));
  }
}
