import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter, withComponentInputBinding } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import type { Loan } from '@evalon/contracts';
import { formatMoney } from '@evalon/deposits';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { membership, organisations, person } from '../../testing/people';
import { fleetDepots, fleetHold, lenderId, waitingLoan } from '../catalog/fleet-fixtures';
import { ApprovalQueue } from './approval-queue';

const listUrl = '/api/loans?state=requested';

/** Two waiting requests of the lender, the later one first (as the server sends them). */
const older = waitingLoan();
const newer: Loan = waitingLoan({
  id: 3002,
  reference: 'EV-2027-000102',
  hospitalName: organisations.zelvara.name,
  hospitalId: organisations.zelvara.id,
  siteName: 'Zelvara North Campus',
  createdAt: '2027-02-03T09:30:00.000Z',
  useFrom: '2027-04-12',
  useTo: '2027-04-13',
  milestones: {
    shipBy: '2027-04-06',
    deliverBy: '2027-04-08',
    useFrom: '2027-04-12',
    useTo: '2027-04-13',
    returnShipBy: '2027-04-14',
    backAtDepot: '2027-04-16',
    readyAgain: '2027-04-20',
  },
  units: [
    {
      ...older.units[0]!,
      unitId: 7003,
      modelId: 42,
      modelName: 'Dralvik A5 robotic platform',
      serialNumber: 'MA-0001',
      milestones: {
        shipBy: '2027-04-06',
        deliverBy: '2027-04-08',
        useFrom: '2027-04-12',
        useTo: '2027-04-13',
        returnShipBy: '2027-04-14',
        backAtDepot: '2027-04-16',
        readyAgain: '2027-04-20',
      },
      deposit: { amount: 3_700_000, currency: 'USD' },
    },
  ],
  deposit: { amount: 3_700_000, currency: 'USD' },
  note: null,
});
/** A request to another lender the person also works for: not in this lender's queue. */
const otherLender = waitingLoan({ id: 3999, reference: 'EV-2027-000999', lenderId: 999 });

/** Unit 7001's calendar: this request's own hold, and maintenance after it. */
const holdsOf7001 = [
  fleetHold(),
  fleetHold({
    id: 8002,
    kind: 'maintenance',
    start: '2027-03-20',
    end: '2027-03-22',
    loanId: null,
    loanReference: null,
    hospitalName: null,
    reason: 'Annual service',
    label: 'Maintenance',
  }),
];

describe('ApprovalQueue', () => {
  let harness: RouterTestingHarness;
  let loader: HarnessLoader;
  let root: HarnessLoader;
  let http: HttpTestingController;

  async function settle(): Promise<void> {
    await new Promise((resolve) => setTimeout(resolve));
    await harness.fixture.whenStable();
  }

  async function open(loans: Loan[]): Promise<void> {
    TestBed.configureTestingModule({
      providers: [
        provideRouter(
          [{ path: 'approvals', component: ApprovalQueue }],
          withComponentInputBinding(),
        ),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(person([membership('dralvik', 'fleet_manager')]));
    harness = await RouterTestingHarness.create();
    await harness.navigateByUrl('/approvals');
    loader = TestbedHarnessEnvironment.loader(harness.fixture);
    root = TestbedHarnessEnvironment.documentRootLoader(harness.fixture);
    http.expectOne(listUrl).flush({ items: loans });
    http.expectOne(`/api/lenders/${lenderId}/depots`).flush({ items: fleetDepots });
    await settle();
  }

  afterEach(() => http.verify());

  const page = () => harness.routeNativeElement as HTMLElement;
  const queueTexts = () =>
    Array.from(page().querySelectorAll<HTMLElement>('.request')).map((el) =>
      el.textContent!.replace(/\s+/g, ' ').trim(),
    );

  it('lists the lender’s waiting requests, the longest waiting first, and shows the first', async () => {
    await open([newer, older, otherLender]);
    http.expectOne('/api/units/7001/holds').flush({ items: holdsOf7001 });
    await settle();

    const [first, second, ...rest] = queueTexts();
    expect(rest).toEqual([]);
    const deposit = formatMoney(560_000, 'USD', 'en-US');
    for (const part of [
      'EV-2027-000101',
      deposit,
      'Velmora Health',
      'Velmora Lakefront Campus',
      'Dralvik U8 ureteroscope',
      'Cases Mar 5 – Mar 8, 2027',
      'Asked Feb 1, 2027',
    ]) {
      expect(first).toContain(part);
    }
    expect(second).toContain('EV-2027-000102');
    expect(page().querySelector('.request.selected')!.textContent).toContain('EV-2027-000101');

    const detail = page().querySelector('.detail')!;
    expect(detail.querySelector('.detail-title')!.textContent).toContain('Velmora Health');
    expect(detail.textContent).toContain('Four stone cases booked in OR 3.');
    // The seven milestones, from ship-by to ready again.
    expect(detail.querySelectorAll('ev-milestone-timeline li')).toHaveLength(7);

    // March 2027 with this request's footprint (Mar 1–15) outlined; its own hold is not a
    // clash, the maintenance after it shows as maintenance.
    const calendar = detail.querySelector('ev-hold-calendar')!;
    expect(calendar.textContent).toContain('March 2027');
    const inMonth = (selector: string) =>
      Array.from(calendar.querySelectorAll<HTMLElement>(`td.day${selector}:not(.outside)`)).map(
        (td) => td.dataset['date'],
      );
    expect(inMonth('.highlighted')).toHaveLength(15);
    expect(inMonth('.highlighted')[0]).toBe('2027-03-01');
    expect(inMonth('.conflict')).toEqual([]);
    expect(inMonth('.maintenance')).toEqual(['2027-03-20', '2027-03-21', '2027-03-22']);
    expect(detail.querySelector('.verdict')!.textContent).toContain('No clash with other holds');
    expect(detail.querySelector('.other-holds')!.textContent).toContain(
      'Mar 20 – Mar 22, 2027: Maintenance: Annual service',
    );
  });

  it('marks days where another hold overlaps the requested footprint', async () => {
    await open([older]);
    http.expectOne('/api/units/7001/holds').flush({
      items: [
        fleetHold(),
        fleetHold({
          id: 8003,
          loanId: 3055,
          loanReference: 'EV-2027-000155',
          start: '2027-03-14',
          end: '2027-03-18',
        }),
      ],
    });
    await settle();
    const detail = page().querySelector('.detail')!;
    expect(detail.querySelector('.verdict')!.textContent).toContain('Clashes with 1 hold');
    const clashes = Array.from(
      detail.querySelectorAll<HTMLElement>('td.day.conflict:not(.outside)'),
    ).map((td) => td.dataset['date']);
    expect(clashes).toEqual(['2027-03-14', '2027-03-15']);
  });

  it('approves after confirmation, then shows the next request', async () => {
    await open([newer, older]);
    http.expectOne('/api/units/7001/holds').flush({ items: holdsOf7001 });
    await settle();

    await (await loader.getHarness(MatButtonHarness.with({ text: /^check\s*Approve$/ }))).click();
    const confirm = await root.getHarness(MatDialogHarness);
    expect(await confirm.getTitleText()).toBe('Approve EV-2027-000101?');
    expect(await confirm.getContentText()).toContain(
      `Velmora Health is asked to secure the deposit of ${formatMoney(560_000, 'USD', 'en-US')}`,
    );
    await (await confirm.getHarness(MatButtonHarness.with({ text: 'Approve' }))).click();

    const request = http.expectOne('/api/loans/3001/approve');
    expect(request.request.method).toBe('POST');
    request.flush({ loan: { ...older, state: 'approved' } });
    await settle();
    http.expectOne('/api/units/7003/holds').flush({ items: [] });
    await settle();

    expect(queueTexts()).toEqual([expect.stringContaining('EV-2027-000102')]);
    expect(page().querySelector('.detail-title')!.textContent).toContain('Zelvara Hospitals');
    expect(document.querySelector('.mat-mdc-snack-bar-label')!.textContent).toContain(
      'EV-2027-000101 approved.',
    );
  });

  it('does nothing when the approval is not confirmed', async () => {
    await open([older]);
    http.expectOne('/api/units/7001/holds').flush({ items: holdsOf7001 });
    await settle();
    await (await loader.getHarness(MatButtonHarness.with({ text: /^check\s*Approve$/ }))).click();
    const confirm = await root.getHarness(MatDialogHarness);
    await (await confirm.getHarness(MatButtonHarness.with({ text: 'Cancel' }))).click();
    await settle();
    http.expectNone('/api/loans/3001/approve');
    expect(queueTexts()).toHaveLength(1);
  });

  it('declines only with a reason and takes the request off the list', async () => {
    await open([older]);
    http.expectOne('/api/units/7001/holds').flush({ items: holdsOf7001 });
    await settle();

    await (await loader.getHarness(MatButtonHarness.with({ text: /Decline/ }))).click();
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Decline EV-2027-000101?');
    const submit = await dialog.getHarness(MatButtonHarness.with({ text: 'Decline request' }));
    await submit.click();
    const reasonField = await dialog.getHarness(
      MatFormFieldHarness.with({ floatingLabelText: 'Reason for the hospital' }),
    );
    expect(await reasonField.getTextErrors()).toEqual(['Say why in a few words.']);
    http.expectNone('/api/loans/3001/decline');

    await ((await reasonField.getControl()) as MatInputHarness).setValue(
      '  The unit is needed for a service recall on those dates. ',
    );
    await submit.click();
    const request = http.expectOne('/api/loans/3001/decline');
    expect(request.request.body).toEqual({
      reason: 'The unit is needed for a service recall on those dates.',
    });
    request.flush({ loan: { ...older, state: 'declined' } });
    await settle();

    expect(queueTexts()).toEqual([]);
    expect(page().textContent).toContain('No loan requests waiting');
  });

  it('reloads the queue when someone else already acted on the request (409)', async () => {
    await open([older]);
    http.expectOne('/api/units/7001/holds').flush({ items: holdsOf7001 });
    await settle();
    await (await loader.getHarness(MatButtonHarness.with({ text: /^check\s*Approve$/ }))).click();
    await (
      await (
        await root.getHarness(MatDialogHarness)
      ).getHarness(MatButtonHarness.with({ text: 'Approve' }))
    ).click();
    http.expectOne('/api/loans/3001/approve').flush(
      {
        error: {
          code: 'illegal_transition',
          message: 'This loan is cancelled; it can no longer be approved.',
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await settle();
    expect(document.querySelector('.mat-mdc-snack-bar-label')!.textContent).toContain(
      'This loan is cancelled; it can no longer be approved.',
    );
    http.expectOne(listUrl).flush({ items: [] });
    http.expectOne(`/api/lenders/${lenderId}/depots`).flush({ items: fleetDepots });
    await settle();
    expect(page().textContent).toContain('No loan requests waiting');
  });

  it('says so when no request is waiting', async () => {
    await open([]);
    expect(page().textContent).toContain('No loan requests waiting');
    expect(page().querySelector('ev-hold-calendar')).toBeNull();
  });
});
