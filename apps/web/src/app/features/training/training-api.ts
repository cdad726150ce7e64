import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { TrainingRecord } from '@evalon/contracts';
import type { Observable } from 'rxjs';

/** Reads the signed-in clinician's own training record. */
@Injectable({ providedIn: 'root' })
export class TrainingApi {
  private readonly http = inject(HttpClient);

  record(): Observable<TrainingRecord> {
    return this.http.get<TrainingRecord>('/api/visits/training-record');
  }
}
