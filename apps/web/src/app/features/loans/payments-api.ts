import {
  HttpBackend,
  HttpClient,
  HttpEvent,
  HttpXhrBackend,
  provideHttpClient,
  withInterceptors,
  withXsrfConfiguration,
} from '@angular/common/http';
import {
  EnvironmentInjector,
  Injectable,
  InjectionToken,
  createEnvironmentInjector,
  inject,
} from '@angular/core';
import type {
  DepositRequest,
  DepositResponse,
  LoanDocument,
  LoanDocumentKind,
  LoanPayments,
} from '@evalon/contracts';
import { Observable, map } from 'rxjs';
import { errorInterceptor, xsrfNames, xsrfTokenInterceptor } from '../../core/interceptors';

/**
 * The HttpClient that sends document uploads. The app's client uses `fetch()`, which reports no
 * upload progress; this one goes through XMLHttpRequest (with the same XSRF and error
 * interceptors) so the upload shows how far it is. Tests replace it with the app's client.
 */
export const UPLOAD_HTTP = new InjectionToken<HttpClient>('UPLOAD_HTTP', {
  providedIn: 'root',
  factory: () =>
    createEnvironmentInjector(
      [
        provideHttpClient(
          withXsrfConfiguration(xsrfNames),
          withInterceptors([xsrfTokenInterceptor, errorInterceptor]),
        ),
        // Listed after provideHttpClient so it wins over the fetch backend the root provides.
        { provide: HttpBackend, useExisting: HttpXhrBackend },
      ],
      inject(EnvironmentInjector),
    ).get(HttpClient),
});

/**
 * Talks to the deposit, payment and document routes of one loan (`/api/loans/:id/...`).
 * Failures arrive as `ApiError`s (the error interceptor).
 */
@Injectable({ providedIn: 'root' })
export class PaymentsApi {
  private readonly http = inject(HttpClient);
  private readonly uploadHttp = inject(UPLOAD_HTTP);

  /**
   * Asks to secure the deposit: by card (the answer carries the hosted payment page) or under
   * the credit agreement with a purchase order number (confirmed at once). 409
   * `no_credit_agreement`, `deposit_deadline_passed` or `illegal_transition`; 422 field messages.
   */
  secureDeposit(loanId: number, body: DepositRequest): Observable<DepositResponse> {
    return this.http.post<DepositResponse>(`/api/loans/${loanId}/deposit`, body);
  }

  /** Asks the server to check the payment with the provider now (after the hosted page). */
  refresh(loanId: number, sessionId?: string | null): Observable<LoanPayments> {
    return this.http.post<LoanPayments>(
      `/api/loans/${loanId}/deposit/refresh`,
      sessionId ? { sessionId } : {},
    );
  }

  /** What was held, charged and refunded for the loan, the strategy and the deadline. */
  payments(loanId: number): Observable<LoanPayments> {
    return this.http.get<LoanPayments>(`/api/loans/${loanId}/payments`);
  }

  /** The loan's documents, newest first. */
  documents(loanId: number): Observable<LoanDocument[]> {
    return this.http
      .get<{ items: LoanDocument[] }>(`/api/loans/${loanId}/documents`)
      .pipe(map((r) => r.items));
  }

  /**
   * Files a PDF; emits the upload's events (progress, then the response with the document).
   * 413 `document_too_large`, 415 `unsupported_document_type`, 409 `loan_not_active`.
   */
  upload(
    loanId: number,
    kind: LoanDocumentKind,
    file: File,
  ): Observable<HttpEvent<{ document: LoanDocument }>> {
    const form = new FormData();
    form.append('kind', kind);
    form.append('file', file, file.name);
    return this.uploadHttp.post<{ document: LoanDocument }>(
      `/api/loans/${loanId}/documents`,
      form,
      { observe: 'events', reportProgress: true },
    );
  }
}
