import { HttpErrorResponse, type HttpInterceptorFn } from '@angular/common/http';
import { inject } from '@angular/core';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router } from '@angular/router';
import { catchError, throwError } from 'rxjs';
import { describeHttpError } from './describe-http-error';
import { CALLER_HANDLES_ERRORS } from './http-context';
import { SessionService } from './session.service';
import { signInRedirect } from './sign-in-redirect';

/** How long an error stays on screen: long enough to read two sentences. */
const ERROR_SNACK_MS = 8000;

/**
 * Every failed API call ends here once: the server's `{ error: { code, message } }` becomes
 * a snack bar with that message; a 401 also ends the local session and sends the user to
 * /sign-in, remembering where they were. Requests marked CALLER_HANDLES_ERRORS pass through.
 * The error is always rethrown so the caller can reset its own state.
 */
export const apiErrorInterceptor: HttpInterceptorFn = (request, next) => {
  const snackBar = inject(MatSnackBar);
  const router = inject(Router);
  const session = inject(SessionService);
  return next(request).pipe(
    catchError((error: unknown) => {
      if (error instanceof HttpErrorResponse && !request.context.get(CALLER_HANDLES_ERRORS)) {
        const described = describeHttpError(error);
        snackBar.open(described.message, 'Dismiss', { duration: ERROR_SNACK_MS, panelClass: 'ns-snack-error' });
        if (error.status === 401) {
          session.markSignedOut();
          void router.navigateByUrl(signInRedirect(router, router.url));
        }
      }
      return throwError(() => error);
    }),
  );
};
