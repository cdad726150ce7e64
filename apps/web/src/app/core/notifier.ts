import { Injectable, inject } from '@angular/core';
import { MatSnackBar } from '@angular/material/snack-bar';
import { messageOf } from './api-error';

/** Short messages at the bottom of the screen after something finished (or failed). */
@Injectable({ providedIn: 'root' })
export class Notifier {
  private readonly snackBar = inject(MatSnackBar);

  /** Confirms that something worked. */
  success(message: string): void {
    this.snackBar.open(message, 'Dismiss', { duration: 5000, politeness: 'polite' });
  }

  /** Reports a failure; accepts a message or anything a request threw. */
  error(problem: unknown): void {
    const message = typeof problem === 'string' ? problem : messageOf(problem);
    this.snackBar.open(message, 'Dismiss', {
      duration: 10000,
      politeness: 'assertive',
      panelClass: 'ev-snack-error',
    });
  }
}
