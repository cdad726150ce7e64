import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { Unit, UnitStatus } from '@evalon/contracts';
import { firstValueFrom } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { applyServerErrors } from '../../shared/forms';
import { padGtin, unitLimits, unitStatusLabels, unitStatuses } from '@evalon/contracts/values';
import { gtinValidator, trimmedMinLength } from '../catalog/catalog-validators';
import { UnitsApi } from './units-api';

/** A model or depot offered in the dialog's selects. */
export interface Choice {
  readonly id: number;
  readonly name: string;
}

/** What the unit dialog needs. */
export interface UnitDialogData {
  /** The unit to change; absent to add one. */
  readonly unit?: Unit;
  /** The lender's models (a new unit picks one; a unit never changes model). */
  readonly models: readonly Choice[];
  /** The lender's depots. */
  readonly depots: readonly Choice[];
  /** Model chosen beforehand for a new unit (e.g. from a filter). */
  readonly modelId?: number | null;
}

/** Adds a unit to a model, or changes a unit; closes with the saved unit. */
@Component({
  selector: 'ev-unit-dialog',
  imports: [
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    ReactiveFormsModule,
  ],
  templateUrl: './unit-dialog.html',
  styleUrl: './unit-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UnitDialog {
  protected readonly data = inject<UnitDialogData>(MAT_DIALOG_DATA);
  private readonly dialogRef = inject<MatDialogRef<UnitDialog, Unit>>(MatDialogRef);
  private readonly api = inject(UnitsApi);
  private readonly fb = inject(NonNullableFormBuilder);

  protected readonly statuses = unitStatuses;
  protected readonly statusLabels = unitStatusLabels;
  protected readonly limits = unitLimits;
  private readonly unit = this.data.unit;

  protected readonly form = this.fb.group({
    modelId: this.fb.control<number | null>(
      { value: this.unit?.modelId ?? this.data.modelId ?? null, disabled: !!this.unit },
      Validators.required,
    ),
    serialNumber: [
      this.unit?.serialNumber ?? '',
      [Validators.required, trimmedMinLength(1), Validators.maxLength(unitLimits.serialMax)],
    ],
    udiDi: [this.unit?.udiDi ?? '', gtinValidator],
    homeDepotId: this.fb.control<number | null>(
      this.unit?.homeDepotId ?? (this.data.depots.length === 1 ? this.data.depots[0]!.id : null),
      Validators.required,
    ),
    status: this.fb.control<UnitStatus>(this.unit?.status ?? 'active', Validators.required),
  });

  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);

  /** Pads a valid GTIN-8/12/13 to 14 digits when the field is left. */
  protected padUdi(): void {
    const control = this.form.controls.udiDi;
    const padded = padGtin(control.value);
    if (padded !== control.value) control.setValue(padded);
  }

  protected async submit(): Promise<void> {
    this.form.markAllAsTouched();
    if (this.form.invalid || this.busy()) return;
    const value = this.form.getRawValue();
    const details = {
      serialNumber: value.serialNumber.trim(),
      udiDi: value.udiDi.trim() === '' ? null : value.udiDi.trim(),
      homeDepotId: Number(value.homeDepotId),
      status: value.status,
    };
    this.busy.set(true);
    this.problem.set(null);
    try {
      const saved = await firstValueFrom(
        this.unit
          ? this.api.updateUnit(this.unit.id, details)
          : this.api.createUnit({ modelId: Number(value.modelId), ...details }),
      );
      this.dialogRef.close(saved);
    } catch (error) {
      if (error instanceof ApiError && error.code === 'serial_taken') {
        this.form.controls.serialNumber.setErrors({ server: error.message });
      } else if (!(error instanceof ApiError && applyServerErrors(this.form, error.fieldErrors))) {
        this.problem.set(messageOf(error));
      }
    } finally {
      this.busy.set(false);
    }
  }
}
