import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { Loan } from '@evalon/contracts';
import { Observable, map } from 'rxjs';

/** Talks to `/api/loans` for the lender's side of a request: the queue, approve, decline. */
@Injectable({ providedIn: 'root' })
export class ApprovalsApi {
  private readonly http = inject(HttpClient);

  /** Loan requests waiting for the lender, newest first (every lender the person works for). */
  waiting(): Observable<Loan[]> {
    const params = new HttpParams().set('state', 'requested');
    return this.http.get<{ items: Loan[] }>('/api/loans', { params }).pipe(map((r) => r.items));
  }

  /** One loan with its events and the actions the person may take. */
  loan(id: number): Observable<Loan> {
    return this.http.get<{ loan: Loan }>(`/api/loans/${id}`).pipe(map((r) => r.loan));
  }

  /** Approves a requested loan; the hospital is then asked to secure the deposit. */
  approve(id: number): Observable<Loan> {
    return this.http.post<{ loan: Loan }>(`/api/loans/${id}/approve`, {}).pipe(map((r) => r.loan));
  }

  /** Declines a requested loan with a reason the hospital reads; its holds are released. */
  decline(id: number, reason: string): Observable<Loan> {
    return this.http
      .post<{ loan: Loan }>(`/api/loans/${id}/decline`, { reason })
      .pipe(map((r) => r.loan));
  }
}
