import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatSnackBar } from '@angular/material/snack-bar';
import { type ActivatedRouteSnapshot, type RouterStateSnapshot, Router, UrlTree, provideRouter } from '@angular/router';
import type { Role } from '../../../shared/roles.js';
import { roleGuard } from './role.guard';
import { SessionService } from './session.service';

/** Runs a guard for `url` the way the router would, inside the injector. */
function runGuard(required: Role, url: string): boolean | UrlTree {
  const state = { url } as RouterStateSnapshot;
  return TestBed.runInInjectionContext(() => roleGuard(required)({} as ActivatedRouteSnapshot, state)) as boolean | UrlTree;
}

async function signInAs(role: Role | null): Promise<void> {
  const restoring = TestBed.inject(SessionService).restore();
  const request = TestBed.inject(HttpTestingController).expectOne('/api/auth/me');
  if (role) request.flush({ user: { id: 1, email: `${role}@demo.nullsmith`, displayName: role, role } });
  else request.flush({ error: { code: 'unauthenticated', message: 'Sign in first.' } }, { status: 401, statusText: 'Unauthorized' });
  await restoring;
}

describe('roleGuard', () => {
  let snacks: string[];

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [provideZonelessChangeDetection(), provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
    });
    snacks = [];
    vi.spyOn(TestBed.inject(MatSnackBar), 'open').mockImplementation((message: string) => {
      snacks.push(message);
      return undefined as never;
    });
  });

  it('sends a signed-out visitor to sign in, remembering the page', async () => {
    await signInAs(null);
    const result = runGuard('analyst', '/recordings');
    expect(result).toBeInstanceOf(UrlTree);
    expect(TestBed.inject(Router).serializeUrl(result as UrlTree)).toBe('/sign-in?returnTo=%2Frecordings');
  });

  it('lets roles at or above the required one through (analyst < operations < admin)', async () => {
    await signInAs('operations');
    expect(runGuard('analyst', '/jobs')).toBe(true);
    expect(runGuard('operations', '/jobs')).toBe(true);
  });

  it('turns an analyst away from admin pages with a message naming the role', async () => {
    await signInAs('analyst');
    const result = runGuard('admin', '/admin');
    expect(TestBed.inject(Router).serializeUrl(result as UrlTree)).toBe('/jobs');
    expect(snacks[0]).toContain('needs the admin role');
  });
});
