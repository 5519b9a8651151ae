import { HttpClient, HttpContext, HttpErrorResponse } from '@angular/common/http';
import { Injectable, computed, inject, signal } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { LoginRequest, SessionUser } from '../../../shared/api/auth.js';
import { sessionResponseSchema } from '../../../shared/api/auth.js';
import type { Role } from '../../../shared/roles.js';
import { roleAtLeast } from '../../../shared/roles.js';
import { CALLER_HANDLES_ERRORS } from './http-context';

/** `unknown` until the start-up probe (GET /api/auth/me) has answered. */
export type SessionStatus = 'unknown' | 'signed-in' | 'signed-out';

/**
 * The signed-in user as a signal. Restored once at start-up (provideAppInitializer), then
 * changed only by signIn, signOut, or the error interceptor when the server answers 401.
 */
@Injectable({ providedIn: 'root' })
export class SessionService {
  private readonly http = inject(HttpClient);
  private readonly currentUser = signal<SessionUser | null>(null);
  private readonly currentStatus = signal<SessionStatus>('unknown');

  /** The signed-in user, or null. */
  readonly user = this.currentUser.asReadonly();
  readonly status = this.currentStatus.asReadonly();
  readonly signedIn = computed(() => this.currentUser() !== null);

  /** Asks the server who we are. A 401 or an unreachable server both mean "signed out". */
  async restore(): Promise<void> {
    try {
      const body = await firstValueFrom(this.http.get('/api/auth/me', { context: silent() }));
      this.setUser(sessionResponseSchema.parse(body).user);
    } catch {
      this.setUser(null);
    }
  }

  /**
   * Signs in; resolves with the user or rejects with the HttpErrorResponse (the caller
   * shows the server's message, e.g. "E-mail or password is wrong.").
   */
  async signIn(credentials: LoginRequest): Promise<SessionUser> {
    const body = await firstValueFrom(this.http.post('/api/auth/login', credentials, { context: silent() }));
    const user = sessionResponseSchema.parse(body).user;
    this.setUser(user);
    return user;
  }

  /** Signs out on the server; the local session ends even if the server is unreachable. */
  async signOut(): Promise<void> {
    try {
      await firstValueFrom(this.http.post('/api/auth/logout', null, { context: silent() }));
    } catch (error) {
      if (!(error instanceof HttpErrorResponse)) throw error;
    } finally {
      this.setUser(null);
    }
  }

  /** Called when the server says the session is gone (401 on an ordinary request). */
  markSignedOut(): void {
    this.setUser(null);
  }

  /** True when someone is signed in with at least `required`'s rights. */
  hasRole(required: Role): boolean {
    const user = this.currentUser();
    return user !== null && roleAtLeast(user.role, required);
  }

  private setUser(user: SessionUser | null): void {
    this.currentUser.set(user);
    this.currentStatus.set(user ? 'signed-in' : 'signed-out');
  }
}

function silent(): HttpContext {
  return new HttpContext().set(CALLER_HANDLES_ERRORS, true);
}
