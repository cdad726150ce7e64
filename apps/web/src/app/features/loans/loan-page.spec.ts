import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import type { Loan } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { loan, sites } from '../../testing/marketplace';
import { loanPayments, payment } from '../../testing/payments';
import { membership, person } from '../../testing/people';
import { ExternalNavigation } from '../../shared/external-navigation';
import { CONFIRMATION_POLLING } from './deposit-section';
import { LoanPage } from './loan-page';

const approved: Loan = loan({
  id: 1,
  reference: 'EV-2026-000001',
  state: 'approved',
  note: 'Five cases in OR 7.',
  allowedActions: ['cancel'],
  events: [
    {
      id: 1,
      at: '2026-11-30T14:05:00.000Z',
      actorName: 'Dana Whitlock',
      fromState: null,
      toState: 'requested',
      reason: null,
    },
    {
      id: 2,
      at: '2026-12-01T09:30:00.000Z',
      actorName: 'Priya Lennox',
      fromState: 'requested',
      toState: 'approved',
      reason: 'Unit reserved for your dates.',
    },
  ],
});

describe('LoanPage', () => {
  let fixture: ComponentFixture<LoanPage>;
  let loader: HarnessLoader;
  let root: HarnessLoader;
  let http: HttpTestingController;

  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  };
  const text = () => (fixture.nativeElement as HTMLElement).textContent ?? '';

  async function open(
    role: 'buyer' | 'clinician' | 'coordinator',
    answer: Loan = approved,
    query: { deposit?: string; session?: string } = {},
  ): Promise<void> {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
        { provide: ExternalNavigation, useValue: { assign: jest.fn() } },
        { provide: CONFIRMATION_POLLING, useValue: { intervalMs: 20, timeoutMs: 2000 } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    // Times in the history follow the viewer's zone: Chicago here, the campus is in New York.
    TestBed.inject(SessionStore).setUser(
      person([membership(role === 'coordinator' ? 'dralvik' : 'velmora', role)], {
        timeZone: 'America/Chicago',
      }),
    );
    fixture = TestBed.createComponent(LoanPage);
    fixture.componentRef.setInput('id', '1');
    if (query.deposit) fixture.componentRef.setInput('deposit', query.deposit);
    if (query.session) fixture.componentRef.setInput('session', query.session);
    loader = TestbedHarnessEnvironment.loader(fixture);
    root = TestbedHarnessEnvironment.documentRootLoader(fixture);
    await fixture.whenStable();
    http.expectOne('/api/sites').flush({ items: sites });
    http.expectOne('/api/loans/1').flush({ loan: answer });
    await settle();
  }

  /** Answers the payments and documents the page asks for once the loan is in. */
  async function flushMoney(payments = loanPayments(), documents: unknown[] = []): Promise<void> {
    http.expectOne('/api/loans/1/payments').flush(payments);
    http.expectOne('/api/loans/1/documents').flush({ items: documents });
    await settle();
  }

  afterEach(() => {
    // The shipments card asks for the loan's legs; none in these tests.
    for (const r of http.match((req) => req.url === '/api/shipments')) {
      r.flush({ shipments: [], total: 0, page: 1, pageSize: 50 });
    }
    http.verify();
  });

  it('shows the reference, the state, the milestones with the next step and the units', async () => {
    await open('buyer');
    await flushMoney();
    expect(fixture.nativeElement.querySelector('h1').textContent).toBe('EV-2026-000001');
    expect(fixture.nativeElement.querySelector('ev-loan-state-chip').textContent).toContain(
      'Approved — deposit due',
    );
    // Approved, not shipped: the loan works towards "Ship by", whatever today's date.
    const current = fixture.nativeElement.querySelector('[aria-current="step"]') as HTMLElement;
    expect(current.dataset['milestone']).toBe('shipBy');
    expect(text()).toContain('The deposit is due before they confirm and ship.');
    expect(text()).toContain('Days are in America/New_York');
    expect(text()).toContain('MSU-0001');
    expect(text()).toContain('$5,600.00');
    // The buyer of an approved loan is asked to secure the deposit, at the top of the page.
    expect(fixture.nativeElement.querySelector('ev-deposit-section h2').textContent).toBe(
      'Secure the deposit',
    );
    expect(text()).toContain('Five cases in OR 7.');
  });

  it('lists the history newest first, in the viewer’s time zone, with reasons', async () => {
    await open('buyer');
    await flushMoney();
    const entries = Array.from(fixture.nativeElement.querySelectorAll('.history li')).map((li) =>
      (li as HTMLElement).textContent!.replace(/\s+/g, ' ').trim(),
    );
    expect(entries).toEqual([
      // 09:30 UTC is 3:30 AM in Chicago (UTC−6 in December).
      // The reason is a <q>: the browser adds its quotation marks.
      'Waiting for lender → Approved — deposit due Priya Lennox · Dec 1, 2026, 3:30 AM CSTUnit reserved for your dates.',
      'Request sent → Waiting for lender Dana Whitlock · Nov 30, 2026, 8:05 AM CST',
    ]);
    expect(text()).toContain('Times in your time zone, America/Chicago.');
  });

  it('cancels only after a reason is given, and shows the new state', async () => {
    await open('buyer');
    await flushMoney();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Cancel loan/ }))).click();
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Cancel EV-2026-000001?');
    const confirm = await root.getHarness(
      MatButtonHarness.with({ text: 'Cancel loan', ancestor: 'mat-dialog-container' }),
    );
    await confirm.click();
    // No reason yet: nothing is sent and the field says why.
    http.expectNone('/api/loans/1/cancel');
    expect(await dialog.getText()).toContain('Say why in a few words.');

    const reason = await root.getHarness(MatInputHarness.with({ selector: 'textarea' }));
    await reason.setValue('Cases moved to spring.');
    await confirm.click();
    const post = http.expectOne('/api/loans/1/cancel');
    expect(post.request.body).toEqual({ reason: 'Cases moved to spring.' });
    post.flush({ loan: { ...approved, state: 'cancelled', allowedActions: [] } });
    await settle();
    // The page reloads the loan for its full history.
    http.expectOne('/api/loans/1').flush({
      loan: {
        ...approved,
        state: 'cancelled',
        allowedActions: [],
        events: [
          ...approved.events!,
          {
            id: 3,
            at: '2026-12-02T10:00:00.000Z',
            actorName: 'Dana Whitlock',
            fromState: 'approved',
            toState: 'cancelled',
            reason: 'Cases moved to spring.',
          },
        ],
      },
    });
    await settle();
    // A new state: the payments are read again.
    http.expectOne('/api/loans/1/payments').flush(loanPayments({ loanState: 'cancelled' }));
    await settle();
    expect(fixture.nativeElement.querySelector('ev-loan-state-chip').textContent).toContain(
      'Cancelled',
    );
    expect(
      await loader.getAllHarnesses(MatButtonHarness.with({ text: /Cancel loan/ })),
    ).toHaveLength(0);
    expect(fixture.nativeElement.querySelector('.history q').textContent).toBe(
      'Cases moved to spring.',
    );
    expect(fixture.nativeElement.querySelector('[aria-current="step"]')).toBeNull();
  });

  it('offers no cancel button when the server allows none (clinicians)', async () => {
    await open('clinician', { ...approved, allowedActions: [] });
    await flushMoney();
    // Only buyers secure the deposit; clinicians see what was paid.
    expect(fixture.nativeElement.querySelector('ev-deposit-section')).toBeNull();
    expect(text()).toContain('Nothing held or charged yet');
    expect(
      await loader.getAllHarnesses(MatButtonHarness.with({ text: /Cancel loan/ })),
    ).toHaveLength(0);
    // Clinicians cannot open Find equipment, so serial numbers are plain text.
    expect(fixture.nativeElement.querySelector('.units a')).toBeNull();
  });

  it('after the payment page, checks the payment and shows the loan confirmed', async () => {
    await open('buyer', approved, { deposit: 'success', session: 'cs_test_a1' });
    await flushMoney();
    // The outcome leaves the address bar, so a reload does not replay it.
    const refresh = http.expectOne('/api/loans/1/deposit/refresh');
    expect(refresh.request.body).toEqual({ sessionId: 'cs_test_a1' });
    expect(text()).toContain('Confirming your payment…');
    refresh.flush(
      loanPayments({
        loanState: 'confirmed',
        strategy: 'charge_now_refund_later',
        totals: { held: 0, charged: 560_000, refunded: 0 },
        payments: [payment({ id: 9 })],
      }),
    );
    await settle();
    // Confirmed: the page reads the loan and its payments again.
    http.expectOne('/api/loans/1').flush({ loan: { ...approved, state: 'confirmed' } });
    await settle();
    const reads = http.match('/api/loans/1/payments').filter((r) => !r.cancelled);
    expect(reads).toHaveLength(1);
    reads[0]!.flush(
      loanPayments({
        loanState: 'confirmed',
        strategy: 'charge_now_refund_later',
        confirmedAt: '2026-12-02T15:01:00.000Z',
        totals: { held: 0, charged: 560_000, refunded: 0 },
        payments: [payment({ id: 9 })],
      }),
    );
    await settle();
    expect(text()).toContain('Payment received: EV-2026-000001 is confirmed');
    expect(fixture.nativeElement.querySelector('ev-loan-state-chip').textContent).toContain(
      'Confirmed',
    );
    const card = fixture.nativeElement.querySelector('ev-loan-payments') as HTMLElement;
    expect(card.textContent).toContain('Charged$5,600.00');
    expect(card.textContent).toContain('Charged to the card, refunded at settlement');
    expect(fixture.nativeElement.querySelector('.secure-card')).toBeNull();
  });

  it('after a cancelled payment page, keeps the loan approved with our message', async () => {
    await open('buyer', approved, { deposit: 'cancelled' });
    await flushMoney();
    http.expectNone('/api/loans/1/deposit/refresh');
    expect(text()).toContain('Payment not completed — the loan is still waiting for the deposit');
    expect(fixture.nativeElement.querySelector('ev-loan-state-chip').textContent).toContain(
      'Approved — deposit due',
    );
    expect(fixture.nativeElement.querySelector('.secure-card')).not.toBeNull();
  });

  it('shows the lender’s coordinator the payments and documents, going back to Home', async () => {
    await open('coordinator', { ...approved, state: 'confirmed', allowedActions: [] });
    await flushMoney(
      loanPayments({
        loanState: 'confirmed',
        strategy: 'charge_now_refund_later',
        totals: { held: 0, charged: 560_000, refunded: 0 },
        payments: [payment({ id: 9 })],
      }),
    );
    expect(fixture.nativeElement.querySelector('ev-deposit-section')).toBeNull();
    expect(fixture.nativeElement.querySelector('.payments-card .chip').textContent).toBe('Charged');
    expect(fixture.nativeElement.querySelector('a.back').getAttribute('href')).toBe('/');
  });
});
