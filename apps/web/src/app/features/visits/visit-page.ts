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
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { ActivatedRoute, RouterLink } from '@angular/router';
import {
  competencies,
  competencyLabels,
  traineeRoles,
  withdrawReasonMinLength,
  type CaseRecordInput,
  type VisitDetail,
} from '@evalon/contracts';
import { interval } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { SessionStore } from '../../core/session-store';
import { Cautions } from '../../shared/cautions/cautions';
import { confirmAction } from '../../shared/confirm-dialog/confirm-dialog';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { moneyText } from '../../shared/formats';
import { applyServerErrors } from '../../shared/forms';
import { formatInstant, formatWindow, todayIn } from '../../shared/iso-date';
import { PageHeader } from '../../shared/page-header/page-header';
import {
  timeLeft,
  traineeRoleLabels,
  visitEventLabels,
  visitStateLabels,
} from '../../shared/visit-rules';
import { VisitApi } from './visit-api';

/**
 * One visit: facts, the offer waiting (with its countdown), the timeline, the supervised cases
 * and the sign-offs. The hospital cancels or widens the search; the offered proctor accepts or
 * declines; the visit's proctor records cases and signs trainees off.
 */
@Component({
  selector: 'ev-visit-page',
  imports: [
    Cautions,
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    PageHeader,
    ReactiveFormsModule,
    RouterLink,
  ],
  templateUrl: './visit-page.html',
  styleUrl: './visit-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VisitPage {
  private readonly api = inject(VisitApi);
  private readonly session = inject(SessionStore);
  private readonly route = inject(ActivatedRoute);
  private readonly locale = inject(LOCALE_ID);
  private readonly destroyRef = inject(DestroyRef);
  private readonly dialog = inject(MatDialog);

  protected readonly visit = signal<VisitDetail | null>(null);
  protected readonly loadError = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  private readonly now = signal(Date.now());

  protected readonly stateLabels = visitStateLabels;
  protected readonly eventLabels = visitEventLabels;
  protected readonly roleLabels = traineeRoleLabels;
  protected readonly competencies = competencies;
  protected readonly competencyLabels = competencyLabels;
  protected readonly traineeRoles = traineeRoles;

  private readonly userId = computed(() => this.session.user()?.id ?? null);
  protected readonly isHospital = computed(() => this.session.hasAnyRole(['buyer', 'clinician']));
  /** Whether the signed-in proctor holds the live offer. */
  protected readonly holdsOffer = computed(() => {
    const v = this.visit();
    return !!v?.currentOffer && v.currentOffer.proctorId === this.userId();
  });
  /** Whether the signed-in person is the visit's proctor. */
  protected readonly isVisitProctor = computed(() => {
    const v = this.visit();
    return !!v && v.proctorId !== null && v.proctorId === this.userId();
  });
  protected readonly canRecord = computed(
    () =>
      this.isVisitProctor() &&
      ['accepted', 'completed', 'signed_off'].includes(this.visit()?.state ?? ''),
  );
  /** Whether the visit's proctor may still withdraw: accepted and before the first day there. */
  protected readonly canWithdraw = computed(() => {
    const v = this.visit();
    return (
      !!v &&
      this.isVisitProctor() &&
      v.state === 'accepted' &&
      todayIn(v.siteTimeZone, new Date(this.now())) < v.from
    );
  });
  /** Whether cases can be recorded today: from the visit's first day on (campus calendar). */
  protected readonly casesOpen = computed(() => {
    const v = this.visit();
    return !!v && todayIn(v.siteTimeZone, new Date(this.now())) >= v.from;
  });
  protected readonly canCancel = computed(
    () =>
      this.isHospital() &&
      ['requested', 'offered', 'accepted', 'unfilled'].includes(this.visit()?.state ?? ''),
  );
  /** A line on where the visit stands, for the "Now" card. */
  protected readonly nowText = computed(() => {
    const v = this.visit();
    if (!v) return '';
    switch (v.state) {
      case 'requested':
        return 'Evalon is lining up the first proctor.';
      case 'offered':
        return 'One proctor at a time is asked; if they decline or the deadline passes, the next is asked.';
      case 'accepted':
        return `${v.proctorName} comes on the case days; the calendar invite went to both sides.`;
      case 'completed':
        return 'The visit is done; trainees who reached the threshold can be signed off.';
      case 'signed_off':
        return 'Signed off; the one-page record is below and went to the hospital’s buyers.';
      case 'cancelled':
        return 'This visit was cancelled.';
      case 'unfilled':
        return 'Nobody on the list could take the visit.';
    }
  });
  protected readonly countdown = computed(() => {
    const offer = this.visit()?.currentOffer;
    return offer?.deadlineAt ? timeLeft(offer.deadlineAt, this.now()) : null;
  });
  protected readonly days = computed(() => {
    const v = this.visit();
    return v ? formatWindow(v.from, v.to, this.locale) : '';
  });
  protected readonly fee = computed(() => {
    const f = this.visit()?.feeEstimate;
    return f ? moneyText(f, this.locale) : null;
  });
  /** Trainees with their supervised-case count on this visit and whether signed off. */
  protected readonly trainees = computed(() => {
    const v = this.visit();
    if (!v) return [];
    return v.trainees.map((t) => ({
      ...t,
      performed: v.caseRecords.filter(
        (c) => c.traineeUserId === t.userId && c.traineeRole === 'performed_supervised',
      ).length,
      signOff: v.signOffs.find((s) => s.traineeUserId === t.userId) ?? null,
    }));
  });

  protected readonly declineReason = new FormControl('', {
    nonNullable: true,
    validators: [Validators.required, Validators.minLength(3)],
  });
  protected readonly cancelReason = new FormControl('', {
    nonNullable: true,
    validators: [Validators.required, Validators.minLength(3)],
  });
  protected readonly withdrawMin = withdrawReasonMinLength;
  protected readonly withdrawReason = new FormControl('', {
    nonNullable: true,
    validators: [Validators.required, Validators.minLength(withdrawReasonMinLength)],
  });
  protected readonly caseForm = new FormGroup({
    caseNumber: new FormControl(1, { nonNullable: true, validators: Validators.required }),
    traineeUserId: new FormControl<number | null>(null, Validators.required),
    traineeRole: new FormControl<string>('performed_supervised', { nonNullable: true }),
    notes: new FormControl('', { nonNullable: true }),
    ...Object.fromEntries(competencies.map((c) => [c, new FormControl(3, { nonNullable: true })])),
  });

  constructor() {
    this.load();
    interval(30_000)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe(() => this.now.set(Date.now()));
  }

  protected when(at: string): string {
    return formatInstant(at, this.session.timeZone(), this.locale);
  }

  protected pdfLink(signOffId: number): string {
    return `/api/visits/${this.visit()!.id}/sign-offs/${signOffId}/pdf`;
  }

  protected load(): void {
    const id = Number(this.route.snapshot.paramMap.get('id'));
    this.api
      .get(id)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (v) => this.show(v),
        error: (e: unknown) => this.loadError.set(messageOf(e)),
      });
  }

  private show(v: VisitDetail): void {
    this.visit.set(v);
    this.busy.set(false);
    this.error.set(null);
    this.now.set(Date.now());
    const next = Math.min(v.cases, v.caseRecords.length + 1);
    this.caseForm.patchValue({ caseNumber: next, notes: '' });
  }

  private run(call: ReturnType<VisitApi['accept']>, form?: FormGroup): void {
    this.busy.set(true);
    this.error.set(null);
    call.pipe(takeUntilDestroyed(this.destroyRef)).subscribe({
      next: (v) => this.show(v),
      error: (e: unknown) => {
        this.busy.set(false);
        if (form && e instanceof ApiError) applyServerErrors(form, e.fieldErrors);
        this.error.set(messageOf(e));
      },
    });
  }

  protected accept(): void {
    this.run(this.api.accept(this.visit()!.id));
  }

  protected decline(): void {
    this.declineReason.markAsTouched();
    if (this.declineReason.invalid) return;
    this.run(this.api.decline(this.visit()!.id, this.declineReason.value.trim()));
  }

  protected cancel(): void {
    this.cancelReason.markAsTouched();
    if (this.cancelReason.invalid) return;
    this.run(this.api.cancel(this.visit()!.id, this.cancelReason.value.trim()));
  }

  /** Asks first: withdrawing hands the visit to the next proctor and cannot be undone. */
  protected withdraw(): void {
    this.withdrawReason.markAsTouched();
    if (this.withdrawReason.invalid) return;
    const v = this.visit()!;
    confirmAction(this.dialog, {
      title: `Withdraw from visit ${v.reference}?`,
      message:
        'You will no longer be the proctor of this visit. The hospital is told with your reason, a calendar cancellation is sent to you, and the next proctor on the hospital’s list is asked. This cannot be undone.',
      confirmLabel: 'Withdraw',
      cancelLabel: 'Keep the visit',
      destructive: true,
    })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((yes) => {
        if (yes) this.run(this.api.withdraw(v.id, this.withdrawReason.value.trim()));
      });
  }

  protected widen(): void {
    this.run(this.api.widen(this.visit()!.id));
  }

  protected complete(): void {
    this.run(this.api.complete(this.visit()!.id));
  }

  protected signOff(traineeUserId: number): void {
    this.run(this.api.signOff(this.visit()!.id, traineeUserId));
  }

  protected recordCase(): void {
    this.caseForm.markAllAsTouched();
    const raw = this.caseForm.getRawValue() as Record<string, unknown>;
    if (this.caseForm.invalid || raw['traineeUserId'] === null) return;
    const body: CaseRecordInput = {
      caseNumber: Number(raw['caseNumber']),
      traineeUserId: Number(raw['traineeUserId']),
      traineeRole: raw['traineeRole'] as CaseRecordInput['traineeRole'],
      ratings: Object.fromEntries(
        competencies.map((c) => [c, Number(raw[c])]),
      ) as CaseRecordInput['ratings'],
      ...(String(raw['notes']).trim() ? { notes: String(raw['notes']).trim() } : {}),
    };
    this.run(this.api.recordCase(this.visit()!.id, body), this.caseForm);
  }
}
