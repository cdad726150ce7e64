import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatPaginatorHarness } from '@angular/material/paginator/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { ShipmentDetail, ShipmentSummary } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { onTheWay, taskFor } from './loan-shipments';
import { ShipmentBoard } from './shipment-board';
import { ShipmentPage, historyOf, photoProblem } from './shipment-page';

const summary = (over: Partial<ShipmentSummary> = {}): ShipmentSummary => ({
  id: 7,
  reference: 'EV-2026-000010-O1',
  loanId: 10,
  loanReference: 'EV-2026-000010',
  loanState: 'confirmed',
  direction: 'outbound',
  state: 'to_pack',
  depotId: 3,
  depotName: 'East Depot',
  siteId: 4,
  siteName: 'North Campus',
  hospitalName: 'A Hospital',
  carrier: null,
  trackingNumber: null,
  carrierStatus: null,
  dueBy: '2027-01-08',
  shipBy: '2027-01-05',
  eta: '2027-01-07',
  risk: 'on_time',
  itemsDone: 0,
  itemsTotal: 2,
  updatedAt: '2026-12-01T10:00:00.000Z',
  ...over,
});

const detail = (over: Partial<ShipmentDetail> = {}): ShipmentDetail => ({
  ...summary(),
  sscc: null,
  service: null,
  outboundId: null,
  lastCaseDay: '2027-01-12',
  checklist: [
    {
      id: 1,
      unitId: 5,
      unitSerial: 'SN-1',
      name: 'Leak tester',
      gtin: '09521234543213',
      quantity: 1,
      scanned: 0,
      needsLot: true,
      needsSerial: false,
      needsExpiry: true,
      required: true,
      complete: false,
      manualReason: null,
    },
  ],
  scans: [],
  events: [],
  photos: [],
  receipt: null,
  decontamination: null,
  actions: ['scan', 'pack'],
  ...over,
});

function setup() {
  TestBed.configureTestingModule({
    providers: [
      provideRouter([]),
      provideHttpClient(withInterceptors([errorInterceptor])),
      provideHttpClientTesting(),
      { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
    ],
  });
  return TestBed.inject(HttpTestingController);
}

const settle = async (fixture: { whenStable(): Promise<unknown> }) => {
  await new Promise((resolve) => setTimeout(resolve));
  await fixture.whenStable();
};

describe('ShipmentBoard', () => {
  it('asks the server for a filtered, sorted page and shows the work queues', async () => {
    const http = setup();
    const fixture = TestBed.createComponent(ShipmentBoard);
    const loader: HarnessLoader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    const page = http.expectOne(
      (r) => r.url === '/api/shipments' && r.params.get('pageSize') === '25',
    );
    expect(page.request.params.get('sort')).toBe('due');
    page.flush({ shipments: [summary()], total: 60, page: 1, pageSize: 25 });
    for (const q of http.match((r) => r.params.get('pageSize') === '1')) {
      q.flush({
        shipments: [],
        total: q.request.params.get('state') === 'to_pack' ? 3 : 0,
        page: 1,
        pageSize: 1,
      });
    }
    await settle(fixture);
    const table = await loader.getHarness(MatTableHarness);
    const [row] = await table.getRows();
    const cells = await row!.getCellTextByColumnName();
    expect(cells['reference']).toContain('EV-2026-000010-O1');
    expect(cells['state']).toContain('To pack');
    expect(cells['risk']).toBe('On time');
    expect(await (await loader.getHarness(MatPaginatorHarness)).getRangeLabel()).toBe(
      '1 – 25 of 60',
    );

    const toPack = await loader.getHarness(MatButtonHarness.with({ text: /To pack/ }));
    expect(await toPack.getText()).toContain('3');
    await toPack.click();
    const filtered = http.expectOne(
      (r) => r.url === '/api/shipments' && r.params.get('state') === 'to_pack',
    );
    expect(filtered.request.params.get('direction')).toBe('outbound');
    filtered.flush({ shipments: [], total: 0, page: 1, pageSize: 25 });
    http.verify();
  });
});

describe('ShipmentPage', () => {
  it('sends a wedge scan on Enter and shows the refusal, keeping the field for the next scan', async () => {
    const http = setup();
    const fixture = TestBed.createComponent(ShipmentPage);
    fixture.componentRef.setInput('id', '7');
    const loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    http.expectOne('/api/shipments/7').flush({ shipment: detail() });
    await settle(fixture);

    const field = await loader.getHarness(
      MatInputHarness.with({ selector: '[aria-describedby="scan-result"]' }),
    );
    await field.setValue('(01)04006381333931(10)X');
    const input = fixture.nativeElement.querySelector(
      '[aria-describedby="scan-result"]',
    ) as HTMLInputElement;
    input.dispatchEvent(new KeyboardEvent('keydown', { key: 'Enter' }));
    const scan = http.expectOne('/api/shipments/7/scans');
    expect(scan.request.body).toEqual({ raw: '(01)04006381333931(10)X' });
    scan.flush(
      {
        error: {
          code: 'not_on_list',
          message: 'GTIN 04006381333931 is not on this shipment’s checklist.',
        },
      },
      { status: 422, statusText: 'Unprocessable' },
    );
    http.expectOne('/api/shipments/7').flush({ shipment: detail() });
    await settle(fixture);
    const result = fixture.nativeElement.querySelector('#scan-result') as HTMLElement;
    expect(result.textContent).toContain('is not on this shipment’s checklist');
    expect(result.textContent).toContain('not_on_list');
    expect(await field.getValue()).toBe('');
    http.verify();
  });

  it('merges timeline and scans newest first, late carrier events muted', () => {
    const lines = historyOf(
      detail({
        events: [
          {
            id: 1,
            kind: 'carrier',
            fromState: null,
            toState: null,
            carrierStatus: 'picked_up',
            message: 'Picked up — arrived late, already past this',
            ignored: true,
            occurredAt: '2026-12-02T10:00:00.000Z',
            by: null,
          },
        ],
        scans: [
          {
            id: 2,
            itemId: null,
            phase: 'pack',
            outcome: 'refused',
            raw: 'x',
            code: 'not_on_list',
            message: 'Not on the list',
            gtin: null,
            lot: null,
            serial: null,
            expiry: null,
            by: 'Pat',
            at: '2026-12-03T10:00:00.000Z',
          },
        ],
      }),
    );
    expect(lines.map((l) => [l.tone, l.text])).toEqual([
      ['refused', 'Scan refused: Not on the list'],
      ['muted', 'Picked up — arrived late, already past this'],
    ]);
  });

  it('names the hospital’s return tasks', () => {
    expect(taskFor(summary({ state: 'delivered', loanState: 'shipped' }))).toMatch(
      /Confirm receipt/,
    );
    expect(taskFor(summary({ direction: 'return', state: 'awaiting_return' }))).toMatch(
      /Decontaminate/,
    );
    expect(taskFor(summary())).toBeNull();
  });
});

describe('shipment photos on the page', () => {
  const file = (name: string, type: string, bytes: number) =>
    new File([new Uint8Array(bytes)], name, { type });
  const choose = (input: HTMLInputElement, files: File[]) => {
    Object.defineProperty(input, 'files', { configurable: true, value: files });
    input.dispatchEvent(new Event('change'));
  };
  const photo = (id: number, over: Partial<ShipmentDetail['photos'][number]> = {}) => ({
    id,
    kind: 'receipt' as const,
    findingId: null,
    caption: null,
    contentType: 'image/png' as const,
    sizeBytes: 10,
    createdAt: '2026-12-03T10:00:00.000Z',
    by: 'Dana',
    ...over,
  });

  it('refuses in the browser what the server would refuse: empty, too big, not a photo', () => {
    expect(photoProblem(file('a.png', 'image/png', 0))).toMatch(/empty/);
    expect(photoProblem(file('a.png', 'image/png', 5 * 1024 * 1024 + 1))).toMatch(/5 MB/);
    expect(photoProblem(file('a.svg', 'image/svg+xml', 10))).toMatch(/not a JPEG, PNG or WebP/);
    expect(photoProblem(file('a.pdf', 'application/pdf', 10))).toMatch(/not a JPEG/);
    expect(photoProblem(file('a.webp', 'image/webp', 10))).toBeNull();
  });

  it('uploads receipt photos one by one and shows the thumbnails', async () => {
    const http = setup();
    const fixture = TestBed.createComponent(ShipmentPage);
    fixture.componentRef.setInput('id', '7');
    await fixture.whenStable();
    http
      .expectOne('/api/shipments/7')
      .flush({ shipment: detail({ state: 'delivered', actions: ['receipt'] }) });
    await settle(fixture);

    const input = fixture.nativeElement.querySelector('#receipt-photo-file') as HTMLInputElement;
    choose(input, [file('a.jpg', 'image/jpeg', 20), file('b.png', 'image/png', 30)]);
    const first = http.expectOne('/api/shipments/7/photos');
    expect((first.request.body as FormData).get('photo')).toBeInstanceOf(File);
    first.flush({ photo: photo(1) });
    http.expectOne('/api/shipments/7/photos').flush({ photo: photo(2) });
    http.expectOne('/api/shipments/7').flush({
      shipment: detail({ state: 'delivered', actions: ['receipt'], photos: [photo(1), photo(2)] }),
    });
    await settle(fixture);
    const imgs = Array.from(
      fixture.nativeElement.querySelectorAll('.photos img') as NodeListOf<HTMLImageElement>,
    );
    expect(imgs.map((i) => i.getAttribute('src'))).toEqual([
      '/api/shipments/7/photos/1',
      '/api/shipments/7/photos/2',
    ]);
    expect(imgs[0].alt).toBe('Receipt photo 1 by Dana');

    // An SVG never leaves the browser.
    choose(input, [file('x.svg', 'image/svg+xml', 10)]);
    http.expectNone('/api/shipments/7/photos');
    http.verify();
  });

  it('sends the finding’s photos as photoIds with the inspection', async () => {
    const http = setup();
    const fixture = TestBed.createComponent(ShipmentPage);
    fixture.componentRef.setInput('id', '7');
    const loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    http.expectOne('/api/shipments/7').flush({
      shipment: detail({ direction: 'return', state: 'received', actions: ['inspect'] }),
    });
    await settle(fixture);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add finding/ }))).click();
    const input = fixture.nativeElement.querySelector(
      'input[aria-label="Inspection photo files, row 1"]',
    ) as HTMLInputElement;
    choose(input, [file('crack.jpg', 'image/jpeg', 20)]);
    http
      .expectOne('/api/shipments/7/photos')
      .flush({ photo: photo(9, { kind: 'finding', contentType: 'image/jpeg' }) });
    await settle(fixture);
    expect(
      fixture.nativeElement.querySelector('ul[aria-label="Inspection photos, row 1"] img')?.src,
    ).toContain('/api/shipments/7/photos/9');

    await (await loader.getHarness(MatButtonHarness.with({ text: /Record inspection/ }))).click();
    const inspection = http.expectOne('/api/loans/10/inspection');
    expect(inspection.request.body.findings).toEqual([
      { category: 'damage', note: '', charge: 0, needsRepair: false, photoIds: [9] },
    ]);
    inspection.flush(null);
    http.expectOne('/api/shipments/7').flush({ shipment: detail() });
    http.verify();
  });
});

describe('a return on its way', () => {
  it('shows the depot’s deadline and the expected arrival there', async () => {
    const http = setup();
    const fixture = TestBed.createComponent(ShipmentPage);
    fixture.componentRef.setInput('id', '8');
    await fixture.whenStable();
    http.expectOne('/api/shipments/8').flush({
      shipment: detail({
        id: 8,
        direction: 'return',
        state: 'in_transit',
        shipBy: '2027-01-15',
        dueBy: '2027-01-20',
        eta: '2027-01-22',
        risk: 'at_risk',
        actions: [],
      }),
    });
    await settle(fixture);
    const facts = Array.from(
      fixture.nativeElement.querySelectorAll('.facts dt') as NodeListOf<HTMLElement>,
    ).map((d) => [d.textContent!.trim(), d.nextElementSibling!.textContent!.trim()]);
    expect(facts.slice(0, 4)).toEqual([
      ['Ship back by', 'Fri, Jan 15, 2027'],
      ['Back at depot by', 'Wed, Jan 20, 2027 (depot calendar)'],
      ['Expected at the depot', 'Fri, Jan 22, 2027'],
      ['Risk', 'At risk'],
    ]);
    expect(onTheWay(summary({ direction: 'return', state: 'handed_over' }))).toBe(true);
    expect(onTheWay(summary({ direction: 'return', state: 'received' }))).toBe(false);
    http.verify();
  });
});
