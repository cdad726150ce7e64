import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type {
  Candidate,
  CaseRecordInput,
  CreateVisitRequest,
  Visit,
  VisitDetail,
  VisitState,
} from '@evalon/contracts';
import { Observable, map } from 'rxjs';

/** What a candidate search asks for. */
export interface CandidateSearch {
  readonly siteId: number;
  readonly modelId: number;
  readonly from: string;
  readonly to: string;
  readonly language?: string | null;
}

/** Talks to `/api/visits`: candidates, requests, answers, cases and sign-offs. */
@Injectable({ providedIn: 'root' })
export class VisitApi {
  private readonly http = inject(HttpClient);

  /** Visits the person may see, newest first. */
  list(filter: { state?: VisitState; role?: 'hospital' | 'proctor' } = {}): Observable<Visit[]> {
    let params = new HttpParams();
    if (filter.state) params = params.set('state', filter.state);
    if (filter.role) params = params.set('role', filter.role);
    return this.http.get<{ items: Visit[] }>('/api/visits', { params }).pipe(map((r) => r.items));
  }

  /** One visit with offers, events, cases and sign-offs. */
  get(id: number): Observable<VisitDetail> {
    return this.http.get<{ visit: VisitDetail }>(`/api/visits/${id}`).pipe(map((r) => r.visit));
  }

  /** Every proctor for a visit, eligible ones ranked first. */
  candidates(search: CandidateSearch): Observable<Candidate[]> {
    let params = new HttpParams()
      .set('siteId', search.siteId)
      .set('modelId', search.modelId)
      .set('from', search.from)
      .set('to', search.to);
    if (search.language) params = params.set('language', search.language);
    return this.http
      .get<{ items: Candidate[] }>('/api/visits/candidates', { params })
      .pipe(map((r) => r.items));
  }

  /** Asks for a visit; the first candidate is offered at once. */
  request(body: Partial<CreateVisitRequest>): Observable<VisitDetail> {
    return this.http.post<{ visit: VisitDetail }>('/api/visits', body).pipe(map((r) => r.visit));
  }

  private act(id: number, action: string, body: object = {}): Observable<VisitDetail> {
    return this.http
      .post<{ visit: VisitDetail }>(`/api/visits/${id}/${action}`, body)
      .pipe(map((r) => r.visit));
  }

  accept(id: number): Observable<VisitDetail> {
    return this.act(id, 'accept');
  }
  decline(id: number, reason: string): Observable<VisitDetail> {
    return this.act(id, 'decline', { reason });
  }
  cancel(id: number, reason: string): Observable<VisitDetail> {
    return this.act(id, 'cancel', { reason });
  }
  /** The accepted proctor steps back before the first visit day; the next candidate is asked. */
  withdraw(id: number, reason: string): Observable<VisitDetail> {
    return this.act(id, 'withdraw', { reason });
  }
  widen(id: number, proctorIds?: number[]): Observable<VisitDetail> {
    return this.act(id, 'offers', proctorIds?.length ? { proctorIds } : {});
  }
  recordCase(id: number, body: CaseRecordInput): Observable<VisitDetail> {
    return this.act(id, 'cases', body);
  }
  complete(id: number): Observable<VisitDetail> {
    return this.act(id, 'complete');
  }
  signOff(id: number, traineeUserId: number): Observable<VisitDetail> {
    return this.act(id, 'sign-offs', { traineeUserId });
  }
}
