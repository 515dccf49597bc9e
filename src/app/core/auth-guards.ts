import { inject } from '@angular/core';
import { Router, type CanMatchFn } from '@angular/router';
import type { Role } from '../../../shared/roles';
import { AuthStore } from './auth-store';

/** The sign-in page, remembering where the person was going (the whole URL, not just this route's segments). */
function signInTree(router: Router) {
  const target = router.currentNavigation()?.extractedUrl;
  const returnUrl = target ? router.serializeUrl(target) : '/';
  return router.createUrlTree(['/sign-in'], { queryParams: returnUrl !== '/' ? { returnUrl } : {} });
}

/** Lets signed-in people in; everyone else goes to the sign-in page and comes back afterwards. */
export const signedInGuard: CanMatchFn = () => {
  const auth = inject(AuthStore);
  return auth.signedIn() || signInTree(inject(Router));
};

/** Keeps the sign-in page for people who are not signed in yet. */
export const signedOutGuard: CanMatchFn = () => {
  const auth = inject(AuthStore);
  return !auth.signedIn() || inject(Router).createUrlTree(['/']);
};

/** Admits only the given roles (the same rule the server applies); others see the forbidden page. */
export function roleGuard(allowed: readonly Role[]): CanMatchFn {
  return () => {
    const auth = inject(AuthStore);
    const router = inject(Router);
    if (!auth.signedIn()) return signInTree(router);
    return auth.hasRole(allowed) || router.createUrlTree(['/forbidden']);
  };
}

/** Makes a `returnUrl` query parameter safe to navigate to: only paths inside this app. */
export function safeReturnUrl(value: string | null | undefined): string {
  if (!value || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return '/';
  if (value.startsWith('/sign-in')) return '/';
  return value;
}
