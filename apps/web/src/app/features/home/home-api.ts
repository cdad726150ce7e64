import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type {
  Loan,
  LoanState,
  OutboxMessage,
  ShipmentList,
  ShipmentSummary,
  Visit,
} from '@evalon/contracts';
import { Observable, map } from 'rxjs';

/** Most loans Home reads at once (the contract's upper limit): enough to count them all. */
export const HOME_LOAN_LIMIT = 500;
/** Most parked e-mails Home reads (the contract's upper limit); a full page shows as "200+". */
export const HOME_OUTBOX_LIMIT = 200;

/** Most return legs Home reads at once. */
export const HOME_SHIPMENT_LIMIT = 100;

/** The reads behind Home's next steps. */
@Injectable({ providedIn: 'root' })
export class HomeApi {
  private readonly http = inject(HttpClient);

  /** Loans the person may see (their hospital's or lender's), optionally in one state. */
  loans(state?: LoanState): Observable<Loan[]> {
    let params = new HttpParams().set('limit', HOME_LOAN_LIMIT);
    if (state) params = params.set('state', state);
    return this.http.get<{ items: Loan[] }>('/api/loans', { params }).pipe(map((r) => r.items));
  }

  /** Proctoring visits the person may see (their hospital's, or offered to / taken by them). */
  visits(): Observable<Visit[]> {
    return this.http.get<{ items: Visit[] }>('/api/visits').pipe(map((r) => r.items));
  }

  /** The lender's open return legs, soonest due first (one page is plenty for a card). */
  returns(): Observable<ShipmentSummary[]> {
    const params = new HttpParams()
      .set('direction', 'return')
      .set('pageSize', HOME_SHIPMENT_LIMIT)
      .set('sort', 'due');
    return this.http.get<ShipmentList>('/api/shipments', { params }).pipe(map((r) => r.shipments));
  }

  /** E-mails parked after their attempts ran out (platform admin). */
  parkedEmails(): Observable<OutboxMessage[]> {
    const params = new HttpParams().set('status', 'parked').set('limit', HOME_OUTBOX_LIMIT);
    return this.http
      .get<{ items: OutboxMessage[] }>('/api/admin/outbox', { params })
      .pipe(map((r) => r.items));
  }
}
