import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type {
  Depot,
  DepotInput,
  Model,
  ModelInput,
  ModelPage,
  Photo,
  ShippingSettings,
  ShippingSettingsResponse,
} from '@evalon/contracts';
import { Observable, map } from 'rxjs';
import { listParams, type ListRequest } from '../../shared/list-page';

/**
 * Talks to the catalogue part of the API: a lender's models and their photos
 * (`/api/models`, `/api/photos`), its depots and shipping settings (`/api/lenders/:orgId/...`).
 * The units feature uses it too, for the model and depot choices of its forms.
 */
@Injectable({ providedIn: 'root' })
export class LenderCatalogApi {
  private readonly http = inject(HttpClient);

  /** The lender's models, by name. */
  models(lenderId: number): Observable<Model[]> {
    const params = new HttpParams().set('lenderId', lenderId);
    return this.http.get<{ items: Model[] }>('/api/models', { params }).pipe(map((r) => r.items));
  }

  /** One page of the lender's models (`category` is the list's one filter). */
  modelPage(lenderId: number, request: ListRequest<'category'>): Observable<ModelPage> {
    const params = listParams(request).set('lenderId', lenderId);
    return this.http.get<ModelPage>('/api/models', { params });
  }

  /** One model with its packing list, compatibility and photos. */
  model(id: number): Observable<Model> {
    return this.http.get<{ model: Model }>(`/api/models/${id}`).pipe(map((r) => r.model));
  }

  /** Lists a new model. */
  createModel(input: ModelInput): Observable<Model> {
    return this.http.post<{ model: Model }>('/api/models', input).pipe(map((r) => r.model));
  }

  /** Replaces a model's details, packing list and compatibility. */
  updateModel(id: number, input: ModelInput): Observable<Model> {
    return this.http.put<{ model: Model }>(`/api/models/${id}`, input).pipe(map((r) => r.model));
  }

  /** Adds a photo (multipart field `photo`; the server reads the type from the bytes). */
  uploadPhoto(modelId: number, file: File): Observable<Photo> {
    const body = new FormData();
    body.append('photo', file, file.name);
    return this.http
      .post<{ photo: Photo }>(`/api/models/${modelId}/photos`, body)
      .pipe(map((r) => r.photo));
  }

  /** Deletes a photo of a model. */
  deletePhoto(modelId: number, photoId: number): Observable<unknown> {
    return this.http.delete(`/api/models/${modelId}/photos/${photoId}`);
  }

  /** The lender's depots with every field, by name. */
  depots(lenderId: number): Observable<Depot[]> {
    return this.http
      .get<{ items: Depot[] }>(`/api/lenders/${lenderId}/depots`)
      .pipe(map((r) => r.items));
  }

  /** Adds a depot. */
  createDepot(lenderId: number, input: DepotInput): Observable<Depot> {
    return this.http
      .post<{ depot: Depot }>(`/api/lenders/${lenderId}/depots`, input)
      .pipe(map((r) => r.depot));
  }

  /** Changes a depot. */
  updateDepot(lenderId: number, depotId: number, input: DepotInput): Observable<Depot> {
    return this.http
      .put<{ depot: Depot }>(`/api/lenders/${lenderId}/depots/${depotId}`, input)
      .pipe(map((r) => r.depot));
  }

  /** The lender's shipping settings (the product defaults until it saves its own). */
  shippingSettings(lenderId: number): Observable<ShippingSettingsResponse> {
    return this.http.get<ShippingSettingsResponse>(`/api/lenders/${lenderId}/shipping-settings`);
  }

  /** Saves the lender's shipping settings. */
  saveShippingSettings(
    lenderId: number,
    settings: ShippingSettings,
  ): Observable<ShippingSettingsResponse> {
    return this.http.put<ShippingSettingsResponse>(
      `/api/lenders/${lenderId}/shipping-settings`,
      settings,
    );
  }
}
