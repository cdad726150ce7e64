import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import {
  HttpClient,
  HttpEventType,
  provideHttpClient,
  withInterceptors,
} from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { inject } from '@angular/core';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatProgressBarHarness } from '@angular/material/progress-bar/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { provideRouter } from '@angular/router';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { loanDocument } from '../../testing/payments';
import { membership, person } from '../../testing/people';
import { LoanDocuments, documentProblem, fileSize } from './loan-documents';
import { UPLOAD_HTTP } from './payments-api';

const purchaseOrder = loanDocument({ id: 5 });
const agreement = loanDocument({
  id: 6,
  kind: 'loan_agreement',
  originalName: 'Loan agreement signed.pdf',
  sizeBytes: 1_887_437,
});

/** A picked file; `size` can be set without allocating the bytes. */
function pdf(name: string, size: number, type = 'application/pdf'): File {
  const file = new File(['%PDF-1.7\n'], name, { type });
  Object.defineProperty(file, 'size', { value: size });
  return file;
}

describe('LoanDocuments', () => {
  let fixture: ComponentFixture<LoanDocuments>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  };
  const text = () =>
    ((fixture.nativeElement as HTMLElement).textContent ?? '').replace(/\s+/g, ' ');

  async function render(canUpload: boolean, documents = [agreement, purchaseOrder]) {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
        // Uploads go through the app's (testing) client here, not a separate XHR client.
        { provide: UPLOAD_HTTP, useFactory: () => inject(HttpClient) },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(
      person([membership('velmora', canUpload ? 'buyer' : 'clinician')], {
        timeZone: 'America/New_York',
      }),
    );
    fixture = TestBed.createComponent(LoanDocuments);
    fixture.componentRef.setInput('loanId', 1);
    fixture.componentRef.setInput('canUpload', canUpload);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    http.expectOne('/api/loans/1/documents').flush({ items: documents });
    await settle();
  }

  function choose(file: File): void {
    const input = fixture.nativeElement.querySelector('input[type="file"]') as HTMLInputElement;
    Object.defineProperty(input, 'files', { value: [file], configurable: true });
    input.dispatchEvent(new Event('change'));
  }

  afterEach(() => http.verify());

  it('lists the documents with download links, without an upload for clinicians', async () => {
    await render(false);
    const links = Array.from(
      fixture.nativeElement.querySelectorAll('a.doc-name') as NodeListOf<HTMLAnchorElement>,
    );
    expect(
      links.map((a) => [a.textContent, a.getAttribute('href'), a.hasAttribute('download')]),
    ).toEqual([
      ['Loan agreement signed.pdf', '/api/loans/1/documents/6', true],
      ['PO-2027-0042.pdf', '/api/loans/1/documents/5', true],
    ]);
    // 1,887,437 bytes / 1,048,576 = 1.8 MB; 245,760 / 1024 = 240 KB. 16:30 UTC = 11:30 AM EST.
    expect(text()).toContain('1.8 MB · Dana Whitlock · Dec 2, 2026, 11:30 AM EST');
    expect(text()).toContain('240 KB');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Upload/ }))).toHaveLength(0);
  });

  it('says what is still to file', async () => {
    await render(false, [purchaseOrder]);
    expect(text()).toContain('Still to file: Signed loan agreement.');
  });

  it('refuses a file that is not a PDF, or too large, before uploading anything', async () => {
    await render(true);
    choose(pdf('scan.jpg', 2_000, 'image/jpeg'));
    await settle();
    expect(text()).toContain('“scan.jpg” is not a PDF.');

    choose(pdf('huge.pdf', 10 * 1024 * 1024 + 1));
    await settle();
    expect(text()).toContain('“huge.pdf” is 10.0 MB; the limit is 10.0 MB.');
    expect(text()).toContain('PDF only, up to 10 MB.');
    const upload = await loader.getHarness(MatButtonHarness.with({ text: /^upload\s*Upload$/ }));
    expect(await upload.isDisabled()).toBe(true);
    http.expectNone('/api/loans/1/documents');
  });

  it('uploads a PDF with its kind, shows progress, and lists it when filed', async () => {
    await render(true, []);
    expect(text()).toContain('No documents yet.');
    const select = await loader.getHarness(MatSelectHarness);
    await select.open();
    await select.clickOptions({ text: 'Signed loan agreement' });
    choose(pdf('Loan agreement signed.pdf', 1_887_437));
    await settle();
    const chosen = fixture.nativeElement.querySelector('.chosen') as HTMLElement;
    expect(chosen.querySelector('.chosen-name')?.textContent).toBe('Loan agreement signed.pdf');
    expect(chosen.textContent).toContain('1.8 MB');

    await (await loader.getHarness(MatButtonHarness.with({ text: /^upload\s*Upload$/ }))).click();
    const post = http.expectOne('/api/loans/1/documents');
    expect(post.request.method).toBe('POST');
    const body = post.request.body as FormData;
    expect(body.get('kind')).toBe('loan_agreement');
    expect((body.get('file') as File).name).toBe('Loan agreement signed.pdf');
    expect(post.request.reportProgress).toBe(true);

    post.event({ type: HttpEventType.UploadProgress, loaded: 943_718, total: 1_887_437 });
    await settle();
    expect(await (await loader.getHarness(MatProgressBarHarness)).getValue()).toBe(50);
    expect(text()).toContain('Uploading… 50%');

    post.flush({ document: agreement });
    await settle();
    expect(await loader.getAllHarnesses(MatProgressBarHarness)).toHaveLength(0);
    expect(fixture.nativeElement.querySelector('a.doc-name').textContent).toBe(
      'Loan agreement signed.pdf',
    );
  });

  it('shows the server’s reason when it refuses the file', async () => {
    await render(true, []);
    choose(pdf('renamed.pdf', 40_000));
    await settle();
    await (await loader.getHarness(MatButtonHarness.with({ text: /^upload\s*Upload$/ }))).click();
    http.expectOne('/api/loans/1/documents').flush(
      {
        error: {
          code: 'unsupported_document_type',
          message: 'The file is not a PDF. Save or scan the document as a PDF and try again.',
        },
      },
      { status: 415, statusText: 'Unsupported Media Type' },
    );
    await settle();
    expect(fixture.nativeElement.querySelector('.upload .error').textContent).toContain(
      'The file is not a PDF.',
    );
  });
});

describe('documentProblem and fileSize', () => {
  it('accepts PDFs up to exactly 10 MB (10 × 1024 × 1024 bytes, the contract’s limit)', () => {
    expect(
      documentProblem({ name: 'a.pdf', size: 10 * 1024 * 1024, type: 'application/pdf' }),
    ).toBeNull();
    // Some systems report no type for PDFs; the name decides then, and the server sniffs the bytes.
    expect(documentProblem({ name: 'B.PDF', size: 10, type: '' })).toBeNull();
    expect(documentProblem({ name: 'a.pdf', size: 0, type: 'application/pdf' })).toContain('empty');
    expect(documentProblem({ name: 'a.docx', size: 10, type: 'application/msword' })).toContain(
      'not a PDF',
    );
  });

  it('writes sizes in binary units as file pickers do', () => {
    expect([512, 2048, 245_760, 1_887_437, 10 * 1024 * 1024].map(fileSize)).toEqual([
      '512 bytes',
      '2 KB',
      '240 KB',
      '1.8 MB',
      '10.0 MB',
    ]);
  });
});
