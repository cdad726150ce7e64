import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { HospitalVisitSettings, LenderVisitSettings } from '@evalon/contracts';
import type { Observable } from 'rxjs';

/** Reads and changes the visit settings of a lender (per model) or a hospital. */
@Injectable({ providedIn: 'root' })
export class VisitSettingsApi {
  private readonly http = inject(HttpClient);

  lender(lenderId: number): Observable<LenderVisitSettings> {
    return this.http.get<LenderVisitSettings>(`/api/visits/settings/lenders/${lenderId}`);
  }
  /** `null` returns the model to the lender's default. */
  setModelMinimum(modelId: number, value: number | null): Observable<LenderVisitSettings> {
    return this.http.put<LenderVisitSettings>(`/api/visits/settings/models/${modelId}`, {
      minSupervisedCases: value,
    });
  }
  hospital(hospitalId: number): Observable<HospitalVisitSettings> {
    return this.http.get<HospitalVisitSettings>(`/api/visits/settings/hospitals/${hospitalId}`);
  }
  setThreshold(hospitalId: number, value: number): Observable<HospitalVisitSettings> {
    return this.http.put<HospitalVisitSettings>(`/api/visits/settings/hospitals/${hospitalId}`, {
      signOffThreshold: value,
    });
  }
}
