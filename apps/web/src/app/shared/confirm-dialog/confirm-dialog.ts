import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialog, MatDialogModule } from '@angular/material/dialog';
import { Observable, map } from 'rxjs';

/** What the confirmation asks. */
export interface ConfirmDialogData {
  /** Short question, e.g. "Deactivate Sam Ortiz?" */
  readonly title: string;
  /** What will happen, in plain words. */
  readonly message: string;
  /** Label of the confirming button, a verb ("Deactivate"). */
  readonly confirmLabel: string;
  /** Label of the cancelling button. */
  readonly cancelLabel?: string;
  /** Whether the action takes something away (the confirming button then uses the error colour). */
  readonly destructive?: boolean;
}

/** Asks people to confirm an action before it happens. */
@Component({
  selector: 'ev-confirm-dialog',
  imports: [MatButtonModule, MatDialogModule],
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <mat-dialog-content>
      <p>{{ data.message }}</p>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" [mat-dialog-close]="false">
        {{ data.cancelLabel ?? 'Cancel' }}
      </button>
      <button
        mat-flat-button
        type="button"
        [class.destructive]="data.destructive"
        [mat-dialog-close]="true"
      >
        {{ data.confirmLabel }}
      </button>
    </mat-dialog-actions>
  `,
  styles: `
    @use '@angular/material' as mat;
    p {
      margin: 0;
      max-width: 48ch;
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
export class ConfirmDialog {
  protected readonly data = inject<ConfirmDialogData>(MAT_DIALOG_DATA);
}

/** Opens a {@link ConfirmDialog}; emits true only when the person confirmed. */
export function confirmAction(dialog: MatDialog, data: ConfirmDialogData): Observable<boolean> {
  return dialog
    .open<ConfirmDialog, ConfirmDialogData, boolean>(ConfirmDialog, {
      data,
      width: '440px',
      maxWidth: 'calc(100vw - 32px)',
      role: 'alertdialog',
    })
    .afterClosed()
    .pipe(map((answer) => answer === true));
}
