import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type {
  ShipmentDetail,
  ShipmentDirection,
  ShipmentList,
  ShipmentMapResponse,
  ShipmentPhoto,
  ShipmentState,
} from '@evalon/contracts';
import { Observable, map } from 'rxjs';

/** The board's query: filters, sort and page (all on the server). */
export interface ShipmentFilter {
  direction?: ShipmentDirection | null;
  state?: ShipmentState | null;
  depotId?: number | null;
  loanId?: number | null;
  risk?: 'at_risk' | 'overdue' | 'late' | null;
  sort?: string;
  page?: number;
  pageSize?: number;
}

/** What a ticked scan answers. */
export interface ScanResult {
  scanId: number;
  item: { id: number; name: string; scanned: number; quantity: number };
  parsed: { gtin?: string; lot?: string; serial?: string; expiry?: string };
}

/** Talks to `/api/shipments` and the loan's inspection and settlement. */
@Injectable({ providedIn: 'root' })
export class ShipmentApi {
  private readonly http = inject(HttpClient);

  list(filter: ShipmentFilter): Observable<ShipmentList> {
    let params = new HttpParams();
    for (const [key, value] of Object.entries(filter)) {
      if (value !== null && value !== undefined && value !== '') params = params.set(key, value);
    }
    return this.http.get<ShipmentList>('/api/shipments', { params });
  }

  /** The lender's legs with the carrier now, with where they run between (the map). */
  inTransit(): Observable<ShipmentMapResponse> {
    return this.http.get<ShipmentMapResponse>('/api/shipments/in-transit');
  }

  get(id: number): Observable<ShipmentDetail> {
    return this.http
      .get<{ shipment: ShipmentDetail }>(`/api/shipments/${id}`)
      .pipe(map((r) => r.shipment));
  }

  /** Fails with an `ApiError` 422 carrying the refusal's code and message. */
  scan(id: number, raw: string): Observable<ScanResult> {
    return this.http.post<ScanResult>(`/api/shipments/${id}/scans`, { raw });
  }

  private step(id: number, path: string, body: object = {}): Observable<ShipmentDetail> {
    return this.http
      .post<{ shipment: ShipmentDetail }>(`/api/shipments/${id}/${path}`, body)
      .pipe(map((r) => r.shipment));
  }

  tickByHand(id: number, itemId: number, reason: string) {
    return this.step(id, 'manual-ticks', { itemId, reason });
  }
  pack(id: number) {
    return this.step(id, 'pack');
  }
  handOver(id: number) {
    return this.step(id, 'hand-over', { carrier: 'wendrow', service: 'standard' });
  }
  receipt(id: number, body: { missingItemIds: number[]; notes: string }) {
    return this.step(id, 'receipt', body);
  }
  decontamination(id: number, body: { method: string; by: string; at: string }) {
    return this.step(id, 'decontamination', body);
  }
  /** One receipt or inspection photo (multipart field `photo`); the server sniffs the type. */
  uploadPhoto(id: number, file: File): Observable<ShipmentPhoto> {
    const form = new FormData();
    form.append('photo', file, file.name);
    return this.http
      .post<{ photo: ShipmentPhoto }>(`/api/shipments/${id}/photos`, form)
      .pipe(map((r) => r.photo));
  }

  /** Where a photo's bytes are served (to the people who may see the shipment). */
  photoUrl(shipmentId: number, photoId: number): string {
    return `/api/shipments/${shipmentId}/photos/${photoId}`;
  }

  receive(id: number): Observable<{ shipment: ShipmentDetail; missing: string[] }> {
    return this.http.post<{ shipment: ShipmentDetail; missing: string[] }>(
      `/api/shipments/${id}/receive`,
      {},
    );
  }
  inspect(
    loanId: number,
    findings: {
      category: string;
      note: string;
      charge: number;
      needsRepair: boolean;
      unitId?: number;
      photoIds?: number[];
    }[],
  ): Observable<void> {
    return this.http.post<void>(`/api/loans/${loanId}/inspection`, { findings });
  }
  settle(loanId: number): Observable<{
    settlement: { currency: string; kept: number; returned: number; uncovered: number };
    loanState: string;
  }> {
    return this.http.post<{
      settlement: { currency: string; kept: number; returned: number; uncovered: number };
      loanState: string;
    }>(`/api/loans/${loanId}/settle`, {});
  }
}
