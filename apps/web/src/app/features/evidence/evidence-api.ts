import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type {
  CaseInput,
  CaseList,
  CasePatch,
  DecisionInput,
  EvaluationCase,
  EvaluationDecision,
  EvaluationReport,
  EvidenceSharing,
  Feedback,
  FeedbackInput,
  LoanMetricsResponse,
} from '@evalon/contracts';
import { Observable, map } from 'rxjs';

/** Talks to `/api/loans/:id/cases` and `/metrics`: a loan's evaluation evidence. */
@Injectable({ providedIn: 'root' })
export class EvidenceApi {
  private readonly http = inject(HttpClient);

  /** The loan's cases and what the case form offers. */
  cases(loanId: number): Observable<CaseList> {
    return this.http.get<CaseList>(`/api/loans/${loanId}/cases`);
  }

  /** The loan's evaluation figures. */
  metrics(loanId: number): Observable<LoanMetricsResponse> {
    return this.http.get<LoanMetricsResponse>(`/api/loans/${loanId}/metrics`);
  }

  /** Records a case; fails with 422 field messages, 409 when the case number is taken. */
  record(loanId: number, body: CaseInput): Observable<EvaluationCase> {
    return this.http
      .post<{ case: EvaluationCase }>(`/api/loans/${loanId}/cases`, body)
      .pipe(map((r) => r.case));
  }

  /** Changes some fields of a case. */
  change(loanId: number, caseId: number, body: CasePatch): Observable<EvaluationCase> {
    return this.http
      .patch<{ case: EvaluationCase }>(`/api/loans/${loanId}/cases/${caseId}`, body)
      .pipe(map((r) => r.case));
  }

  /** Removes a case. */
  remove(loanId: number, caseId: number): Observable<void> {
    return this.http.delete<void>(`/api/loans/${loanId}/cases/${caseId}`);
  }

  /** Records (or revises) the signed-in clinician's survey on the loan. */
  feedback(loanId: number, body: FeedbackInput): Observable<Feedback> {
    return this.http
      .post<{ feedback: Feedback }>(`/api/loans/${loanId}/feedback`, body)
      .pipe(map((r) => r.feedback));
  }

  /** The evaluation report: charts with their text, figures, costs and the decision. */
  report(loanId: number): Observable<EvaluationReport> {
    return this.http.get<EvaluationReport>(`/api/loans/${loanId}/report`);
  }

  /** The buyer shares the report with the lender, or stops sharing it. */
  share(loanId: number, sharedWithLender: boolean): Observable<EvidenceSharing> {
    return this.http
      .put<{ sharing: EvidenceSharing }>(`/api/loans/${loanId}/evidence-sharing`, {
        sharedWithLender,
      })
      .pipe(map((r) => r.sharing));
  }

  /** Records (or revises) the hospital's decision. */
  decide(loanId: number, body: DecisionInput): Observable<EvaluationDecision> {
    return this.http
      .post<{ decision: EvaluationDecision }>(`/api/loans/${loanId}/decision`, body)
      .pipe(map((r) => r.decision));
  }
}
