import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import type { Loan } from '@evalon/contracts';
import { messageOf } from '../../core/api-error';
import { reasonRule } from '@evalon/contracts/values';
import { LoanApi } from './loan-api';

/** The loan to cancel. */
export interface CancelDialogData {
  readonly loan: Loan;
}

/**
 * Confirms cancelling a loan and asks why (the reason goes into the loan's history and to the
 * lender). Sends the cancellation itself and closes with the updated loan; a failure stays in
 * the dialog so the reason is not lost.
 */
@Component({
  selector: 'ev-cancel-dialog',
  imports: [
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    ReactiveFormsModule,
  ],
  template: `
    <h2 mat-dialog-title>Cancel {{ data.loan.reference }}?</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content>
        <p>
          The lender is told at once and the units are freed for other hospitals. A cancelled loan
          can’t be brought back; you would send a new request.
        </p>
        <mat-form-field appearance="outline" class="reason">
          <mat-label>Why are you cancelling?</mat-label>
          <textarea
            matInput
            [formControl]="reason"
            rows="3"
            [maxlength]="rule.maxLength"
            cdkFocusInitial
            required
          ></textarea>
          <mat-hint>The lender sees this in the loan’s history.</mat-hint>
          @if (reason.hasError('required')) {
            <mat-error>Say why in a few words.</mat-error>
          } @else if (reason.hasError('minlength')) {
            <mat-error>{{ rule.tooShort }}</mat-error>
          }
        </mat-form-field>
        <p class="error" role="alert" aria-live="assertive">{{ error() }}</p>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" [mat-dialog-close]="undefined" [disabled]="busy()">
          Keep the loan
        </button>
        <button mat-flat-button type="submit" class="destructive" [disabled]="busy()">
          {{ busy() ? 'Cancelling…' : 'Cancel loan' }}
        </button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    @use '@angular/material' as mat;
    p {
      margin: 0 0 16px;
      max-width: 52ch;
    }
    .reason {
      width: 100%;
    }
    .error {
      min-height: 1px;
      margin: 0;
      color: var(--mat-sys-error);
    }
    .destructive {
      @include mat.button-overrides(
        (
          filled-container-color: var(--mat-sys-error),
          filled-label-text-color: var(--mat-sys-on-error),
        )
      );
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CancelDialog {
  private readonly api = inject(LoanApi);
  private readonly ref = inject<MatDialogRef<CancelDialog, Loan>>(MatDialogRef);
  protected readonly data = inject<CancelDialogData>(MAT_DIALOG_DATA);
  protected readonly rule = reasonRule;

  protected readonly reason = new FormControl('', {
    nonNullable: true,
    validators: [
      Validators.required,
      (c) =>
        c.value.trim().length >= reasonRule.minLength || !c.value ? null : { minlength: true },
      Validators.maxLength(reasonRule.maxLength),
    ],
  });
  protected readonly form = new FormGroup({ reason: this.reason });
  protected readonly busy = signal(false);
  protected readonly error = signal('');

  protected submit(): void {
    this.reason.markAsTouched();
    if (this.reason.invalid || this.busy()) return;
    this.busy.set(true);
    this.error.set('');
    this.api.cancel(this.data.loan.id, this.reason.value.trim()).subscribe({
      next: (loan) => this.ref.close(loan),
      error: (error: unknown) => {
        this.busy.set(false);
        this.error.set(messageOf(error));
      },
    });
  }
}
