import { inject } from '@angular/core';
import type { CanMatchFn } from '@angular/router';
import { catchError, map, of } from 'rxjs';
import { DevPaymentsApi } from './dev-payments-api';

/** Matches the page only while the server runs its local fake payment service in development mode. */
export const devPaymentsGuard: CanMatchFn = () =>
  inject(DevPaymentsApi)
    .status()
    .pipe(
      map((s) => s.available),
      catchError(() => of(false)),
    );

