import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { type ComponentFixture, TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { SignInPageComponent } from './sign-in-page.component';

describe('SignInPageComponent', () => {
  let fixture: ComponentFixture<SignInPageComponent>;
  let http: HttpTestingController;
  let host: HTMLElement;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [provideZonelessChangeDetection(), provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
    });
    fixture = TestBed.createComponent(SignInPageComponent);
    http = TestBed.inject(HttpTestingController);
    host = fixture.nativeElement as HTMLElement;
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  function type(selector: string, value: string): void {
    const input = host.querySelector<HTMLInputElement>(selector)!;
    input.value = value;
    input.dispatchEvent(new Event('input'));
  }

  /** Lets the component's awaited sign-in promise finish, then renders. */
  async function settle(): Promise<void> {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  }

  async function submit(): Promise<void> {
    host.querySelector<HTMLFormElement>('form')!.dispatchEvent(new Event('submit'));
    await fixture.whenStable();
  }

  it('shows the shared schema messages and sends nothing when the fields are empty', async () => {
    await submit();
    expect(host.textContent).toContain('Enter your e-mail address.');
    expect(host.textContent).toContain('Enter your password.');
    http.expectNone('/api/auth/login');
  });

  it('shows the server message inline on a wrong password and lets the user retry', async () => {
    type('input[type=email]', 'analyst@demo.nullsmith');
    type('input[formControlName=password]', 'wrong-password');
    await submit();
    const button = host.querySelector<HTMLButtonElement>('button[type=submit]')!;
    expect(button.disabled).toBe(true);
    expect(button.textContent).toContain('Signing in');

    http
      .expectOne('/api/auth/login')
      .flush({ error: { code: 'invalid_credentials', message: 'E-mail or password is wrong.' } }, { status: 401, statusText: 'Unauthorized' });
    await settle();
    expect(host.querySelector('[role=alert]')?.textContent).toContain('E-mail or password is wrong.');
    expect(button.disabled).toBe(false);
  });

  it('goes to the page asked for after signing in, refusing off-site targets', async () => {
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigateByUrl').mockResolvedValue(true);
    fixture.componentRef.setInput('returnTo', '//evil.example/phish');
    type('input[type=email]', 'analyst@demo.nullsmith');
    type('input[formControlName=password]', 'nullsmith-analyst');
    await submit();
    http.expectOne('/api/auth/login').flush({ user: { id: 3, email: 'analyst@demo.nullsmith', displayName: 'Demo analyst', role: 'analyst' } });
    await settle();
    expect(navigate).toHaveBeenCalledWith('/jobs');
  });
});
