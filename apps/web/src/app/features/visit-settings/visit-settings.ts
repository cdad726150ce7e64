import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  computed,
  effect,
  inject,
  signal,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import {
  minSupervisedCasesRange,
  signOffThresholdRange,
  type HospitalVisitSettings,
  type LenderVisitSettings,
} from '@evalon/contracts';
import type { Observable } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { SessionStore } from '../../core/session-store';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { PageHeader } from '../../shared/page-header/page-header';
import { VisitSettingsApi } from './visit-settings-api';

/** A whole number in `range`, or the message a person reads. */
function wholeNumberError(
  raw: string,
  range: { min: number; max: number },
  what: string,
): string | null {
  const text = raw.trim();
  if (!/^-?\d+$/.test(text)) return `Enter ${what} as a whole number.`;
  const n = Number(text);
  return n < range.min || n > range.max ? `Enter ${what} from ${range.min} to ${range.max}.` : null;
}

/** One model row: its field and the state of its save. */
interface ModelRow {
  modelId: number;
  name: string;
  control: FormControl<string>;
  effective: number;
  own: number | null;
}

/**
 * Visit settings of the active organisation. A lender's fleet manager sets, per model, the
 * supervised cases a proctor needs before being offered its visits (empty: the lender's
 * default); a hospital's buyer sets how many cases performed under supervision come before a
 * sign-off. Both are checked here and again on the server.
 */
@Component({
  selector: 'ev-visit-settings',
  imports: [
    Cautions,
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    PageHeader,
    ReactiveFormsModule,
  ],
  templateUrl: './visit-settings.html',
  styleUrl: './visit-settings.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VisitSettings {
  private readonly api = inject(VisitSettingsApi);
  private readonly session = inject(SessionStore);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly organisation = this.session.activeOrganisation;
  protected readonly isLender = computed(
    () => this.organisation()?.kind === 'lender' && this.session.hasAnyRole(['fleet_manager']),
  );
  protected readonly isHospital = computed(
    () => this.organisation()?.kind === 'hospital' && this.session.hasAnyRole(['buyer']),
  );
  protected readonly loading = signal(true);
  protected readonly loadError = signal<string | null>(null);
  protected readonly busy = signal<string | null>(null);
  protected readonly saved = signal<string | null>(null);
  protected readonly error = signal<string | null>(null);
  protected readonly lender = signal<LenderVisitSettings | null>(null);
  protected readonly hospital = signal<HospitalVisitSettings | null>(null);
  protected readonly rows = signal<ModelRow[]>([]);
  protected readonly minRange = minSupervisedCasesRange;
  protected readonly thresholdRange = signOffThresholdRange;
  protected readonly threshold = new FormControl('', {
    nonNullable: true,
    validators: [Validators.required],
  });

  constructor() {
    effect(() => {
      if (this.organisation()) this.load();
    });
  }

  protected load(): void {
    const org = this.organisation();
    if (!org) return;
    this.loading.set(true);
    this.loadError.set(null);
    const done = {
      error: (e: unknown) => {
        this.loadError.set(messageOf(e));
        this.loading.set(false);
      },
    };
    if (this.isLender()) {
      this.api
        .lender(org.id)
        .pipe(takeUntilDestroyed(this.destroyRef))
        .subscribe({ next: (s) => this.showLender(s), ...done });
    } else if (this.isHospital()) {
      this.api
        .hospital(org.id)
        .pipe(takeUntilDestroyed(this.destroyRef))
        .subscribe({ next: (s) => this.showHospital(s), ...done });
    } else {
      this.loading.set(false);
    }
  }

  private showLender(s: LenderVisitSettings): void {
    this.lender.set(s);
    this.rows.set(
      s.models.map((m) => ({
        modelId: m.modelId,
        name: m.name,
        effective: m.effective,
        own: m.minSupervisedCases,
        control: new FormControl(
          m.minSupervisedCases === null ? '' : String(m.minSupervisedCases),
          {
            nonNullable: true,
          },
        ),
      })),
    );
    this.loading.set(false);
  }

  private showHospital(s: HospitalVisitSettings): void {
    this.hospital.set(s);
    this.threshold.setValue(String(s.signOffThreshold));
    this.loading.set(false);
  }

  /** Saves one model's minimum; an empty field returns it to the lender's default. */
  protected saveModel(row: ModelRow): void {
    const raw = row.control.value;
    const problem =
      raw.trim() === ''
        ? null
        : wholeNumberError(raw, minSupervisedCasesRange, 'the minimum supervised cases');
    if (problem) {
      row.control.setErrors({ server: problem });
      row.control.markAsTouched();
      return;
    }
    const value = raw.trim() === '' ? null : Number(raw);
    this.save(
      `model-${row.modelId}`,
      this.api.setModelMinimum(row.modelId, value),
      (s) => {
        this.showLender(s);
        return `${row.name}: ${value === null ? `back to the default (${s.lenderDefault})` : `${value} supervised cases`}.`;
      },
      row.control,
    );
  }

  protected saveThreshold(): void {
    const problem = wholeNumberError(
      this.threshold.value,
      signOffThresholdRange,
      'the sign-off threshold',
    );
    if (problem) {
      this.threshold.setErrors({ server: problem });
      this.threshold.markAsTouched();
      return;
    }
    const org = this.organisation()!;
    this.save(
      'threshold',
      this.api.setThreshold(org.id, Number(this.threshold.value)),
      (s) => {
        this.showHospital(s);
        return `Sign-off after ${s.signOffThreshold} cases performed under supervision.`;
      },
      this.threshold,
    );
  }

  private save<T>(
    key: string,
    call: Observable<T>,
    done: (value: T) => string,
    control: FormControl<string>,
  ): void {
    this.busy.set(key);
    this.saved.set(null);
    this.error.set(null);
    call.pipe(takeUntilDestroyed(this.destroyRef)).subscribe({
      next: (value) => {
        this.busy.set(null);
        this.saved.set(done(value));
      },
      error: (e: unknown) => {
        this.busy.set(null);
        const field = e instanceof ApiError ? Object.values(e.fieldErrors)[0] : undefined;
        if (field) {
          control.setErrors({ server: field });
          control.markAsTouched();
        }
        this.error.set(messageOf(e));
      },
    });
  }
}
