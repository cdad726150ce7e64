import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { Depot, DepotInput } from '@evalon/contracts';
import { firstValueFrom } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { applyServerErrors } from '../../shared/forms';
import { LenderCatalogApi } from './lender-catalog-api';
import { countryPattern, depotLimits, wallTimePattern } from '@evalon/contracts/values';
import { trimmedMinLength } from './catalog-validators';

/** What the depot dialog needs. */
export interface DepotDialogData {
  readonly lenderId: number;
  /** The depot to change; absent to add one. */
  readonly depot?: Depot;
}

/** Every IANA zone this browser knows, plus `zone` when it is missing from that list. */
export function timeZoneOptions(zone?: string | null): string[] {
  const zones = Intl.supportedValuesOf('timeZone');
  return zone && !zones.includes(zone) ? [...zones, zone].sort() : zones;
}

/** The English name of an ISO 3166-1 alpha-2 code, or null when the browser does not know it. */
export function countryName(code: string): string | null {
  if (!countryPattern.test(code)) return null;
  try {
    const name = new Intl.DisplayNames(['en'], { type: 'region', fallback: 'none' }).of(code);
    return name ?? null;
  } catch {
    return null;
  }
}

/** Adds a depot or changes one; closes with the saved depot. */
@Component({
  selector: 'ev-depot-dialog',
  imports: [
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    ReactiveFormsModule,
  ],
  templateUrl: './depot-dialog.html',
  styleUrl: './depot-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DepotDialog {
  protected readonly data = inject<DepotDialogData>(MAT_DIALOG_DATA);
  private readonly dialogRef = inject<MatDialogRef<DepotDialog, Depot>>(MatDialogRef);
  private readonly api = inject(LenderCatalogApi);
  private readonly fb = inject(NonNullableFormBuilder);

  protected readonly limits = depotLimits;
  protected readonly zones = timeZoneOptions(this.data.depot?.timeZone);
  private readonly depot = this.data.depot;

  protected readonly form = this.fb.group({
    name: [
      this.depot?.name ?? '',
      [
        Validators.required,
        trimmedMinLength(depotLimits.nameMin),
        Validators.maxLength(depotLimits.nameMax),
      ],
    ],
    addressLine: [
      this.depot?.addressLine ?? '',
      [
        Validators.required,
        trimmedMinLength(depotLimits.addressMin),
        Validators.maxLength(depotLimits.addressMax),
      ],
    ],
    city: [
      this.depot?.city ?? '',
      [Validators.required, trimmedMinLength(1), Validators.maxLength(depotLimits.cityMax)],
    ],
    postalCode: [this.depot?.postalCode ?? '', Validators.maxLength(depotLimits.postalCodeMax)],
    region: [this.depot?.region ?? '', Validators.maxLength(depotLimits.regionMax)],
    country: [
      this.depot?.country ?? '',
      [Validators.required, Validators.pattern(/^\s*[A-Za-z]{2}\s*$/)],
    ],
    latitude: this.fb.control<number | null>(this.depot?.latitude ?? null, [
      Validators.required,
      Validators.min(-90),
      Validators.max(90),
    ]),
    longitude: this.fb.control<number | null>(this.depot?.longitude ?? null, [
      Validators.required,
      Validators.min(-180),
      Validators.max(180),
    ]),
    timeZone: [this.depot?.timeZone ?? '', Validators.required],
    receivingHours: [
      this.depot?.receivingHours ?? '',
      Validators.maxLength(depotLimits.receivingHoursMax),
    ],
    cutoffTime: [
      this.depot?.cutoffTime ?? '15:00',
      [Validators.required, Validators.pattern(wallTimePattern)],
    ],
  });

  private readonly countryValue = toSignal(this.form.controls.country.valueChanges, {
    initialValue: this.form.controls.country.value,
  });
  /** The country's name under the code, so a typing slip shows at once. */
  protected readonly countryLabel = computed(() =>
    countryName(this.countryValue().trim().toUpperCase()),
  );

  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);

  protected async submit(): Promise<void> {
    this.form.markAllAsTouched();
    if (this.form.invalid || this.busy()) return;
    const value = this.form.getRawValue();
    const optional = (text: string) => (text.trim() === '' ? null : text.trim());
    // Normalised the way the contract's `depotInput` normalises (trimmed, upper-case country).
    const request: DepotInput = {
      name: value.name.trim(),
      addressLine: value.addressLine.trim(),
      city: value.city.trim(),
      postalCode: optional(value.postalCode),
      region: optional(value.region),
      country: value.country.trim().toUpperCase(),
      latitude: Number(value.latitude),
      longitude: Number(value.longitude),
      timeZone: value.timeZone,
      receivingHours: optional(value.receivingHours),
      cutoffTime: value.cutoffTime,
    };
    this.busy.set(true);
    this.problem.set(null);
    try {
      const saved = await firstValueFrom(
        this.depot
          ? this.api.updateDepot(this.data.lenderId, this.depot.id, request)
          : this.api.createDepot(this.data.lenderId, request),
      );
      this.dialogRef.close(saved);
    } catch (error) {
      if (!(error instanceof ApiError && applyServerErrors(this.form, error.fieldErrors))) {
        this.problem.set(messageOf(error));
      }
    } finally {
      this.busy.set(false);
    }
  }
}
