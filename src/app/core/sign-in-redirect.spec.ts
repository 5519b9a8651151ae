import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { isSafeReturnTo, signInRedirect } from './sign-in-redirect';

describe('sign-in redirect', () => {
  it('accepts same-site paths only', () => {
    expect(isSafeReturnTo('/jobs/12?tab=results')).toBe(true);
    expect(isSafeReturnTo('//evil.example/x')).toBe(false);
    expect(isSafeReturnTo('/\\evil.example')).toBe(false);
    expect(isSafeReturnTo('https://evil.example')).toBe(false);
    expect(isSafeReturnTo('javascript:alert(1)')).toBe(false);
    expect(isSafeReturnTo(undefined)).toBe(false);
  });

  it('remembers the page asked for, but never /sign-in itself', () => {
    TestBed.configureTestingModule({ providers: [provideRouter([])] });
    const router = TestBed.inject(Router);
    expect(router.serializeUrl(signInRedirect(router, '/recordings'))).toBe('/sign-in?returnTo=%2Frecordings');
    expect(router.serializeUrl(signInRedirect(router, '/sign-in?returnTo=%2Fjobs'))).toBe('/sign-in');
  });
});
