import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type {
  Hold,
  MaintenanceHoldInput,
  Unit,
  UnitInput,
  UnitPage,
  UnitUpdate,
} from '@evalon/contracts';
import { Observable, map } from 'rxjs';
import { listParams, type ListRequest } from '../../shared/list-page';

/** Talks to `/api/units`: a lender's units, their holds and maintenance blocks. */
@Injectable({ providedIn: 'root' })
export class UnitsApi {
  private readonly http = inject(HttpClient);

  /** One page of the lender's units, retired ones included (for the lender's own people). */
  unitPage(
    lenderId: number,
    request: ListRequest<'modelId' | 'depotId' | 'status'>,
  ): Observable<UnitPage> {
    const params = listParams(request).set('lenderId', lenderId);
    return this.http.get<UnitPage>('/api/units', { params });
  }

  /** One unit. */
  unit(id: number): Observable<Unit> {
    return this.http.get<{ unit: Unit }>(`/api/units/${id}`).pipe(map((r) => r.unit));
  }

  /** Adds a unit to a model. */
  createUnit(input: UnitInput): Observable<Unit> {
    return this.http.post<{ unit: Unit }>('/api/units', input).pipe(map((r) => r.unit));
  }

  /** Changes a unit's serial, UDI device identifier, base depot or status. */
  updateUnit(id: number, update: UnitUpdate): Observable<Unit> {
    return this.http.put<{ unit: Unit }>(`/api/units/${id}`, update).pipe(map((r) => r.unit));
  }

  /** A unit's holds (loan footprints and maintenance) overlapping `from..to`, by start. */
  holds(unitId: number, range: { from?: string; to?: string } = {}): Observable<Hold[]> {
    let params = new HttpParams();
    if (range.from) params = params.set('from', range.from);
    if (range.to) params = params.set('to', range.to);
    return this.http
      .get<{ items: Hold[] }>(`/api/units/${unitId}/holds`, { params })
      .pipe(map((r) => r.items));
  }

  /** Blocks a unit for maintenance; 409 `hold_conflict` when it overlaps a loan or maintenance. */
  addMaintenance(unitId: number, input: MaintenanceHoldInput): Observable<Hold> {
    return this.http
      .post<{ hold: Hold }>(`/api/units/${unitId}/holds`, input)
      .pipe(map((r) => r.hold));
  }

  /** Removes a maintenance hold (loan holds go with their loan). */
  removeHold(unitId: number, holdId: number): Observable<unknown> {
    return this.http.delete(`/api/units/${unitId}/holds/${holdId}`);
  }
}
