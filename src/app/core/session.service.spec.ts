import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { SessionService } from './session.service';

const analyst = { id: 3, email: 'analyst@demo.nullsmith', displayName: 'Demo Analyst', role: 'analyst' as const };

describe('SessionService', () => {
  let session: SessionService;
  let http: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [provideZonelessChangeDetection(), provideHttpClient(), provideHttpClientTesting()],
    });
    session = TestBed.inject(SessionService);
    http = TestBed.inject(HttpTestingController);
  });

  afterEach(() => http.verify());

  it('starts unknown, then holds the user GET /api/auth/me returns', async () => {
    expect(session.status()).toBe('unknown');
    const restoring = session.restore();
    http.expectOne({ method: 'GET', url: '/api/auth/me' }).flush({ user: analyst });
    await restoring;
    expect(session.user()).toEqual(analyst);
    expect(session.status()).toBe('signed-in');
    expect(session.hasRole('analyst')).toBe(true);
    expect(session.hasRole('operations')).toBe(false);
  });

  it('treats 401 from /api/auth/me as signed out', async () => {
    const restoring = session.restore();
    http
      .expectOne('/api/auth/me')
      .flush({ error: { code: 'unauthenticated', message: 'Sign in first.' } }, { status: 401, statusText: 'Unauthorized' });
    await restoring;
    expect(session.user()).toBeNull();
    expect(session.status()).toBe('signed-out');
  });

  it('signs in with the credentials and rejects with the server error on a wrong password', async () => {
    const wrong = session.signIn({ email: 'analyst@demo.nullsmith', password: 'nope' });
    const request = http.expectOne({ method: 'POST', url: '/api/auth/login' });
    expect(request.request.body).toEqual({ email: 'analyst@demo.nullsmith', password: 'nope' });
    request.flush(
      { error: { code: 'invalid_credentials', message: 'E-mail or password is wrong.' } },
      { status: 401, statusText: 'Unauthorized' },
    );
    await expect(wrong).rejects.toMatchObject({ status: 401 });
    expect(session.signedIn()).toBe(false);

    const right = session.signIn({ email: 'analyst@demo.nullsmith', password: 'nullsmith-analyst' });
    http.expectOne('/api/auth/login').flush({ user: analyst });
    await expect(right).resolves.toEqual(analyst);
    expect(session.signedIn()).toBe(true);
  });

  it('ends the local session on sign-out even when the server is unreachable', async () => {
    const restoring = session.restore();
    http.expectOne('/api/auth/me').flush({ user: analyst });
    await restoring;
    const out = session.signOut();
    http.expectOne({ method: 'POST', url: '/api/auth/logout' }).error(new ProgressEvent('error'));
    await out;
    expect(session.user()).toBeNull();
  });
});
