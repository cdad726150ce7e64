import { HttpErrorResponse, HttpHeaders } from '@angular/common/http';
import { ApiError, describeWait, fieldErrorsFrom, parseRetryAfter, toApiError } from './api-error';

describe('toApiError', () => {
  it('keeps the server code and message from the {error:{code,message}} body', () => {
    const error = toApiError(
      new HttpErrorResponse({
        status: 401,
        error: { error: { code: 'invalid_credentials', message: 'Wrong e-mail or password.' } },
      }),
    );
    expect(error).toBeInstanceOf(ApiError);
    expect(error.status).toBe(401);
    expect(error.code).toBe('invalid_credentials');
    expect(error.message).toBe('Wrong e-mail or password.');
  });

  it('words a 429 with the Retry-After wait', () => {
    const error = toApiError(
      new HttpErrorResponse({
        status: 429,
        headers: new HttpHeaders({ 'Retry-After': '120' }),
        error: { error: { code: 'rate_limited', message: 'Too many requests' } },
      }),
    );
    expect(error.retryAfterSeconds).toBe(120);
    expect(error.message).toBe('Too many attempts in a short time. Try again in 2 minutes.');
  });

  it('explains an unreachable server (status 0) without a body', () => {
    const error = toApiError(
      new HttpErrorResponse({ status: 0, error: new ProgressEvent('error') }),
    );
    expect(error.code).toBe('offline');
    expect(error.message).toMatch(/can’t reach the server/);
  });

  it('falls back to a readable message for a 5xx with an HTML body', () => {
    const error = toApiError(
      new HttpErrorResponse({ status: 502, error: '<html>Bad gateway</html>' }),
    );
    expect(error.code).toBe('http_error');
    expect(error.message).toBe('Something went wrong on our side. Try again in a moment.');
  });

  it('carries field messages from 422 details', () => {
    const error = toApiError(
      new HttpErrorResponse({
        status: 422,
        error: {
          error: {
            code: 'validation_failed',
            message: 'Check the highlighted fields.',
            details: [{ path: ['email'], message: 'Enter a valid e-mail address.' }],
          },
        },
      }),
    );
    expect(error.fieldErrors).toEqual({ email: 'Enter a valid e-mail address.' });
  });
});

describe('fieldErrorsFrom', () => {
  it('reads zod issue lists, nested paths joined with dots, first message per field', () => {
    expect(
      fieldErrorsFrom({
        issues: [
          { path: ['name'], message: 'Too short' },
          { path: ['name'], message: 'Second message' },
          { path: ['address', 'city'], message: 'Enter a city' },
        ],
      }),
    ).toEqual({ name: 'Too short', 'address.city': 'Enter a city' });
  });

  it('reads zod flatten() output', () => {
    expect(fieldErrorsFrom({ formErrors: [], fieldErrors: { role: ['Invalid role'] } })).toEqual({
      role: 'Invalid role',
    });
  });

  it('reads a plain field → message map and ignores non-messages', () => {
    expect(fieldErrorsFrom({ password: 'Use at least 10 characters.', count: 3 })).toEqual({
      password: 'Use at least 10 characters.',
    });
    expect(fieldErrorsFrom(undefined)).toEqual({});
  });
});

describe('parseRetryAfter', () => {
  it('reads delay-seconds (RFC 9110 §10.2.3 example "120")', () => {
    expect(parseRetryAfter('120')).toBe(120);
  });

  it('reads an HTTP date relative to now (RFC 9110 §10.2.3 example date)', () => {
    const now = Date.parse('Fri, 31 Dec 1999 23:58:59 GMT');
    expect(parseRetryAfter('Fri, 31 Dec 1999 23:59:59 GMT', now)).toBe(60);
  });

  it('returns null for nothing or nonsense', () => {
    expect(parseRetryAfter(null)).toBeNull();
    expect(parseRetryAfter('soon')).toBeNull();
  });
});

describe('describeWait', () => {
  it('uses seconds under a minute and rounds minutes up', () => {
    expect(describeWait(1)).toBe('1 second');
    expect(describeWait(45)).toBe('45 seconds');
    expect(describeWait(60)).toBe('1 minute');
    expect(describeWait(61)).toBe('2 minutes');
    expect(describeWait(900)).toBe('15 minutes');
  });
});
