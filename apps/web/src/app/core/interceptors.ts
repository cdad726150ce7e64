import {
  HttpErrorResponse,
  HttpInterceptorFn,
  HttpRequest,
  HttpResponse,
  HttpXsrfTokenExtractor,
} from '@angular/common/http';
import { inject } from '@angular/core';
import { Router } from '@angular/router';
import { catchError, filter, switchMap, take, throwError } from 'rxjs';
import { ApiError, toApiError } from './api-error';
import { SKIP_SIGN_IN_REDIRECT } from './http-context';
import { SessionStore } from './session-store';

/** Cookie the server sets and header it expects back (double-submit CSRF protection). */
export const xsrfNames = { cookieName: 'XSRF-TOKEN', headerName: 'X-XSRF-TOKEN' } as const;

/** Endpoint that issues the XSRF cookie. */
export const csrfUrl = '/api/auth/csrf';

/** Whether a URL points at our own origin (relative, not protocol-relative). */
function isSameOrigin(url: string): boolean {
  return !/^([a-z][a-z\d+.-]*:)?\/\//i.test(url);
}

/** Whether a failure is the server refusing a missing or stale XSRF token. */
function isXsrfRefusal(failure: unknown): boolean {
  // The error interceptor runs later in the chain, so failures usually arrive as ApiErrors.
  if (failure instanceof ApiError) return failure.status === 403 && /csrf|xsrf/i.test(failure.code);
  if (!(failure instanceof HttpErrorResponse) || failure.status !== 403) return false;
  const code: unknown = (failure.error as { error?: { code?: unknown } } | null)?.error?.code;
  return typeof code === 'string' && /csrf|xsrf/i.test(code);
}

/**
 * Makes sure a state-changing request carries the XSRF header: on a first visit, before the
 * server has set the cookie, it fetches `/api/auth/csrf` and adds the header itself (Angular's
 * own XSRF step runs earlier in the chain and found no cookie to copy). When the server refuses
 * a token as stale (e.g. the session changed at sign-in), it fetches a fresh one and retries once.
 */
export const xsrfTokenInterceptor: HttpInterceptorFn = (req, next) => {
  if (req.method === 'GET' || req.method === 'HEAD' || !isSameOrigin(req.url)) return next(req);
  const tokens = inject(HttpXsrfTokenExtractor);
  const fetchToken = () =>
    next(new HttpRequest<null>('GET', csrfUrl, null)).pipe(
      filter((event) => event instanceof HttpResponse),
      take(1),
    );
  const withToken = () => {
    const token = tokens.getToken();
    return token ? req.clone({ setHeaders: { [xsrfNames.headerName]: token } }) : req;
  };
  const send =
    tokens.getToken() !== null || req.headers.has(xsrfNames.headerName)
      ? next(req)
      : fetchToken().pipe(switchMap(() => next(withToken())));
  return send.pipe(
    catchError((failure: unknown) =>
      isXsrfRefusal(failure)
        ? fetchToken().pipe(switchMap(() => next(withToken())))
        : throwError(() => failure),
    ),
  );
};

/**
 * Turns failed responses into {@link ApiError}s with readable messages, and when the server says
 * the session has ended (401) forgets the person and opens sign-in, coming back here afterwards.
 */
export const errorInterceptor: HttpInterceptorFn = (req, next) => {
  const session = inject(SessionStore);
  const router = inject(Router);
  return next(req).pipe(
    catchError((failure: unknown) => {
      if (!(failure instanceof HttpErrorResponse)) return throwError(() => failure);
      const error = toApiError(failure);
      if (failure.status === 401 && !req.context.get(SKIP_SIGN_IN_REDIRECT)) {
        session.clear();
        const here = router.url;
        if (!here.startsWith('/sign-in')) {
          const queryParams: Record<string, string> = { reason: 'expired' };
          if (here && here !== '/') queryParams['returnUrl'] = here;
          void router.navigate(['/sign-in'], { queryParams });
        }
      }
      return throwError(() => error);
    }),
  );
};
