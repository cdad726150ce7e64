import {
  ChangeDetectionStrategy,
  Component,
  LOCALE_ID,
  computed,
  inject,
  input,
  signal,
} from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import {
  decisionLabels,
  decisionReasonLabels,
  feedbackItemLabels,
  type CaseList,
  type EvaluationCase,
  type LoanMetricsResponse,
  type LoanState,
} from '@evalon/contracts';
import { caseOutcomeLabels, procedureLabels } from '@evalon/evidence';
import { catchError, forkJoin, of, switchMap, tap } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import { Cautions } from '../../shared/cautions/cautions';
import { ConfirmDialog, type ConfirmDialogData } from '../../shared/confirm-dialog/confirm-dialog';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { CaseDialog, type CaseDialogData } from './case-dialog';
import { EvaluationDecisionForm } from './evaluation-decision';
import { EvaluationSurvey } from './evaluation-survey';
import { EvidenceApi } from './evidence-api';
import { meanSd, medianIqr, num } from './summary-text';

/** One row of the summary table. */
interface SummaryRow {
  readonly label: string;
  readonly summary: LoanMetricsResponse['operativeMinutes'];
  readonly digits: number;
}

/** The next free case number: one past the highest recorded. */
export function nextCaseNumber(cases: readonly Pick<EvaluationCase, 'caseNumber'>[]): number {
  return cases.reduce((max, c) => Math.max(max, c.caseNumber), 0) + 1;
}

/**
 * The loan page's evaluation section: the de-identified cases, the form to record them and the
 * figures computed from them (tables for now).
 */
@Component({
  selector: 'ev-loan-evidence',
  imports: [
    Cautions,
    EmptyState,
    EvaluationDecisionForm,
    EvaluationSurvey,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    MatTableModule,
    MatTooltipModule,
    RouterLink,
  ],
  templateUrl: './loan-evidence.html',
  styleUrl: './loan-evidence.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LoanEvidence {
  private readonly api = inject(EvidenceApi);
  private readonly dialog = inject(MatDialog);
  private readonly notifier = inject(Notifier);
  private readonly session = inject(SessionStore);
  private readonly locale = inject(LOCALE_ID);

  /** The loan whose evidence this is. */
  readonly loanId = input.required<number>();
  /** The loan's hospital (whose clinicians may leave "performed by" as themselves). */
  readonly hospitalId = input.required<number>();
  /** The loan's state: the survey runs while the evaluation does, the decision from delivery. */
  readonly loanState = input.required<LoanState>();

  protected readonly list = signal<CaseList | null>(null);
  protected readonly metrics = signal<LoanMetricsResponse | null>(null);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  private readonly attempt = signal(0);

  protected readonly procedureLabels: Partial<Record<string, string>> = procedureLabels;
  protected readonly outcomeLabels: Partial<Record<string, string>> = caseOutcomeLabels;
  protected readonly caseColumns = [
    'caseNumber',
    'day',
    'procedure',
    'setup',
    'operative',
    'energy',
    'volume',
    'rate',
    'outcome',
    'grade',
    'proctored',
    'actions',
  ];
  protected readonly summaryColumns = ['label', 'n', 'median', 'mean', 'range'];
  protected readonly clinicianColumns = ['name', 'n', 'operative', 'curve', 'plateau', 'proctored'];

  protected readonly cases = computed(() => this.list()?.items ?? []);
  protected readonly canRecord = computed(() => this.list()?.canRecord ?? false);
  protected readonly summaryRows = computed<SummaryRow[]>(() => {
    const m = this.metrics();
    if (!m || m.cases === 0) return [];
    return [
      { label: 'Set-up, min', summary: m.setupMinutes, digits: 1 },
      { label: 'Operative, min', summary: m.operativeMinutes, digits: 1 },
      { label: 'Target volume, mm³', summary: m.volumes, digits: 0 },
      { label: 'Ablation rate, mm³/min', summary: m.ablationRates, digits: 1 },
    ];
  });
  protected readonly complications = computed(() => this.metrics()?.complications ?? []);
  protected readonly feedbackLabels = feedbackItemLabels;
  protected readonly decisionLabels = decisionLabels;
  protected readonly reasonLabels = decisionReasonLabels;
  private readonly rolesHere = computed(
    () =>
      this.session
        .user()
        ?.memberships.filter((m) => m.organisationId === this.hospitalId())
        .map((m) => m.role) ?? [],
  );
  /** Whether the person answers the survey: a clinician of the hospital, while cases are recorded. */
  protected readonly canAnswerSurvey = computed(
    () =>
      this.rolesHere().includes('clinician') &&
      ['delivered', 'returning', 'returned'].includes(this.loanState()),
  );
  /** Whether the person records the decision: a buyer of the hospital, once delivered. */
  protected readonly canDecide = computed(
    () =>
      this.rolesHere().includes('buyer') &&
      ['delivered', 'returning', 'returned', 'closed'].includes(this.loanState()),
  );

  constructor() {
    toObservable(computed(() => ({ id: this.loanId(), attempt: this.attempt() })))
      .pipe(
        tap(() => {
          this.loading.set(true);
          this.error.set(null);
        }),
        switchMap(({ id }) =>
          forkJoin({ list: this.api.cases(id), metrics: this.api.metrics(id) }).pipe(
            catchError((error: unknown) => {
              this.error.set(messageOf(error));
              return of(null);
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((result) => {
        if (result) {
          this.list.set(result.list);
          this.metrics.set(result.metrics);
        }
        this.loading.set(false);
      });
  }

  protected reload(): void {
    this.attempt.update((n) => n + 1);
  }

  protected n(value: number | null, digits = 1): string {
    return value === null ? '—' : num(value, digits, this.locale);
  }
  protected medianIqr(row: SummaryRow): string {
    return medianIqr(row.summary, row.digits, this.locale);
  }
  protected meanSd(row: SummaryRow): string {
    return meanSd(row.summary, row.digits, this.locale);
  }
  protected operative(p: LoanMetricsResponse['perClinician'][number]): string {
    return medianIqr(p.operativeMinutes, 1, this.locale);
  }

  /** Opens the case form, new or for `existing`. */
  protected open(existing: EvaluationCase | null = null): void {
    const list = this.list();
    if (!list) return;
    const isClinician = this.rolesHere().includes('clinician');
    this.dialog
      .open<CaseDialog, CaseDialogData, EvaluationCase>(CaseDialog, {
        data: {
          loanId: this.loanId(),
          options: list.options,
          caution: list.caution,
          existing,
          nextCaseNumber: nextCaseNumber(list.items),
          isClinician,
        },
        width: '760px',
        maxWidth: 'calc(100vw - 32px)',
        autoFocus: 'first-tabbable',
      })
      .afterClosed()
      .subscribe((saved) => {
        if (!saved) return;
        this.notifier.success(
          existing
            ? `Case ${saved.caseNumber} is changed.`
            : `Case ${saved.caseNumber} is recorded.`,
        );
        this.reload();
      });
  }

  /** Asks, then removes a case. */
  protected remove(c: EvaluationCase): void {
    this.dialog
      .open<ConfirmDialog, ConfirmDialogData, boolean>(ConfirmDialog, {
        data: {
          title: `Remove case ${c.caseNumber}?`,
          message:
            'The case leaves the evaluation figures. The audit trail keeps a note that it was removed.',
          confirmLabel: 'Remove',
          destructive: true,
        },
        role: 'alertdialog',
      })
      .afterClosed()
      .subscribe((yes) => {
        if (!yes) return;
        this.api.remove(this.loanId(), c.id).subscribe({
          next: () => {
            this.notifier.success(`Case ${c.caseNumber} is removed.`);
            this.reload();
          },
          error: (error: unknown) => this.notifier.error(messageOf(error)),
        });
      });
  }
}
