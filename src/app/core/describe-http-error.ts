import type { HttpErrorResponse } from '@angular/common/http';
import { apiErrorSchema } from '../../../shared/api/error.js';

/** What the client knows about a failed API call, in words a user can act on. */
export interface DescribedHttpError {
  status: number;
  /** The server's machine-readable code (`invalid_credentials`, `csrf`, …) or one of ours. */
  code: string;
  message: string;
}

/**
 * Turns a failed HttpClient call into a clear message. The server always answers
 * `{ error: { code, message } }` (shared/api/error.ts); everything else (proxy pages,
 * network drops) gets a message of our own that says what to do next.
 */
export function describeHttpError(response: HttpErrorResponse): DescribedHttpError {
  const parsed = apiErrorSchema.safeParse(response.error);
  if (parsed.success) {
    return { status: response.status, code: parsed.data.error.code, message: parsed.data.error.message };
  }
  if (response.status === 0) {
    return {
      status: 0,
      code: 'network',
      message: 'Cannot reach the Nullsmith server. Check your network connection and try again.',
    };
  }
  if (response.status === 401) {
    return { status: 401, code: 'unauthenticated', message: 'Your session has ended. Sign in again to continue.' };
  }
  if (response.status === 403) {
    return { status: 403, code: 'forbidden', message: 'Your role does not allow this. Ask an administrator if you need it.' };
  }
  if (response.status >= 500) {
    return {
      status: response.status,
      code: 'server',
      message: `The server failed to answer (HTTP ${response.status}). Try again in a moment; if it keeps happening, tell your administrator.`,
    };
  }
  return {
    status: response.status,
    code: 'http',
    message: `The request was refused (HTTP ${response.status}${response.statusText ? ` ${response.statusText}` : ''}).`,
  };
}
