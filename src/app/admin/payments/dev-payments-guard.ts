import { HttpClient } from '@angular/common/http';
import { inject } from '@angular/core';
import type { CanMatchFn } from '@angular/router';
import { catchError, map, of } from 'rxjs';

/** Matches the page only while the server runs its local fake payment service in development mode. */
export const devPaymentsGuard: CanMatchFn = () =>
  inject(HttpClient)
    .get<{ available: boolean }>('/api/dev/payments/status')
    .pipe(
      map((s) => s.available),
      catchError(() => of(false)),
    );

