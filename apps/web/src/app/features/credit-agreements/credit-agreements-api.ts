import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { CreditAgreement, Loan } from '@evalon/contracts';
import { Observable, map } from 'rxjs';

/** A hospital the lender knows from its loans: id, name and how many loans it asked for. */
export interface KnownHospital {
  readonly hospitalId: number;
  readonly hospitalName: string;
  readonly loanCount: number;
}

/** Talks to `/api/lenders/:orgId/credit-agreements` and reads the lender's loans for hospitals. */
@Injectable({ providedIn: 'root' })
export class CreditAgreementsApi {
  private readonly http = inject(HttpClient);

  /** The lender's agreements, by hospital name. */
  list(lenderId: number): Observable<CreditAgreement[]> {
    return this.http
      .get<{ items: CreditAgreement[] }>(`/api/lenders/${lenderId}/credit-agreements`)
      .pipe(map((r) => r.items));
  }

  /** Turns a hospital's agreement on or off; answers the agreement as it now stands. */
  set(lenderId: number, hospitalId: number, active: boolean): Observable<CreditAgreement> {
    return this.http
      .put<{
        creditAgreement: CreditAgreement;
      }>(`/api/lenders/${lenderId}/credit-agreements/${hospitalId}`, { active })
      .pipe(map((r) => r.creditAgreement));
  }

  /**
   * Hospitals that asked this lender for loans (the API has no hospital directory for lenders;
   * a hospital becomes known through its first request), with their loan counts.
   */
  knownHospitals(lenderId: number): Observable<KnownHospital[]> {
    const params = new HttpParams().set('limit', 500);
    return this.http.get<{ items: Loan[] }>('/api/loans', { params }).pipe(
      map((r) => {
        const byId = new Map<number, KnownHospital>();
        for (const loan of r.items) {
          if (loan.lenderId !== lenderId) continue;
          const known = byId.get(loan.hospitalId);
          byId.set(loan.hospitalId, {
            hospitalId: loan.hospitalId,
            hospitalName: loan.hospitalName,
            loanCount: (known?.loanCount ?? 0) + 1,
          });
        }
        return [...byId.values()];
      }),
    );
  }
}
