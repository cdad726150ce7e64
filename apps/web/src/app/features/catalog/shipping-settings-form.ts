import {
  ChangeDetectionStrategy,
  Component,
  effect,
  inject,
  input,
  signal,
  untracked,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import {
  AbstractControl,
  FormArray,
  FormControl,
  FormGroup,
  NonNullableFormBuilder,
  ReactiveFormsModule,
  ValidationErrors,
  Validators,
} from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { ShippingSettings, ShippingSettingsResponse } from '@evalon/contracts';
import { DateTime } from 'luxon';
import { firstValueFrom } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { applyServerErrors } from '../../shared/forms';
import { LenderCatalogApi } from './lender-catalog-api';
import { shippingLimits } from '@evalon/contracts/values';
import { wholeNumberBetween } from './catalog-validators';

/** One bounded distance band: up to `maxKm` km takes `days` transit business days. */
type BandRow = FormGroup<{
  maxKm: FormControl<number | null>;
  days: FormControl<number | null>;
}>;

/**
 * A band must end further away than the one before it (contract: `shippingSettings`). Reads
 * the previous row through the form array, so the array re-checks every row when one changes.
 */
function endsAfterPrevious(control: AbstractControl): ValidationErrors | null {
  const row = control.parent;
  const rows = row?.parent;
  if (!(rows instanceof FormArray) || control.value === null || control.value === '') return null;
  const index = rows.controls.indexOf(row as BandRow);
  if (index <= 0) return null;
  const previous = (rows.at(index - 1) as BandRow).controls.maxKm.value;
  if (previous === null || Number.isNaN(Number(previous))) return null;
  return Number(control.value) > Number(previous)
    ? null
    : { order: `End this band further than ${previous} km, where the one before ends.` };
}

const dayControl = (fb: NonNullableFormBuilder, min = 0) =>
  fb.control<number | null>(null, [
    Validators.required,
    wholeNumberBetween(min, shippingLimits.daysMax),
  ]);

/**
 * A lender's shipping settings: the distance-band table (rows of "up to N km → D business
 * days", then an open last band for anything further), customs days, hospital lead days and
 * the days around a loan. The product defaults are assumptions each lender adjusts.
 */
@Component({
  selector: 'ev-shipping-settings-form',
  imports: [
    EmptyState,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    ReactiveFormsModule,
  ],
  templateUrl: './shipping-settings-form.html',
  styleUrl: './shipping-settings-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ShippingSettingsForm {
  private readonly api = inject(LenderCatalogApi);
  private readonly fb = inject(NonNullableFormBuilder);
  private readonly notifier = inject(Notifier);
  private readonly session = inject(SessionStore);

  /** The lender whose settings these are. */
  readonly lenderId = input.required<number>();

  protected readonly limits = shippingLimits;
  protected readonly form = this.fb.group({
    bands: this.fb.array<BandRow>([]),
    /** Transit days of the open last band (anything beyond the last bounded band). */
    beyondDays: dayControl(this.fb),
    customsDays: dayControl(this.fb),
    leadDays: dayControl(this.fb, shippingLimits.leadDaysMin),
    firstLoanLeadDays: dayControl(this.fb, shippingLimits.leadDaysMin),
    decontaminationDays: dayControl(this.fb),
    turnaroundDays: dayControl(this.fb),
  });
  protected readonly bands = this.form.controls.bands;

  protected readonly loading = signal(false);
  protected readonly loadError = signal<string | null>(null);
  protected readonly saving = signal(false);
  protected readonly problem = signal<string | null>(null);
  /** The settings as last loaded or saved. */
  protected readonly stored = signal<ShippingSettingsResponse | null>(null);

  constructor() {
    // A changed distance can break the order of the next row, so every row is checked again.
    this.bands.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => {
      for (const row of this.bands.controls) {
        row.controls.maxKm.updateValueAndValidity({ emitEvent: false });
      }
    });
    effect(() => {
      const id = this.lenderId();
      untracked(() => void this.load(id));
    });
  }

  /** Adds a bounded band before the open one, starting with the open band's days. */
  protected addBand(): void {
    this.bands.push(this.bandRow(null, this.form.controls.beyondDays.value));
    this.bands.markAsDirty();
    queueMicrotask(() => {
      const inputs = document.querySelectorAll<HTMLInputElement>('input[data-band-km]');
      inputs.item(inputs.length - 1)?.focus();
    });
  }

  protected removeBand(index: number): void {
    this.bands.removeAt(index);
    this.bands.markAsDirty();
  }

  /** Puts the form back to the values last loaded or saved. */
  protected revert(): void {
    const stored = this.stored();
    if (stored) this.fill(stored.settings);
    this.problem.set(null);
  }

  /** "Distance band 2", for the accessible names of a row's fields. */
  protected bandLabel(index: number): string {
    return `Distance band ${index + 1}`;
  }

  /** Where the band at `index` starts: "From 0 km", "Above 300 km". */
  protected bandStart(index: number): string {
    if (index === 0) return 'From 0 km';
    const previous = this.bands.at(index - 1)?.controls.maxKm.value;
    return `Above ${previous ?? '…'} km`;
  }

  protected reload(): void {
    void this.load(this.lenderId());
  }

  /** When the stored settings were last saved, in the person's zone. */
  protected savedAt(iso: string | null): string | null {
    if (!iso) return null;
    const at = DateTime.fromISO(iso, { zone: this.session.timeZone() });
    return at.isValid ? at.toLocaleString(DateTime.DATETIME_MED) : null;
  }

  protected async save(): Promise<void> {
    this.form.markAllAsTouched();
    this.problem.set(null);
    if (this.saving()) return;
    if (this.form.invalid) {
      this.problem.set('Some values need attention: they are marked in red.');
      return;
    }
    const lenderId = this.lenderId();
    this.saving.set(true);
    try {
      const saved = await firstValueFrom(
        this.api.saveShippingSettings(lenderId, this.toSettings()),
      );
      this.stored.set(saved);
      this.fill(saved.settings);
      this.notifier.success('Shipping settings saved. New searches and requests use them now.');
    } catch (error) {
      const fieldErrors = error instanceof ApiError ? this.mapServerPaths(error.fieldErrors) : {};
      if (!(error instanceof ApiError && applyServerErrors(this.form, fieldErrors))) {
        this.problem.set(messageOf(error));
      } else {
        this.problem.set(error.message);
      }
    } finally {
      this.saving.set(false);
    }
  }

  /** The settings as the API takes them: bounded bands, then the open band. */
  private toSettings(): ShippingSettings {
    const value = this.form.getRawValue();
    return {
      distanceBands: [
        ...value.bands.map((b) => ({ maxKm: Number(b.maxKm), days: Number(b.days) })),
        { maxKm: null, days: Number(value.beyondDays) },
      ],
      customsDays: Number(value.customsDays),
      leadDays: Number(value.leadDays),
      firstLoanLeadDays: Number(value.firstLoanLeadDays),
      decontaminationDays: Number(value.decontaminationDays),
      turnaroundDays: Number(value.turnaroundDays),
    };
  }

  /** Server paths (`distanceBands.2.maxKm`) as paths of this form. */
  private mapServerPaths(fieldErrors: Readonly<Record<string, string>>): Record<string, string> {
    const bounded = this.bands.length;
    const mapped: Record<string, string> = {};
    for (const [path, message] of Object.entries(fieldErrors)) {
      const band = /^distanceBands\.(\d+)\.(maxKm|days)$/.exec(path);
      if (!band) {
        mapped[path] = message;
        continue;
      }
      const index = Number(band[1]);
      if (index < bounded) mapped[`bands.${index}.${band[2]}`] = message;
      else mapped['beyondDays'] = message;
    }
    return mapped;
  }

  private bandRow(maxKm: number | null, days: number | null): BandRow {
    return this.fb.group({
      maxKm: this.fb.control<number | null>(maxKm, [
        Validators.required,
        Validators.min(1),
        endsAfterPrevious,
      ]),
      days: this.fb.control<number | null>(days, [
        Validators.required,
        wholeNumberBetween(0, shippingLimits.daysMax),
      ]),
    });
  }

  private fill(settings: ShippingSettings): void {
    this.bands.clear({ emitEvent: false });
    const bounded = settings.distanceBands.filter((b) => b.maxKm !== null);
    const open = settings.distanceBands.find((b) => b.maxKm === null);
    for (const band of bounded)
      this.bands.push(this.bandRow(band.maxKm, band.days), { emitEvent: false });
    this.form.patchValue({
      beyondDays: open?.days ?? bounded.at(-1)?.days ?? null,
      customsDays: settings.customsDays,
      leadDays: settings.leadDays,
      firstLoanLeadDays: settings.firstLoanLeadDays,
      decontaminationDays: settings.decontaminationDays,
      turnaroundDays: settings.turnaroundDays,
    });
    this.form.markAsPristine();
    this.form.markAsUntouched();
  }

  private async load(lenderId: number): Promise<void> {
    this.loading.set(true);
    this.loadError.set(null);
    try {
      const response = await firstValueFrom(this.api.shippingSettings(lenderId));
      if (lenderId !== this.lenderId()) return;
      this.stored.set(response);
      this.fill(response.settings);
    } catch (error) {
      if (lenderId === this.lenderId()) this.loadError.set(messageOf(error));
    } finally {
      if (lenderId === this.lenderId()) this.loading.set(false);
    }
  }
}
