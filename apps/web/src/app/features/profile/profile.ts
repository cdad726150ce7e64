import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  signal,
  untracked,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { firstValueFrom } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { AuthApi } from '../../core/auth-api';
import { nameMaxLength } from '@evalon/contracts/values';
import { Notifier } from '../../core/notifier';
import { roleLabels } from '../../core/roles';
import { SessionStore } from '../../core/session-store';
import { applyServerErrors, matchesSibling, passwordValidator } from '../../shared/forms';
import { PageHeader } from '../../shared/page-header/page-header';

/** Every IANA zone the browser knows, plus `zone` when it is missing (e.g. an alias or UTC). */
export function timeZoneChoices(zone: string | null | undefined): string[] {
  const zones = Intl.supportedValuesOf('timeZone');
  const extra = ['UTC', zone].filter((z): z is string => !!z && !zones.includes(z));
  return [...zones, ...extra].sort((a, b) => a.localeCompare(b));
}

/** The person's own name, time zone and password. */
@Component({
  selector: 'ev-profile',
  imports: [
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    PageHeader,
    ReactiveFormsModule,
  ],
  templateUrl: './profile.html',
  styleUrl: './profile.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Profile {
  private readonly api = inject(AuthApi);
  private readonly notifier = inject(Notifier);
  protected readonly session = inject(SessionStore);
  private readonly fb = inject(NonNullableFormBuilder);

  protected readonly browserZone = Intl.DateTimeFormat().resolvedOptions().timeZone;
  protected readonly zones = timeZoneChoices(this.session.user()?.timeZone ?? this.browserZone);

  protected readonly details = this.fb.group({
    name: ['', [Validators.required, Validators.maxLength(nameMaxLength)]],
    timeZone: ['', Validators.required],
  });
  protected readonly passwords = this.fb.group({
    currentPassword: ['', Validators.required],
    newPassword: ['', [Validators.required, passwordValidator]],
    confirm: ['', [Validators.required, matchesSibling('newPassword')]],
  });
  protected readonly savingDetails = signal(false);
  protected readonly savingPassword = signal(false);
  protected readonly detailsProblem = signal<string | null>(null);
  protected readonly passwordProblem = signal<string | null>(null);

  protected readonly memberships = computed(() =>
    (this.session.user()?.memberships ?? []).map((m) => ({
      key: `${m.organisationId}-${m.role}`,
      organisation: m.organisationName,
      role: roleLabels[m.role],
    })),
  );

  constructor() {
    // Fill the form from the session; later session updates (after saving) refill it too.
    effect(() => {
      const user = this.session.user();
      untracked(() =>
        this.details.reset({
          name: user?.name ?? '',
          timeZone: user?.timeZone || this.browserZone,
        }),
      );
    });
    this.passwords.controls.newPassword.valueChanges
      .pipe(takeUntilDestroyed())
      .subscribe(() =>
        this.passwords.controls.confirm.updateValueAndValidity({ emitEvent: false }),
      );
  }

  protected async saveDetails(): Promise<void> {
    this.details.markAllAsTouched();
    if (this.details.invalid || this.savingDetails()) return;
    this.savingDetails.set(true);
    this.detailsProblem.set(null);
    const { name, timeZone } = this.details.getRawValue();
    try {
      const user = await firstValueFrom(this.api.updateProfile({ name: name.trim(), timeZone }));
      this.session.setUser(user);
      this.notifier.success('Your details are saved.');
    } catch (error) {
      if (!(error instanceof ApiError && applyServerErrors(this.details, error.fieldErrors))) {
        this.detailsProblem.set(messageOf(error));
      }
    } finally {
      this.savingDetails.set(false);
    }
  }

  protected async changePassword(): Promise<void> {
    this.passwords.markAllAsTouched();
    if (this.passwords.invalid || this.savingPassword()) return;
    this.savingPassword.set(true);
    this.passwordProblem.set(null);
    const { currentPassword, newPassword } = this.passwords.getRawValue();
    try {
      await firstValueFrom(this.api.changePassword(currentPassword, newPassword), {
        defaultValue: undefined,
      });
      this.passwords.reset();
      this.notifier.success('Your password is changed.');
    } catch (error) {
      if (
        error instanceof ApiError &&
        (error.code === 'invalid_current_password' || error.code === 'invalid_credentials')
      ) {
        this.passwords.controls.currentPassword.setErrors({
          server: 'That isn’t your current password.',
        });
      } else if (!(
        error instanceof ApiError && applyServerErrors(this.passwords, error.fieldErrors)
      )) {
        this.passwordProblem.set(messageOf(error));
      }
    } finally {
      this.savingPassword.set(false);
    }
  }
}
