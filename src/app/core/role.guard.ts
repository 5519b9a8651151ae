import { inject } from '@angular/core';
import { MatSnackBar } from '@angular/material/snack-bar';
import { type CanActivateFn, Router } from '@angular/router';
import type { Role } from '../../../shared/roles.js';
import { SessionService } from './session.service';
import { signInRedirect } from './sign-in-redirect';

/** Where a signed-in user lands when a page needs a role they do not have. */
const HOME = '/jobs';

/**
 * Lets the route through when the signed-in user has at least `required` (roles are
 * ordered: analyst < operations < admin). Signed out: to /sign-in, coming back afterwards.
 * Wrong role: to the jobs page with a message naming the role needed. The server enforces
 * the same rule on every API call; this guard only keeps people off pages they cannot use.
 */
export function roleGuard(required: Role): CanActivateFn {
  return (_route, state) => {
    const session = inject(SessionService);
    const router = inject(Router);
    if (!session.signedIn()) return signInRedirect(router, state.url);
    if (session.hasRole(required)) return true;
    inject(MatSnackBar).open(`That page needs the ${required} role. Ask an administrator if you need access.`, 'Dismiss', {
      duration: 8000,
      panelClass: 'ns-snack-error',
    });
    return router.parseUrl(HOME);
  };
}

/** Any signed-in user (analyst is the least privileged role). */
export const signedInGuard: CanActivateFn = roleGuard('analyst');

/** For /sign-in: a user who is already signed in goes straight to the jobs page. */
export const signedOutGuard: CanActivateFn = () => {
  const session = inject(SessionService);
  return session.signedIn() ? inject(Router).parseUrl(HOME) : true;
};
