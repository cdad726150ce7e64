import { HttpEventType } from '@angular/common/http';
import {
  ChangeDetectionStrategy,
  Component,
  LOCALE_ID,
  computed,
  inject,
  input,
  signal,
} from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import type { LoanDocument, LoanDocumentKind } from '@evalon/contracts';
import { Subscription, catchError, of, switchMap, tap } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import {
  loanDocumentKindLabels,
  loanDocumentKinds,
  maxLoanDocumentBytes,
} from '@evalon/contracts/values';
import { formatInstant } from '../../shared/iso-date';
import { PaymentsApi } from './payments-api';

/** A file size for people: "840 KB", "2.4 MB" (1 KB = 1024 bytes, as file pickers show). */
export function fileSize(bytes: number): string {
  if (bytes < 1024) return `${bytes} bytes`;
  if (bytes < 1024 * 1024) return `${Math.round(bytes / 1024)} KB`;
  return `${(bytes / (1024 * 1024)).toFixed(1)} MB`;
}

/**
 * What is wrong with a file picked for upload, or null: a PDF (by type or name), not empty, at
 * most 10 MB. The server checks again from the bytes; this saves a wasted upload.
 */
export function documentProblem(file: Pick<File, 'name' | 'size' | 'type'>): string | null {
  const looksPdf = file.type === 'application/pdf' || /\.pdf$/i.test(file.name);
  if (!looksPdf) return `“${file.name}” is not a PDF. Save or scan the document as a PDF first.`;
  if (file.size === 0) return `“${file.name}” is empty. Choose the saved PDF.`;
  if (file.size > maxLoanDocumentBytes) {
    return `“${file.name}” is ${fileSize(file.size)}; the limit is ${fileSize(maxLoanDocumentBytes)}. Attach a smaller PDF (for example, scanned at a lower resolution).`;
  }
  return null;
}

/** A document row ready to show. */
interface DocumentRow {
  readonly document: LoanDocument;
  readonly kind: string;
  readonly size: string;
  readonly when: string;
}

/**
 * The purchase order and signed loan agreement of a loan: the list with download links for both
 * parties, and (for the hospital's buyers while the loan is live) an upload of PDFs up to 10 MB.
 */
@Component({
  selector: 'ev-loan-documents',
  imports: [MatButtonModule, MatCardModule, MatIconModule, MatProgressBarModule, MatSelectModule],
  templateUrl: './loan-documents.html',
  styleUrl: './loan-documents.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LoanDocuments {
  private readonly api = inject(PaymentsApi);
  private readonly notifier = inject(Notifier);
  private readonly session = inject(SessionStore);
  private readonly locale = inject(LOCALE_ID);

  /** The loan's id. */
  readonly loanId = input.required<number>();
  /** Whether the person may file documents (a buyer of the hospital, loan still live). */
  readonly canUpload = input(false);

  protected readonly kinds = loanDocumentKinds;
  protected readonly kindLabels = loanDocumentKindLabels;
  protected readonly limit = `${maxLoanDocumentBytes / (1024 * 1024)} MB`;

  protected readonly documents = signal<LoanDocument[]>([]);
  protected readonly loading = signal(true);
  protected readonly loadError = signal<string | null>(null);
  private readonly attempt = signal(0);

  protected readonly kind = signal<LoanDocumentKind>('purchase_order');
  protected readonly file = signal<File | null>(null);
  protected readonly fileError = signal<string | null>(null);
  /** Upload progress 0–100 while uploading, else null. */
  protected readonly progress = signal<number | null>(null);
  private upload: Subscription | null = null;

  protected readonly rows = computed<DocumentRow[]>(() => {
    const zone = this.session.timeZone();
    return this.documents().map((document) => ({
      document,
      kind: loanDocumentKindLabels[document.kind],
      size: fileSize(document.sizeBytes),
      when: formatInstant(document.uploadedAt, zone, this.locale),
    }));
  });
  /** Kinds not filed yet, to say what is still missing. */
  protected readonly missing = computed(() => {
    const filed = new Set(this.documents().map((d) => d.kind));
    return loanDocumentKinds.filter((k) => !filed.has(k)).map((k) => loanDocumentKindLabels[k]);
  });
  protected readonly chosenSize = computed(() => {
    const file = this.file();
    return file ? fileSize(file.size) : '';
  });

  constructor() {
    toObservable(computed(() => ({ id: this.loanId(), attempt: this.attempt() })))
      .pipe(
        tap(() => {
          this.loading.set(true);
          this.loadError.set(null);
        }),
        switchMap(({ id }) =>
          this.api.documents(id).pipe(
            catchError((error: unknown) => {
              this.loadError.set(messageOf(error));
              return of(null);
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((documents) => {
        if (documents) this.documents.set(documents);
        this.loading.set(false);
      });
  }

  protected retry(): void {
    this.attempt.update((n) => n + 1);
  }

  /** Takes the picked file, or says at once why it cannot be filed. */
  protected pick(input: HTMLInputElement): void {
    const file = input.files?.[0] ?? null;
    // Clear the input so picking the same file again (after fixing it) fires a change.
    input.value = '';
    this.fileError.set(null);
    if (!file) return;
    const problem = documentProblem(file);
    if (problem) {
      this.file.set(null);
      this.fileError.set(problem);
      return;
    }
    this.file.set(file);
  }

  protected clearFile(): void {
    this.file.set(null);
    this.fileError.set(null);
  }

  /** Sends the picked file with its kind, showing progress; adds it to the list when filed. */
  protected send(): void {
    const file = this.file();
    if (!file || this.progress() !== null) {
      if (!file) this.fileError.set('Choose a PDF to upload first.');
      return;
    }
    const kind = this.kind();
    this.fileError.set(null);
    this.progress.set(0);
    this.upload = this.api.upload(this.loanId(), kind, file).subscribe({
      next: (event) => {
        if (event.type === HttpEventType.UploadProgress) {
          const total = event.total ?? file.size;
          this.progress.set(total ? Math.min(100, Math.round((100 * event.loaded) / total)) : 0);
        } else if (event.type === HttpEventType.Response && event.body) {
          const document = event.body.document;
          this.documents.update((list) => [document, ...list.filter((d) => d.id !== document.id)]);
          this.file.set(null);
          this.progress.set(null);
          this.notifier.success(
            `${loanDocumentKindLabels[kind]} “${document.originalName}” filed.`,
          );
        }
      },
      error: (error: unknown) => {
        this.progress.set(null);
        this.fileError.set(messageOf(error));
      },
    });
  }

  /** Stops an upload in progress. */
  protected cancelUpload(): void {
    this.upload?.unsubscribe();
    this.upload = null;
    this.progress.set(null);
  }
}
