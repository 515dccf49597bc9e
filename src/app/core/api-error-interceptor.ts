import { HttpErrorResponse, type HttpInterceptorFn } from '@angular/common/http';
import { inject } from '@angular/core';
import { Router } from '@angular/router';
import { catchError, throwError } from 'rxjs';
import { toApiRequestError } from './api-error';
import { AuthStore } from './auth-store';

/** Requests whose 401 is an answer, not a lost session: the start-up probe and a wrong password. */
function isSessionProbe(url: string): boolean {
  return /\/api\/auth\/(me|login)(\?|$)/.test(url);
}

/**
 * Rethrows every HTTP failure as an `ApiRequestError` (the shared ApiError shape), and sends the
 * person to the sign-in page when the server says the session is gone.
 */
export const apiErrorInterceptor: HttpInterceptorFn = (req, next) => {
  const router = inject(Router);
  const auth = inject(AuthStore);
  return next(req).pipe(
    catchError((error: unknown) => {
      if (!(error instanceof HttpErrorResponse)) return throwError(() => error);
      const failure = toApiRequestError(error);
      if (failure.status === 401 && !isSessionProbe(req.url)) {
        auth.clear();
        const current = router.url;
        const returnUrl = current && current !== '/' && !current.startsWith('/sign-in') ? current : undefined;
        void router.navigate(['/sign-in'], { queryParams: { returnUrl } });
      }
      return throwError(() => failure);
    }),
  );
};
