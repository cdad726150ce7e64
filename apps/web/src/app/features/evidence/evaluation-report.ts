import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSlideToggle, type MatSlideToggleChange } from '@angular/material/slide-toggle';
import { RouterLink } from '@angular/router';
import {
  decisionLabels,
  decisionReasonLabels,
  type EvaluationReport,
  type LoanMetricsResponse,
} from '@evalon/contracts';
import { complicationGradeLabels } from '@evalon/evidence';
import { catchError, of, switchMap, tap } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { moneyText } from '../../shared/formats';
import { EvaluationDecisionForm } from './evaluation-decision';
import { EvidenceApi } from './evidence-api';
import { ReportChart } from './report-chart';
import { meanSd, medianIqr, num } from './summary-text';

/** One row of the summary figures. */
interface FigureRow {
  readonly label: string;
  readonly summary: LoanMetricsResponse['operativeMinutes'];
  readonly digits: number;
}

/**
 * The evaluation report for the value-analysis committee: charts with their text, summary
 * figures, costs seen in Evalon and the hospital's decision; downloads as PDF and CSV. The buyer
 * records the decision here and decides whether the lender may read the report.
 */
@Component({
  selector: 'ev-evaluation-report',
  imports: [
    Cautions,
    EmptyState,
    EvaluationDecisionForm,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    MatSlideToggle,
    ReportChart,
    RouterLink,
  ],
  templateUrl: './evaluation-report.html',
  styleUrl: './evaluation-report.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EvaluationReportPage {
  private readonly api = inject(EvidenceApi);
  private readonly notifier = inject(Notifier);

  /** The loan's id, from the address. */
  readonly id = input.required<string>();

  protected readonly loanId = computed(() => Number(this.id()));
  protected readonly report = signal<EvaluationReport | null>(null);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  protected readonly sharingBusy = signal(false);
  private readonly attempt = signal(0);

  protected readonly decisionLabels = decisionLabels;
  protected readonly reasonLabels = decisionReasonLabels;
  protected readonly gradeLabels: Partial<Record<string, string>> = complicationGradeLabels;
  protected readonly money = moneyText;
  protected readonly medianIqr = (r: FigureRow) => medianIqr(r.summary, r.digits);
  protected readonly meanSd = (r: FigureRow) => meanSd(r.summary, r.digits);
  protected readonly n = num;

  protected readonly figures = computed<FigureRow[]>(() => {
    const m = this.report()?.metrics;
    if (!m) return [];
    return [
      { label: 'Set-up, min', summary: m.setupMinutes, digits: 1 },
      { label: 'Operative, min', summary: m.operativeMinutes, digits: 1 },
      { label: 'Target volume, mm³', summary: m.volumes, digits: 0 },
      { label: 'Ablation rate, mm³/min', summary: m.ablationRates, digits: 1 },
    ];
  });
  protected readonly complications = computed(() =>
    (this.report()?.metrics.complications ?? []).filter((c) => c.count > 0),
  );
  protected readonly pdfHref = computed(() => `/api/loans/${this.loanId()}/report.pdf`);
  protected readonly csvHref = computed(() => `/api/loans/${this.loanId()}/cases.csv`);

  constructor() {
    toObservable(computed(() => ({ id: this.loanId(), attempt: this.attempt() })))
      .pipe(
        tap(() => {
          this.loading.set(true);
          this.error.set(null);
        }),
        switchMap(({ id }) =>
          this.api.report(id).pipe(
            catchError((e: unknown) => {
              this.error.set(messageOf(e));
              return of(null);
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((r) => {
        this.loading.set(false);
        if (r) this.report.set(r);
      });
  }

  /** Loads the report again (after an error, or after the decision changed). */
  protected reload(): void {
    this.attempt.update((n) => n + 1);
  }

  /** Shares the report with the lender, or stops sharing it; the server keeps the trail. */
  protected share(change: MatSlideToggleChange): void {
    this.sharingBusy.set(true);
    this.api.share(this.loanId(), change.checked).subscribe({
      next: (sharing) => {
        this.sharingBusy.set(false);
        this.report.update((r) => (r ? { ...r, sharing } : r));
        this.notifier.success(
          sharing.sharedWithLender
            ? 'The lender can now read this report.'
            : 'The lender can no longer read this report.',
        );
      },
      error: (e: unknown) => {
        this.sharingBusy.set(false);
        change.source.checked = !change.checked;
        this.notifier.error(e);
      },
    });
  }
}
