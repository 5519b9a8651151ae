import { HttpClient, HttpContext, provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router, provideRouter } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { apiErrorInterceptor } from './api-error.interceptor';
import { CALLER_HANDLES_ERRORS } from './http-context';
import { SessionService } from './session.service';

describe('apiErrorInterceptor', () => {
  let http: HttpClient;
  let backend: HttpTestingController;
  let shown: string[];
  let navigatedTo: string[];

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([apiErrorInterceptor])),
        provideHttpClientTesting(),
      ],
    });
    http = TestBed.inject(HttpClient);
    backend = TestBed.inject(HttpTestingController);
    shown = [];
    vi.spyOn(TestBed.inject(MatSnackBar), 'open').mockImplementation((message: string) => {
      shown.push(message);
      return undefined as never;
    });
    navigatedTo = [];
    const router = TestBed.inject(Router);
    vi.spyOn(router, 'navigateByUrl').mockImplementation((url) => {
      navigatedTo.push(router.serializeUrl(typeof url === 'string' ? router.parseUrl(url) : url));
      return Promise.resolve(true);
    });
  });

  afterEach(() => backend.verify());

  it('shows the server message and still hands the error to the caller', async () => {
    const call = firstValueFrom(http.post('/api/jobs', {}));
    backend
      .expectOne('/api/jobs')
      .flush({ error: { code: 'invalid_params', message: 'Snapshots K must be at least 8.' } }, { status: 400, statusText: 'Bad Request' });
    await expect(call).rejects.toMatchObject({ status: 400 });
    expect(shown).toEqual(['Snapshots K must be at least 8.']);
    expect(navigatedTo).toEqual([]);
  });

  it('on 401 ends the session and sends the user to sign in', async () => {
    const session = TestBed.inject(SessionService);
    const markSignedOut = vi.spyOn(session, 'markSignedOut');
    const call = firstValueFrom(http.get('/api/recordings'));
    backend
      .expectOne('/api/recordings')
      .flush({ error: { code: 'unauthenticated', message: 'Your session has ended. Sign in again.' } }, { status: 401, statusText: 'Unauthorized' });
    await expect(call).rejects.toMatchObject({ status: 401 });
    expect(markSignedOut).toHaveBeenCalled();
    expect(navigatedTo[0]).toMatch(/^\/sign-in/);
    expect(shown).toEqual(['Your session has ended. Sign in again.']);
  });

  it('stays silent for requests whose caller shows the error', async () => {
    const context = new HttpContext().set(CALLER_HANDLES_ERRORS, true);
    const call = firstValueFrom(http.post('/api/auth/login', {}, { context }));
    backend
      .expectOne('/api/auth/login')
      .flush({ error: { code: 'invalid_credentials', message: 'E-mail or password is wrong.' } }, { status: 401, statusText: 'Unauthorized' });
    await expect(call).rejects.toMatchObject({ status: 401 });
    expect(shown).toEqual([]);
    expect(navigatedTo).toEqual([]);
  });
});
