import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { OutboxMessage, OutboxStatus } from '@evalon/contracts';
import { Observable, map } from 'rxjs';

/** Most messages one page of the outbox shows (the contract allows up to 200). */
export const OUTBOX_PAGE_SIZE = 100;

/** Talks to `/api/admin/outbox` (the platform admin only). */
@Injectable({ providedIn: 'root' })
export class OutboxApi {
  private readonly http = inject(HttpClient);

  /** Messages with one status, newest first. */
  list(status: OutboxStatus, limit = OUTBOX_PAGE_SIZE): Observable<OutboxMessage[]> {
    const params = new HttpParams().set('status', status).set('limit', limit);
    return this.http
      .get<{ items: OutboxMessage[] }>('/api/admin/outbox', { params })
      .pipe(map((r) => r.items));
  }

  /** Puts a parked message back in line (attempts from zero). 409 `not_parked`. */
  resend(id: number): Observable<OutboxMessage> {
    return this.http
      .post<{ message: OutboxMessage }>(`/api/admin/outbox/${id}/resend`, {})
      .pipe(map((r) => r.message));
  }
}
