import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  LOCALE_ID,
  computed,
  inject,
  signal,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import type { Candidate, Model, Site } from '@evalon/contracts';
import { ApiError, messageOf } from '../../core/api-error';
import { SessionStore } from '../../core/session-store';
import { CatalogApi } from '../../shared/catalog-api';
import { Cautions } from '../../shared/cautions/cautions';
import { moneyText } from '../../shared/formats';
import { applyServerErrors } from '../../shared/forms';
import { PageHeader } from '../../shared/page-header/page-header';
import { VisitApi } from './visit-api';

/**
 * Ask for a proctor: campus, platform model, case days (prefilled from a confirmed loan), then
 * the ranked candidates with their reasons and the excluded ones with why. The requester picks
 * whom to ask, in order, or lets Evalon ask the top-ranked; one proctor is asked at a time.
 */
@Component({
  selector: 'ev-visit-request',
  imports: [
    Cautions,
    MatButtonModule,
    MatCardModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    PageHeader,
    ReactiveFormsModule,
    RouterLink,
  ],
  templateUrl: './visit-request.html',
  styleUrl: './visit-request.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VisitRequest {
  private readonly api = inject(VisitApi);
  private readonly catalog = inject(CatalogApi);
  private readonly session = inject(SessionStore);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);
  private readonly locale = inject(LOCALE_ID);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly form = new FormGroup({
    siteId: new FormControl<number | null>(null, Validators.required),
    modelId: new FormControl<number | null>(null, Validators.required),
    from: new FormControl('', { nonNullable: true, validators: Validators.required }),
    to: new FormControl('', { nonNullable: true, validators: Validators.required }),
    cases: new FormControl(3, {
      nonNullable: true,
      validators: [Validators.required, Validators.min(1), Validators.max(50)],
    }),
    language: new FormControl('', { nonNullable: true }),
    note: new FormControl('', { nonNullable: true }),
  });

  /** The confirmed loan the request comes from, if any. */
  protected readonly loanId = signal<number | null>(null);
  private readonly sites = signal<Site[]>([]);
  protected readonly models = signal<Model[]>([]);
  protected readonly campuses = computed(() => {
    const organisationId = this.session.activeOrganisation()?.id;
    return this.sites().filter(
      (s) =>
        s.kind === 'campus' &&
        (organisationId === undefined || s.organisationId === organisationId),
    );
  });

  protected readonly candidates = signal<Candidate[] | null>(null);
  protected readonly eligible = computed(() => (this.candidates() ?? []).filter((c) => c.eligible));
  protected readonly excluded = computed(() =>
    (this.candidates() ?? []).filter((c) => !c.eligible),
  );
  /** Picked proctors in the order they will be asked. */
  protected readonly picked = signal<number[]>([]);
  protected readonly searching = signal(false);
  protected readonly sending = signal(false);
  protected readonly error = signal<string | null>(null);

  constructor() {
    const q = this.route.snapshot.queryParamMap;
    const num = (name: string) =>
      q.get(name) && /^\d+$/.test(q.get(name)!) ? Number(q.get(name)) : null;
    this.loanId.set(num('loanId'));
    this.form.patchValue({
      siteId: num('siteId'),
      modelId: num('modelId'),
      from: q.get('from') ?? '',
      to: q.get('to') ?? '',
    });
    this.catalog
      .sites()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (s) => this.sites.set(s),
        error: (e: unknown) => this.error.set(messageOf(e)),
      });
    this.catalog
      .models()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (m) => this.models.set(m),
        error: (e: unknown) => this.error.set(messageOf(e)),
      });
  }

  protected money(c: Candidate): string {
    return moneyText(c.feeEstimate, this.locale);
  }

  /** Position (1-based) of a picked proctor, or null. */
  protected positionOf(id: number): number | null {
    const i = this.picked().indexOf(id);
    return i < 0 ? null : i + 1;
  }

  protected toggle(id: number): void {
    this.picked.update((list) =>
      list.includes(id) ? list.filter((x) => x !== id) : [...list, id],
    );
  }

  protected search(): void {
    this.form.markAllAsTouched();
    const v = this.form.getRawValue();
    if (this.form.invalid || v.siteId === null || v.modelId === null) return;
    this.searching.set(true);
    this.error.set(null);
    this.picked.set([]);
    this.api
      .candidates({
        siteId: v.siteId,
        modelId: v.modelId,
        from: v.from,
        to: v.to,
        language: v.language,
      })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (items) => {
          this.candidates.set(items);
          this.searching.set(false);
        },
        error: (e: unknown) => {
          this.error.set(messageOf(e));
          this.searching.set(false);
        },
      });
  }

  protected send(): void {
    const v = this.form.getRawValue();
    if (this.form.invalid || v.siteId === null || v.modelId === null) return;
    this.sending.set(true);
    this.error.set(null);
    this.api
      .request({
        siteId: v.siteId,
        modelId: v.modelId,
        ...(this.loanId() ? { loanId: this.loanId()! } : {}),
        kind: 'proctoring',
        from: v.from,
        to: v.to,
        cases: v.cases,
        ...(v.language.trim() ? { language: v.language.trim() } : {}),
        ...(v.note.trim() ? { note: v.note.trim() } : {}),
        ...(this.picked().length ? { proctorIds: this.picked() } : {}),
      })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (visit) => void this.router.navigate(['/visits', visit.id]),
        error: (e: unknown) => {
          this.sending.set(false);
          if (e instanceof ApiError) applyServerErrors(this.form, e.fieldErrors);
          this.error.set(messageOf(e));
        },
      });
  }
}
