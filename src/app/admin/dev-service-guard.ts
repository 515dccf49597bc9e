import type { CanMatchFn } from '@angular/router';
import { catchError, map, of, type Observable } from 'rxjs';

/**
 * Matches a development page (the mail outbox, test payments) only while the server runs the local
 * fake service behind it, so production shows the not-found page. `status` is the service's
 * `-api.ts` call, made in the guard's injection context.
 */
export function devServiceGuard(status: () => Observable<{ available: boolean }>): CanMatchFn {
  return () =>
    status().pipe(
      map((s) => s.available),
      catchError(() => of(false)),
    );
}
