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
import { nameMaxLength } from '@evalon/contracts/values';
import { SessionStore } from '../../core/session-store';
import { AuthFrame } from '../../shared/auth-frame/auth-frame';
import { applyServerErrors, matchesSibling, passwordValidator } from '../../shared/forms';

/** Accepts an invitation: the person sets a password (and may correct their name), then is in. */
@Component({
  selector: 'ev-accept-invitation',
  imports: [
    AuthFrame,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    ReactiveFormsModule,
    RouterLink,
  ],
  templateUrl: './accept-invitation.html',
  styleUrl: './accept-invitation.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AcceptInvitation {
  private readonly api = inject(AuthApi);
  private readonly session = inject(SessionStore);
  private readonly router = inject(Router);

  /** `?token=` from the invitation e-mail. */
  readonly token = input<string | undefined>();

  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', Validators.maxLength(nameMaxLength)],
    password: ['', [Validators.required, passwordValidator]],
    confirm: ['', [Validators.required, matchesSibling('password')]],
  });
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);

  constructor() {
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
    const { name, password } = this.form.getRawValue();
    try {
      const user = await firstValueFrom(
        this.api.acceptInvitation(token, password, name.trim() || undefined),
      );
      this.session.setUser(user);
      await this.router.navigateByUrl('/');
    } catch (error) {
      if (error instanceof ApiError && applyServerErrors(this.form, error.fieldErrors)) return;
      // The server words expired, used and unknown links itself (codes `token_*`, 400/410).
      this.problem.set(messageOf(error));
    } finally {
      this.busy.set(false);
    }
  }
}
