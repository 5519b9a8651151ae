import { HttpErrorResponse } from '@angular/common/http';
import { describeHttpError } from './describe-http-error';

describe('describeHttpError', () => {
  it('keeps the server message and code of the shared error shape', () => {
    const response = new HttpErrorResponse({
      status: 401,
      error: { error: { code: 'invalid_credentials', message: 'E-mail or password is wrong.' } },
    });
    expect(describeHttpError(response)).toEqual({
      status: 401,
      code: 'invalid_credentials',
      message: 'E-mail or password is wrong.',
    });
  });

  it('explains an unreachable server (status 0) and says what to do', () => {
    const described = describeHttpError(new HttpErrorResponse({ status: 0, error: new ProgressEvent('error') }));
    expect(described.code).toBe('network');
    expect(described.message).toMatch(/Cannot reach the Nullsmith server/);
  });

  it('names the status of a gateway page that is not our JSON', () => {
    const described = describeHttpError(new HttpErrorResponse({ status: 502, error: '<html>Bad gateway</html>' }));
    expect(described.code).toBe('server');
    expect(described.message).toContain('HTTP 502');
  });
});
