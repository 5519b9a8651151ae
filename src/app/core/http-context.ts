import { HttpContextToken } from '@angular/common/http';

/**
 * Set on a request whose caller shows its own error (a form that prints the server's
 * message inline, the start-up session probe). The error interceptor then stays silent
 * and leaves navigation alone; the caller still receives the error.
 */
export const CALLER_HANDLES_ERRORS = new HttpContextToken<boolean>(() => false);
