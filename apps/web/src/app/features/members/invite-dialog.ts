import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { InviteRequest, Role } from '@evalon/contracts';
import { firstValueFrom } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { roleLabels } from '../../core/roles';
import { emailMaxLength, nameMaxLength } from '@evalon/contracts/values';
import { applyServerErrors } from '../../shared/forms';
import { MembersApi } from './members-api';

/** What the invite dialog needs to know. */
export interface InviteDialogData {
  readonly organisationId: number;
  readonly organisationName: string;
  /** Roles that can be given in this organisation. */
  readonly roles: readonly Role[];
}

/** Invites a person by e-mail; closes with the invited address once the server accepted it. */
@Component({
  selector: 'ev-invite-dialog',
  imports: [
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    ReactiveFormsModule,
  ],
  templateUrl: './invite-dialog.html',
  styleUrl: './invite-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class InviteDialog {
  protected readonly data = inject<InviteDialogData>(MAT_DIALOG_DATA);
  private readonly dialogRef = inject<MatDialogRef<InviteDialog, string>>(MatDialogRef);
  private readonly api = inject(MembersApi);

  protected readonly roleLabels = roleLabels;
  protected readonly form = inject(NonNullableFormBuilder).group({
    // `pattern(/\S/)`: the contract trims the name, so spaces alone count as empty.
    name: [
      '',
      [Validators.required, Validators.pattern(/\S/), Validators.maxLength(nameMaxLength)],
    ],
    email: ['', [Validators.required, Validators.email, Validators.maxLength(emailMaxLength)]],
    role: [
      this.data.roles.length === 1 ? this.data.roles[0] : ('' as Role | ''),
      Validators.required,
    ],
  });
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);

  protected async submit(): Promise<void> {
    this.form.markAllAsTouched();
    if (this.form.invalid || this.busy()) return;
    const { name, email, role } = this.form.getRawValue();
    if (!role) return;
    // The same normalising the contract applies (trimmed name; trimmed, lower-case address).
    const request: InviteRequest = { name: name.trim(), email: email.trim().toLowerCase(), role };
    this.busy.set(true);
    this.problem.set(null);
    try {
      await firstValueFrom(this.api.invite(this.data.organisationId, request), {
        defaultValue: undefined,
      });
      this.dialogRef.close(request.email);
    } catch (error) {
      if (error instanceof ApiError && error.status === 409) {
        this.form.controls.email.setErrors({ server: error.message });
      } else if (!(error instanceof ApiError && applyServerErrors(this.form, error.fieldErrors))) {
        this.problem.set(messageOf(error));
      }
    } finally {
      this.busy.set(false);
    }
  }
}
