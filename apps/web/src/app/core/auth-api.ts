import { HttpClient, HttpContext } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { LoginRequest, MeResponse, SessionUser } from '@evalon/contracts';
import { Observable, map } from 'rxjs';
import { SKIP_SIGN_IN_REDIRECT } from './http-context';

/** Where the browser goes (a full page load, not a request) to sign in with Google. */
export const googleSignInUrl = '/api/auth/google';

/** Profile fields people can change about themselves. */
export interface ProfileChange {
  name: string;
  timeZone: string;
}

/** Talks to `/api/auth/*`: the session, sign-in, passwords and invitations. */
@Injectable({ providedIn: 'root' })
export class AuthApi {
  private readonly http = inject(HttpClient);
  /** 401 is an expected answer on these calls, not a sign that the session ended. */
  private readonly quiet = { context: new HttpContext().set(SKIP_SIGN_IN_REDIRECT, true) };

  /** The signed-in person, or a 401 when nobody is signed in. */
  me(): Observable<SessionUser> {
    return this.http.get<MeResponse>('/api/auth/me', this.quiet).pipe(map((r) => r.user));
  }

  /** Signs in with e-mail and password. */
  login(request: LoginRequest): Observable<SessionUser> {
    return this.http
      .post<MeResponse>('/api/auth/login', request, this.quiet)
      .pipe(map((r) => r.user));
  }

  /** Ends the session on the server. */
  logout(): Observable<void> {
    return this.http.post<void>('/api/auth/logout', null, this.quiet);
  }

  /** Saves the person's own name and time zone; answers with the updated person. */
  updateProfile(change: ProfileChange): Observable<SessionUser> {
    return this.http
      .patch<MeResponse | SessionUser>('/api/auth/me', change)
      .pipe(map((r) => ('user' in r ? r.user : r)));
  }

  /** Changes the signed-in person's password. */
  changePassword(currentPassword: string, newPassword: string): Observable<void> {
    return this.http.post<void>(
      '/api/auth/change-password',
      { currentPassword, newPassword },
      this.quiet,
    );
  }

  /** Asks for a reset link by e-mail; the server answers 202 whether or not the address exists. */
  requestPasswordReset(email: string): Observable<void> {
    return this.http.post<void>('/api/auth/password-reset', { email }, this.quiet);
  }

  /** Sets a new password with the one-time token from a reset e-mail. */
  resetPassword(token: string, password: string): Observable<void> {
    return this.http.post<void>('/api/auth/reset-password', { token, password }, this.quiet);
  }

  /** Accepts an invitation, which also signs the person in. */
  acceptInvitation(token: string, password: string, name?: string): Observable<SessionUser> {
    const body = name ? { token, password, name } : { token, password };
    return this.http
      .post<MeResponse>('/api/auth/accept-invitation', body, this.quiet)
      .pipe(map((r) => r.user));
  }
}
