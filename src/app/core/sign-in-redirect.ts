import type { Router, UrlTree } from '@angular/router';

/** Query parameter that carries the page a user asked for through sign-in. */
export const RETURN_TO_PARAM = 'returnTo';

/** The /sign-in URL that brings the user back to `returnTo` afterwards. */
export function signInRedirect(router: Router, returnTo: string): UrlTree {
  const keep = isSafeReturnTo(returnTo) && !returnTo.startsWith('/sign-in');
  return router.createUrlTree(['/sign-in'], keep ? { queryParams: { [RETURN_TO_PARAM]: returnTo } } : {});
}

/** Only same-site paths: "/jobs/4" yes; "//evil.example", "https://…" or "javascript:" no. */
export function isSafeReturnTo(value: string | null | undefined): value is string {
  return typeof value === 'string' && value.startsWith('/') && !value.startsWith('//') && !value.startsWith('/\\');
}
