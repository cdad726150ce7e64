import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { provideNativeDateAdapter } from '@angular/material/core';
import { MatDatepickerModule } from '@angular/material/datepicker';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { Hold, Unit } from '@evalon/contracts';
import { firstValueFrom } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { applyServerErrors } from '../../shared/forms';
import { describeZone, fromIsoDate, toIsoDate } from '../../shared/iso-date';
import { maintenanceReasonLimits } from '@evalon/contracts/values';
import { trimmedMinLength } from '../catalog/catalog-validators';
import { UnitsApi } from './units-api';

/** What the maintenance dialog needs. */
export interface MaintenanceDialogData {
  readonly unit: Unit;
  /** First day offered, e.g. a day clicked in the calendar. */
  readonly start?: string | null;
}

/** A conflict the server reported: the blocked days overlap a loan or other maintenance. */
interface Conflict {
  readonly message: string;
}

/**
 * Blocks a unit for maintenance over a range of days (its depot's calendar) with a reason.
 * When the days overlap a loan's footprint or other maintenance the server answers 409 and the
 * dialog stays open with its explanation, so the dates can be moved.
 */
@Component({
  selector: 'ev-maintenance-dialog',
  imports: [
    MatButtonModule,
    MatDatepickerModule,
    MatDialogModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    ReactiveFormsModule,
  ],
  providers: [provideNativeDateAdapter()],
  templateUrl: './maintenance-dialog.html',
  styleUrl: './maintenance-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MaintenanceDialog {
  protected readonly data = inject<MaintenanceDialogData>(MAT_DIALOG_DATA);
  private readonly dialogRef = inject<MatDialogRef<MaintenanceDialog, Hold>>(MatDialogRef);
  private readonly api = inject(UnitsApi);
  private readonly fb = inject(NonNullableFormBuilder);

  protected readonly limits = maintenanceReasonLimits;
  protected readonly zone = describeZone(this.data.unit.homeDepotTimeZone);
  protected readonly form = this.fb.group({
    start: this.fb.control<Date | null>(
      this.data.start ? fromIsoDate(this.data.start) : null,
      Validators.required,
    ),
    end: this.fb.control<Date | null>(
      this.data.start ? fromIsoDate(this.data.start) : null,
      Validators.required,
    ),
    reason: [
      '',
      [
        Validators.required,
        trimmedMinLength(maintenanceReasonLimits.min),
        Validators.maxLength(maintenanceReasonLimits.max),
      ],
    ],
  });

  protected readonly busy = signal(false);
  protected readonly conflict = signal<Conflict | null>(null);
  protected readonly problem = signal<string | null>(null);

  constructor() {
    // Typing a new first day can make the old last day "before the first" and the other way
    // round; each change re-checks the other end once the range picker has taken the new value
    // (it records it after the control reports it, hence the microtask).
    const { start, end } = this.form.controls;
    const recheck = (other: typeof start) =>
      queueMicrotask(() => other.updateValueAndValidity({ emitEvent: false }));
    start.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => recheck(end));
    end.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => recheck(start));
  }

  protected async submit(): Promise<void> {
    this.form.controls.start.updateValueAndValidity({ emitEvent: false });
    this.form.controls.end.updateValueAndValidity({ emitEvent: false });
    this.form.markAllAsTouched();
    if (this.form.invalid || this.busy()) return;
    const { start, end, reason } = this.form.getRawValue();
    if (!start || !end) return;
    this.busy.set(true);
    this.conflict.set(null);
    this.problem.set(null);
    try {
      const hold = await firstValueFrom(
        this.api.addMaintenance(this.data.unit.id, {
          start: toIsoDate(start),
          end: toIsoDate(end),
          reason: reason.trim(),
        }),
      );
      this.dialogRef.close(hold);
    } catch (error) {
      if (error instanceof ApiError && error.status === 409) {
        this.conflict.set({ message: error.message });
      } else if (!(error instanceof ApiError && applyServerErrors(this.form, error.fieldErrors))) {
        this.problem.set(messageOf(error));
      }
    } finally {
      this.busy.set(false);
    }
  }
}
