import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom, type Observable } from 'rxjs';

/** The local fake payment service (`/api/dev/payments`, development mode only; the list is the page's `httpResource`). */
@Injectable({ providedIn: 'root' })
export class DevPaymentsApi {
  readonly #http = inject(HttpClient);

  /** Whether the server runs the fake payment service (admins only). */
  status(): Observable<{ available: boolean }> {
    return this.#http.get<{ available: boolean }>('/api/dev/payments/status');
  }

  /** Completes or fails a checkout session; the fake then sends its signed webhook. */
  settle(sessionId: string, what: 'complete' | 'fail'): Promise<unknown> {
    return firstValueFrom(this.#http.post(`/api/dev/payments/${encodeURIComponent(sessionId)}/${what}`, {}));
  }
}
