import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { ApiError, describeWait, messageOf } from '../../core/api-error';
import { AuthApi, googleSignInUrl } from '../../core/auth-api';
import { SessionStore } from '../../core/session-store';
import { AuthFrame } from '../../shared/auth-frame/auth-frame';

/** The words for a deactivated account, whichever way the person tried to sign in. */
const deactivatedMessage =
  'This account has been deactivated. Ask someone who manages members of your organisation to reactivate it.';

/**
 * Messages for every `?error=` code the Google sign-in callback sends back (the contract's
 * `SignInRedirectError`); an unknown code falls back to a general line.
 */
const googleErrors: Record<string, string> = {
  google_unknown:
    'That Google account isn’t linked to anyone in Evalon yet. Ask your organisation to invite you with that e-mail address, or sign in with your e-mail and password.',
  google_unverified:
    'Google hasn’t confirmed that e-mail address, so Evalon can’t use it. Sign in with your e-mail and password instead.',
  google_mismatch:
    'That Google account isn’t the one linked to this Evalon account. Choose the other Google account, or sign in with your e-mail and password.',
  google_cancelled: 'Signing in with Google was cancelled. Try again when you’re ready.',
  google_failed:
    'Signing in with Google didn’t finish. Try again, or sign in with your e-mail and password.',
  account_deactivated: deactivatedMessage,
};

/** Messages for `?reason=` that explain why someone landed here. */
const reasons: Record<string, string> = {
  expired: 'Your session has ended. Sign in again to carry on where you were.',
  'signed-out': 'You’re signed out. See you soon.',
  'password-changed': 'Your password has been changed. Sign in with the new one.',
};

/** Words for a failed sign-in, by the server's error code. */
export function signInFailureMessage(error: unknown): string {
  if (!(error instanceof ApiError)) return messageOf(error);
  switch (error.code) {
    case 'invalid_credentials':
      return 'That e-mail address and password don’t match. Check both and try again.';
    case 'account_deactivated':
      return deactivatedMessage;
    // The server's sign-in limiter answers 429 `too_many_attempts` (server/src/http/rate-limits.ts).
    case 'too_many_attempts':
    case 'rate_limited':
      return error.retryAfterSeconds !== null
        ? `Too many sign-in attempts. Try again in ${describeWait(error.retryAfterSeconds)}.`
        : 'Too many sign-in attempts. Wait a few minutes and try again.';
    default:
      return error.message;
  }
}

/** Sign in with e-mail and password, or with Google. */
@Component({
  selector: 'ev-sign-in',
  imports: [
    AuthFrame,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    ReactiveFormsModule,
    RouterLink,
  ],
  templateUrl: './sign-in.html',
  styleUrl: './sign-in.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignIn {
  private readonly api = inject(AuthApi);
  private readonly session = inject(SessionStore);
  private readonly router = inject(Router);

  /** `?error=` from the Google callback. */
  readonly error = input<string | undefined>();
  /** `?reason=` explaining why sign-in opened. */
  readonly reason = input<string | undefined>();
  /** `?returnUrl=`: where to go after signing in. */
  readonly returnUrl = input<string | undefined>();

  protected readonly googleUrl = googleSignInUrl;
  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, Validators.email]],
    password: ['', Validators.required],
  });
  protected readonly busy = signal(false);
  protected readonly showPassword = signal(false);
  private readonly failure = signal<string | null>(null);
  /** Whether the person has tried to sign in on this page (then the link's error is old news). */
  private readonly tried = signal(false);

  /** The problem to show: the last attempt's, else one the Google callback reported. */
  protected readonly problem = computed(() => {
    if (this.failure()) return this.failure();
    const code = this.error();
    if (this.tried() || !code) return null;
    return googleErrors[code] ?? 'Signing in didn’t finish. Try again.';
  });

  protected readonly notice = computed(() => {
    const reason = this.reason();
    return !this.problem() && reason ? (reasons[reason] ?? null) : null;
  });

  protected async submit(): Promise<void> {
    this.form.markAllAsTouched();
    if (this.form.invalid || this.busy()) return;
    this.busy.set(true);
    this.failure.set(null);
    this.tried.set(true);
    try {
      const user = await firstValueFrom(this.api.login(this.form.getRawValue()));
      this.session.setUser(user);
      await this.router.navigateByUrl(this.safeReturnUrl());
    } catch (error) {
      this.failure.set(signInFailureMessage(error));
      this.form.controls.password.reset();
    } finally {
      this.busy.set(false);
    }
  }

  /** Only in-app paths: `/x` but not `//host` or `/\host`, which browsers treat as other sites. */
  private safeReturnUrl(): string {
    const url = this.returnUrl();
    return url && /^\/(?![/\\])/.test(url) && !url.startsWith('/sign-in') ? url : '/';
  }
}
