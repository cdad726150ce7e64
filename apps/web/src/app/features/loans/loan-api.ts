import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { CreateLoanRequest, Loan, LoanPage, LoanState } from '@evalon/contracts';
import { Observable, map } from 'rxjs';
import { listParams, type ListRequest } from '../../shared/list-page';

/** Most loans the list asks for at once (the contract's upper limit). */
export const LOAN_LIST_LIMIT = 500;

/** Talks to `/api/loans`: request, list, read and cancel loans. */
@Injectable({ providedIn: 'root' })
export class LoanApi {
  private readonly http = inject(HttpClient);

  /** Loans the person may see, newest first, up to {@link LOAN_LIST_LIMIT} (for summaries). */
  list(filter: { state?: LoanState | null; q?: string | null } = {}): Observable<Loan[]> {
    let params = new HttpParams().set('limit', LOAN_LIST_LIMIT);
    if (filter.state) params = params.set('state', filter.state);
    if (filter.q?.trim()) params = params.set('q', filter.q.trim());
    return this.http.get<{ items: Loan[] }>('/api/loans', { params }).pipe(map((r) => r.items));
  }

  /** One page of the loans the person may see; `state` is one state or several, comma-separated. */
  page(request: ListRequest<'state'>): Observable<LoanPage> {
    return this.http.get<LoanPage>('/api/loans', { params: listParams(request) });
  }

  /** One loan with its history. */
  get(id: number): Observable<Loan> {
    return this.http.get<{ loan: Loan }>(`/api/loans/${id}`).pipe(map((r) => r.loan));
  }

  /**
   * Asks the lender for a loan. Fails with an `ApiError`: 409 `unit_unavailable` (details:
   * conflicts and alternatives; nothing was reserved) or 422 with field messages.
   */
  request(body: CreateLoanRequest): Observable<Loan> {
    return this.http.post<{ loan: Loan }>('/api/loans', body).pipe(map((r) => r.loan));
  }

  /** Cancels a requested or approved loan; the reason goes into its history. */
  cancel(id: number, reason: string): Observable<Loan> {
    return this.http
      .post<{ loan: Loan }>(`/api/loans/${id}/cancel`, { reason })
      .pipe(map((r) => r.loan));
  }
}
