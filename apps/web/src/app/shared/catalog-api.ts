import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type {
  AlternativeItem,
  AvailabilityResponse,
  Hold,
  Model,
  ModelCategory,
  Site,
  Unit,
} from '@evalon/contracts';
import { Observable, map } from 'rxjs';
import type { IsoDate } from './iso-date';

/** What an availability search asks for (`GET /api/availability`). */
export interface AvailabilitySearch {
  /** One of the person's own campuses. */
  readonly siteId: number;
  /** First case day, campus calendar. */
  readonly useFrom: IsoDate;
  /** Last case day, campus calendar. */
  readonly useTo: IsoDate;
  readonly modelId?: number | null;
  readonly category?: ModelCategory | null;
  readonly q?: string | null;
  /** Only models that work with this model. */
  readonly compatibleWith?: number | null;
}

/** Filters of `GET /api/models`. */
export interface ModelFilter {
  readonly category?: ModelCategory | null;
  readonly q?: string | null;
  readonly compatibleWith?: number | null;
}

/** Query parameters without the empty ones. */
function params(values: Record<string, string | number | null | undefined>): HttpParams {
  let result = new HttpParams();
  for (const [key, value] of Object.entries(values)) {
    if (value === null || value === undefined || value === '') continue;
    result = result.set(key, String(value));
  }
  return result;
}

/**
 * Reads the marketplace catalogue for hospital people: sites, models, units, a unit's holds and
 * the availability search with its alternatives.
 */
@Injectable({ providedIn: 'root' })
export class CatalogApi {
  private readonly http = inject(HttpClient);

  /** The person's own campuses and every lender's depots. */
  sites(): Observable<Site[]> {
    return this.http.get<{ items: Site[] }>('/api/sites').pipe(map((r) => r.items));
  }

  /** Models of every lender, filtered. */
  models(filter: ModelFilter = {}): Observable<Model[]> {
    return this.http
      .get<{ items: Model[] }>('/api/models', { params: params({ ...filter }) })
      .pipe(map((r) => r.items));
  }

  /** One model with photos, packing list and compatible models. */
  model(id: number): Observable<Model> {
    return this.http.get<{ model: Model }>(`/api/models/${id}`).pipe(map((r) => r.model));
  }

  /** One unit. */
  unit(id: number): Observable<Unit> {
    return this.http.get<{ unit: Unit }>(`/api/units/${id}`).pipe(map((r) => r.unit));
  }

  /** A unit's holds overlapping `from..to` (depot calendar, both ends included). */
  holds(unitId: number, from: IsoDate, to: IsoDate): Observable<Hold[]> {
    return this.http
      .get<{ items: Hold[] }>(`/api/units/${unitId}/holds`, { params: params({ from, to }) })
      .pipe(map((r) => r.items));
  }

  /** Which units can be at the campus for the use window, with milestones and deposits. */
  availability(search: AvailabilitySearch): Observable<AvailabilityResponse> {
    return this.http.get<AvailabilityResponse>('/api/availability', {
      params: params({ ...search }),
    });
  }

  /** Units that could stand in for `unitId` in the same window (same model first). */
  alternatives(
    unitId: number,
    window: { siteId: number; useFrom: IsoDate; useTo: IsoDate },
  ): Observable<AlternativeItem[]> {
    return this.http
      .get<{ items: AlternativeItem[] }>('/api/availability/alternatives', {
        params: params({ unitId, ...window }),
      })
      .pipe(map((r) => r.items));
  }
}
