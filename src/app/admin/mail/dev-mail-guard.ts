import { inject } from '@angular/core';
import type { CanMatchFn } from '@angular/router';
import { catchError, map, of } from 'rxjs';
import { DevMailApi } from './dev-mail-api';

/** Matches the mail page only when the server keeps mail (so production shows the not-found page). */
export const devMailGuard: CanMatchFn = () =>
  inject(DevMailApi)
    .status()
    .pipe(
      map((status) => status.available),
      catchError(() => of(false)),
    );
