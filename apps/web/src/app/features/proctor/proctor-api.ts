import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type {
  AvailabilitySettings,
  Credential,
  ProctorProfile,
  ProctorProfileInput,
} from '@evalon/contracts';
import { Observable, map } from 'rxjs';

/** One day of the availability preview. */
export interface PreviewDay {
  readonly date: string;
  readonly available: boolean;
  readonly why: string | null;
}

/** Talks to `/api/proctors/me`: profile, credentials and availability. */
@Injectable({ providedIn: 'root' })
export class ProctorApi {
  private readonly http = inject(HttpClient);

  profile(): Observable<ProctorProfile | null> {
    return this.http
      .get<{ profile: ProctorProfile | null }>('/api/proctors/me')
      .pipe(map((r) => r.profile));
  }

  saveProfile(body: ProctorProfileInput): Observable<ProctorProfile> {
    return this.http
      .put<{ profile: ProctorProfile }>('/api/proctors/me', body)
      .pipe(map((r) => r.profile));
  }

  saveAvailability(body: AvailabilitySettings): Observable<ProctorProfile> {
    return this.http
      .put<{ profile: ProctorProfile }>('/api/proctors/me/availability', body)
      .pipe(map((r) => r.profile));
  }

  /** One calendar month (`YYYY-MM`) of availability, as the candidate search reads it. */
  month(month: string): Observable<{ timeZone: string; days: PreviewDay[] }> {
    return this.http.get<{ timeZone: string; days: PreviewDay[] }>(
      '/api/proctors/me/availability/preview',
      { params: { month } },
    );
  }

  preview(): Observable<{ timeZone: string; days: PreviewDay[] }> {
    return this.http.get<{ timeZone: string; days: PreviewDay[] }>(
      '/api/proctors/me/availability/preview',
    );
  }

  /** Records a credential with its PDF (multipart). */
  addCredential(fields: Record<string, string>, file: File): Observable<Credential> {
    const form = new FormData();
    for (const [k, v] of Object.entries(fields)) form.append(k, v);
    form.append('file', file, file.name);
    return this.http
      .post<{ credential: Credential }>('/api/proctors/me/credentials', form)
      .pipe(map((r) => r.credential));
  }
}
