import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { Loan } from '@evalon/contracts';
import { firstValueFrom } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { applyServerErrors } from '../../shared/forms';
import { reasonRule } from '@evalon/contracts/values';
import { trimmedMinLength } from '../catalog/catalog-validators';
import { ApprovalsApi } from './approvals-api';

/** What the decline dialog needs. */
export interface DeclineDialogData {
  readonly loan: Loan;
}

/** Declines a loan request with a reason the hospital reads; closes with the declined loan. */
@Component({
  selector: 'ev-decline-dialog',
  imports: [
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    ReactiveFormsModule,
  ],
  template: `
    <h2 mat-dialog-title>Decline {{ data.loan.reference }}?</h2>
    <mat-dialog-content>
      <p class="intro">
        {{ data.loan.hospitalName }} is told the loan is declined, with your reason. The units’
        dates are released for other requests.
      </p>
      <form [formGroup]="form" (ngSubmit)="submit()" novalidate id="decline-form">
        <mat-form-field appearance="outline">
          <mat-label>Reason for the hospital</mat-label>
          <textarea matInput formControlName="reason" rows="4" required></textarea>
          <mat-hint>E.g. “The unit is needed for a service recall on those dates.”</mat-hint>
          <mat-hint align="end"
            >{{ form.controls.reason.value.length }} / {{ rule.maxLength }}</mat-hint
          >
          @if (
            form.controls.reason.hasError('required') ||
            form.controls.reason.hasError('trimmedMinLength')
          ) {
            <mat-error>{{ rule.tooShort }}</mat-error>
          } @else if (form.controls.reason.hasError('maxlength')) {
            <mat-error>Use at most {{ rule.maxLength }} characters.</mat-error>
          } @else if (form.controls.reason.getError('server'); as message) {
            <mat-error>{{ message }}</mat-error>
          }
        </mat-form-field>
      </form>
      <div aria-live="assertive">
        @if (problem(); as message) {
          <p class="problem" role="alert">
            <mat-icon aria-hidden="true">error</mat-icon>
            <span>{{ message }}</span>
          </p>
        }
      </div>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" mat-dialog-close>Keep the request</button>
      <button
        mat-flat-button
        type="submit"
        form="decline-form"
        class="destructive"
        [disabled]="busy()"
      >
        {{ busy() ? 'Declining…' : 'Decline request' }}
      </button>
    </mat-dialog-actions>
  `,
  styles: `
    @use '@angular/material' as mat;
    .intro {
      margin: 0 0 20px;
      max-width: 52ch;
      color: var(--mat-sys-on-surface-variant);
    }
    mat-form-field {
      width: 100%;
    }
    .destructive {
      @include mat.button-overrides(
        (
          filled-container-color: var(--mat-sys-error),
          filled-label-text-color: var(--mat-sys-on-error),
        )
      );
    }
    .problem {
      display: flex;
      gap: 8px;
      margin: 8px 0 0;
      padding: 10px 12px;
      border-radius: var(--mat-sys-corner-small);
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeclineDialog {
  protected readonly data = inject<DeclineDialogData>(MAT_DIALOG_DATA);
  private readonly dialogRef = inject<MatDialogRef<DeclineDialog, Loan>>(MatDialogRef);
  private readonly api = inject(ApprovalsApi);

  protected readonly rule = reasonRule;
  protected readonly form = inject(NonNullableFormBuilder).group({
    reason: [
      '',
      [
        Validators.required,
        trimmedMinLength(reasonRule.minLength),
        Validators.maxLength(reasonRule.maxLength),
      ],
    ],
  });
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);

  protected async submit(): Promise<void> {
    this.form.markAllAsTouched();
    if (this.form.invalid || this.busy()) return;
    this.busy.set(true);
    this.problem.set(null);
    try {
      const loan = await firstValueFrom(
        this.api.decline(this.data.loan.id, this.form.controls.reason.value.trim()),
      );
      this.dialogRef.close(loan);
    } catch (error) {
      if (!(error instanceof ApiError && applyServerErrors(this.form, error.fieldErrors))) {
        this.problem.set(messageOf(error));
      }
    } finally {
      this.busy.set(false);
    }
  }
}
