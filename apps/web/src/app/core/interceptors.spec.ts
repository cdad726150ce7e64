import {
  HttpClient,
  HttpContext,
  provideHttpClient,
  withInterceptors,
  withXsrfConfiguration,
} from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { membership, person } from '../testing/people';
import { ApiError } from './api-error';
import { SKIP_SIGN_IN_REDIRECT } from './http-context';
import { csrfUrl, errorInterceptor, xsrfNames, xsrfTokenInterceptor } from './interceptors';
import { SessionStore } from './session-store';

function clearCookie(): void {
  document.cookie = `${xsrfNames.cookieName}=; expires=Thu, 01 Jan 1970 00:00:00 GMT; path=/`;
}

describe('interceptors', () => {
  let http: HttpTestingController;
  let client: HttpClient;

  beforeEach(() => {
    clearCookie();
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(
          withXsrfConfiguration(xsrfNames),
          withInterceptors([xsrfTokenInterceptor, errorInterceptor]),
        ),
        provideHttpClientTesting(),
      ],
    });
    http = TestBed.inject(HttpTestingController);
    client = TestBed.inject(HttpClient);
  });

  afterEach(() => {
    http.verify();
    clearCookie();
  });

  it('fetches the XSRF cookie before the first state-changing request and sends it back', async () => {
    const posting = firstValueFrom(client.post('/api/auth/logout', null));
    const csrf = http.expectOne(csrfUrl);
    expect(csrf.request.method).toBe('GET');
    document.cookie = `${xsrfNames.cookieName}=token-123; path=/`; // What the server's Set-Cookie does.
    csrf.flush(null, { status: 204, statusText: 'No Content' });

    const logout = http.expectOne('/api/auth/logout');
    expect(logout.request.headers.get(xsrfNames.headerName)).toBe('token-123');
    logout.flush(null, { status: 204, statusText: 'No Content' });
    await posting;
  });

  it('does not fetch the cookie again once it exists', async () => {
    document.cookie = `${xsrfNames.cookieName}=token-456; path=/`;
    const posting = firstValueFrom(client.post('/api/organisations/7/invitations', {}));
    const request = http.expectOne('/api/organisations/7/invitations');
    expect(request.request.headers.get(xsrfNames.headerName)).toBe('token-456');
    request.flush({});
    await posting;
  });

  it('fetches a fresh token and retries once when the server calls the token stale', async () => {
    document.cookie = `${xsrfNames.cookieName}=old-token; path=/`;
    const posting = firstValueFrom(client.post('/api/organisations/7/invitations', { a: 1 }));
    http
      .expectOne('/api/organisations/7/invitations')
      .flush(
        { error: { code: 'csrf_mismatch', message: 'Refresh the page.' } },
        { status: 403, statusText: 'Forbidden' },
      );
    document.cookie = `${xsrfNames.cookieName}=new-token; path=/`;
    http.expectOne(csrfUrl).flush(null, { status: 204, statusText: 'No Content' });
    const retry = http.expectOne('/api/organisations/7/invitations');
    expect(retry.request.headers.get(xsrfNames.headerName)).toBe('new-token');
    expect(retry.request.body).toEqual({ a: 1 });
    retry.flush({ ok: true });
    await expect(posting).resolves.toEqual({ ok: true });
  });

  it('passes other 403s through without retrying', async () => {
    document.cookie = `${xsrfNames.cookieName}=token; path=/`;
    const posting = firstValueFrom(client.post('/api/organisations/7/invitations', {}));
    http
      .expectOne('/api/organisations/7/invitations')
      .flush(
        { error: { code: 'forbidden', message: 'Not yours.' } },
        { status: 403, statusText: 'Forbidden' },
      );
    await expect(posting).rejects.toMatchObject({ status: 403, code: 'forbidden' });
  });

  it('leaves GET requests alone', async () => {
    const getting = firstValueFrom(client.get('/api/organisations/7/members'));
    http.expectOne('/api/organisations/7/members').flush({ items: [] });
    await getting;
  });

  it('turns a failure into an ApiError, and a 401 into sign-in with the way back', async () => {
    const router = TestBed.inject(Router);
    const navigate = jest.spyOn(router, 'navigate').mockResolvedValue(true);
    jest.spyOn(router, 'url', 'get').mockReturnValue('/organisations/7/members');
    const session = TestBed.inject(SessionStore);
    session.setUser(person([membership('velmora', 'buyer')]));

    const getting = firstValueFrom(client.get('/api/organisations/7/members'));
    http
      .expectOne('/api/organisations/7/members')
      .flush(
        { error: { code: 'unauthenticated', message: 'Sign in first.' } },
        { status: 401, statusText: 'Unauthorized' },
      );

    await expect(getting).rejects.toBeInstanceOf(ApiError);
    expect(session.signedIn()).toBe(false);
    expect(navigate).toHaveBeenCalledWith(['/sign-in'], {
      queryParams: { reason: 'expired', returnUrl: '/organisations/7/members' },
    });
  });

  it('does not redirect when the request says a 401 is expected', async () => {
    const navigate = jest.spyOn(TestBed.inject(Router), 'navigate');
    const getting = firstValueFrom(
      client.get('/api/auth/me', { context: new HttpContext().set(SKIP_SIGN_IN_REDIRECT, true) }),
    );
    http.expectOne('/api/auth/me').flush({}, { status: 401, statusText: 'Unauthorized' });
    await expect(getting).rejects.toMatchObject({ status: 401 });
    expect(navigate).not.toHaveBeenCalled();
  });
});
