import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { Router, RouterLink } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { AuthApi } from '../../core/auth-api';
import { AuthFrame } from '../../shared/auth-frame/auth-frame';
import { applyServerErrors, matchesSibling, passwordValidator } from '../../shared/forms';

/** Sets a new password with the token from a reset e-mail. */
@Component({
  selector: 'ev-reset-password',
  imports: [
    AuthFrame,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    ReactiveFormsModule,
    RouterLink,
  ],
  templateUrl: './reset-password.html',
  styleUrl: './password-reset.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResetPassword {
  private readonly api = inject(AuthApi);
  private readonly router = inject(Router);

  /** `?token=` from the e-mailed link. */
  readonly token = input<string | undefined>();

  protected readonly form = inject(NonNullableFormBuilder).group({
    password: ['', [Validators.required, passwordValidator]],
    confirm: ['', [Validators.required, matchesSibling('password')]],
  });
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);

  constructor() {
    // The confirmation must be re-checked when the first field changes after it.
    this.form.controls.password.valueChanges
      .pipe(takeUntilDestroyed())
      .subscribe(() => this.form.controls.confirm.updateValueAndValidity({ emitEvent: false }));
  }

  protected async submit(): Promise<void> {
    this.form.markAllAsTouched();
    const token = this.token();
    if (!token || this.form.invalid || this.busy()) return;
    this.busy.set(true);
    this.problem.set(null);
    try {
      await firstValueFrom(this.api.resetPassword(token, this.form.getRawValue().password), {
        defaultValue: undefined,
      });
      await this.router.navigate(['/sign-in'], { queryParams: { reason: 'password-changed' } });
    } catch (error) {
      if (error instanceof ApiError && applyServerErrors(this.form, error.fieldErrors)) return;
      // The server words expired, used and unknown links itself (codes `token_*`, 400/410).
      this.problem.set(messageOf(error));
    } finally {
      this.busy.set(false);
    }
  }
}
