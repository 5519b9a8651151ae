import { HttpClient, type HttpContext, type HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';
import type { z } from 'zod';

/** Options every ApiService call accepts. */
export interface ApiCallOptions {
  params?: HttpParams | Record<string, string | number | boolean | readonly (string | number | boolean)[]>;
  context?: HttpContext;
}

/** Thrown when the server answers 2xx with a body the client does not understand. */
export class ApiShapeError extends Error {
  constructor(
    readonly path: string,
    readonly issues: string,
  ) {
    super(
      `The server's answer to ${path} has an unexpected shape (${issues}). ` +
        'The client and server versions may differ: reload the page; if it persists, tell your administrator.',
    );
    this.name = 'ApiShapeError';
  }
}

/**
 * HttpClient for the Nullsmith API, typed by the zod schemas in shared/api: every answer
 * is parsed with the schema the caller names, so a component never holds an unchecked
 * body. Errors are reported once by apiErrorInterceptor; callers only reset their state.
 */
@Injectable({ providedIn: 'root' })
export class ApiService {
  private readonly http = inject(HttpClient);

  get<S extends z.ZodType>(path: string, schema: S, options: ApiCallOptions = {}): Observable<z.output<S>> {
    return this.http.get<unknown>(path, options).pipe(map((body) => parseBody(path, schema, body)));
  }

  post<S extends z.ZodType>(path: string, body: unknown, schema: S, options: ApiCallOptions = {}): Observable<z.output<S>> {
    return this.http.post<unknown>(path, body, options).pipe(map((answer) => parseBody(path, schema, answer)));
  }

  put<S extends z.ZodType>(path: string, body: unknown, schema: S, options: ApiCallOptions = {}): Observable<z.output<S>> {
    return this.http.put<unknown>(path, body, options).pipe(map((answer) => parseBody(path, schema, answer)));
  }

  patch<S extends z.ZodType>(path: string, body: unknown, schema: S, options: ApiCallOptions = {}): Observable<z.output<S>> {
    return this.http.patch<unknown>(path, body, options).pipe(map((answer) => parseBody(path, schema, answer)));
  }

  /** DELETE (and other calls answered with 204) carry no body to check. */
  delete(path: string, options: ApiCallOptions = {}): Observable<void> {
    return this.http.delete<unknown>(path, options).pipe(map(() => undefined));
  }
}

function parseBody<S extends z.ZodType>(path: string, schema: S, body: unknown): z.output<S> {
  const result = schema.safeParse(body);
  if (result.success) return result.data;
  const issues = result.error.issues
    .slice(0, 3)
    .map((issue) => `${issue.path.join('.') || 'body'}: ${issue.message}`)
    .join('; ');
  throw new ApiShapeError(path, issues);
}
