import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import {
  HttpTestingController,
  TestRequest,
  provideHttpClientTesting,
} from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import type { DepositResponse, Loan, LoanPayments } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { ExternalNavigation } from '../../shared/external-navigation';
import { depotEast, loan } from '../../testing/marketplace';
import { loanPayments } from '../../testing/payments';
import { membership, person } from '../../testing/people';
import {
  CONFIRMATION_POLLING,
  DepositReturn,
  DepositSection,
  estimatedCardStrategy,
} from './deposit-section';

const approved: Loan = loan({ id: 1, reference: 'EV-2026-000001', state: 'approved' });
const now = new Date('2026-12-02T12:00:00.000Z');

/** The answer of `POST /deposit` for a card: the hosted page of a checkout session. */
const checkout: DepositResponse = {
  outcome: 'checkout',
  checkoutUrl: 'http://127.0.0.1:12111/pay/cs_test_a1',
  waived: false,
  strategy: 'charge_now_refund_later',
  deposit: { amount: 560_000, currency: 'USD' },
  depositDueAt: '2026-12-04T14:00:00.000Z',
  loanState: 'approved',
};

describe('DepositSection', () => {
  let fixture: ComponentFixture<DepositSection>;
  let loader: HarnessLoader;
  let http: HttpTestingController;
  let assign: jest.Mock;
  let changed: jest.Mock;

  const settle = async (ms = 0) => {
    await new Promise((resolve) => setTimeout(resolve, ms));
    await fixture.whenStable();
  };
  const text = () =>
    ((fixture.nativeElement as HTMLElement).textContent ?? '').replace(/\s+/g, ' ');

  /**
   * The next look at the loan while polling (waits for the interval, however slow the machine);
   * a poll replaced by the next one before it was answered is dropped.
   */
  async function nextPoll(): Promise<TestRequest> {
    for (let waited = 0; waited < 3000; waited += 10) {
      await settle(10);
      const open = http.match('/api/loans/1').filter((r) => !r.cancelled);
      if (open.length) return open[open.length - 1]!;
    }
    throw new Error('the page did not look at the loan again');
  }

  async function render(
    options: {
      payments?: LoanPayments;
      returned?: DepositReturn | null;
      polling?: { intervalMs: number; timeoutMs: number };
    } = {},
  ): Promise<void> {
    assign = jest.fn();
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
        { provide: ExternalNavigation, useValue: { assign } },
        {
          provide: CONFIRMATION_POLLING,
          useValue: options.polling ?? { intervalMs: 20, timeoutMs: 2000 },
        },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    // The viewer is in Chicago; the deadline is shown in their zone.
    TestBed.inject(SessionStore).setUser(
      person([membership('velmora', 'buyer')], { timeZone: 'America/Chicago' }),
    );
    fixture = TestBed.createComponent(DepositSection);
    fixture.componentRef.setInput('loan', approved);
    fixture.componentRef.setInput('payments', options.payments ?? loanPayments());
    fixture.componentRef.setInput('depotZones', new Map([[depotEast.id, depotEast.timeZone]]));
    fixture.componentRef.setInput('returned', options.returned ?? null);
    fixture.componentRef.setInput('canPay', true);
    changed = jest.fn();
    fixture.componentInstance.changed.subscribe(changed);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
  }

  beforeEach(() => {
    // Only the clock is fixed: timers stay real so HTTP, polling and rendering run as usual.
    jest.useFakeTimers({
      now,
      doNotFake: [
        'nextTick',
        'setImmediate',
        'clearImmediate',
        'setTimeout',
        'clearTimeout',
        'setInterval',
        'clearInterval',
        'queueMicrotask',
        'requestAnimationFrame',
        'cancelAnimationFrame',
        'requestIdleCallback',
        'cancelIdleCallback',
        'hrtime',
        'performance',
      ],
    });
  });

  afterEach(() => {
    http.verify();
    jest.useRealTimers();
  });

  it('shows the amount, the deadline in the viewer’s zone with time left, and how the card works', async () => {
    await render();
    expect(text()).toContain('Secure the deposit');
    expect(text()).toContain('$5,600.00');
    // 14:00 UTC is 8:00 AM in Chicago in December (UTC−6); 50 hours after "now".
    expect(text()).toContain('By Dec 4, 2026, 8:00 AM CST · due in 2 days');
    // March 2027 loan: ship-by to ready-again is far longer than the 7-day card hold window.
    expect(text()).toContain('By card: Charged to the card, refunded at settlement');
    expect(text()).toContain('refunded after the return inspection, less any inspection charges');
    expect(text()).toContain('The deposit is refundable security, settled after the return');
  });

  it('sends the buyer to the hosted payment page with the URL the server gave', async () => {
    await render();
    const pay = await loader.getHarness(MatButtonHarness.with({ text: /Pay by card/ }));
    await pay.click();
    const post = http.expectOne('/api/loans/1/deposit');
    expect(post.request.method).toBe('POST');
    expect(post.request.body).toEqual({ method: 'card' });
    post.flush(checkout);
    await settle();
    expect(assign).toHaveBeenCalledWith('http://127.0.0.1:12111/pay/cs_test_a1');
    // While the browser leaves, the button says so and cannot be pressed twice.
    const busy = await loader.getHarness(
      MatButtonHarness.with({ text: /Opening the payment page/ }),
    );
    expect(await busy.isDisabled()).toBe(true);
    expect(changed).not.toHaveBeenCalled();
  });

  it('shows why the payment could not start and lets the buyer try again', async () => {
    await render();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Pay by card/ }))).click();
    http.expectOne('/api/loans/1/deposit').flush(
      {
        error: {
          code: 'payment_provider_unavailable',
          message:
            'The payment service did not answer. Nothing was charged; try again in a minute.',
        },
      },
      { status: 503, statusText: 'Service Unavailable' },
    );
    await settle();
    expect(fixture.nativeElement.querySelector('.option .error').textContent).toContain(
      'Nothing was charged; try again in a minute.',
    );
    expect(assign).not.toHaveBeenCalled();
    const pay = await loader.getHarness(MatButtonHarness.with({ text: /Pay by card/ }));
    expect(await pay.isDisabled()).toBe(false);
  });

  it('offers no purchase order without a credit agreement, and says how to get one', async () => {
    await render();
    expect(await loader.getAllHarnesses(MatInputHarness)).toHaveLength(0);
    expect(text()).toContain('No credit agreement with Dralvik Medical Loans is on file');
  });

  it('checks the purchase order number as the contract does before sending it', async () => {
    await render({ payments: loanPayments({ creditAgreementActive: true }) });
    const confirm = await loader.getHarness(
      MatButtonHarness.with({ text: /Confirm with purchase order/ }),
    );
    const field = await loader.getHarness(MatInputHarness);

    await confirm.click();
    http.expectNone('/api/loans/1/deposit');
    expect(text()).toContain('Enter the purchase order number.');

    await field.setValue('PO<42>');
    await confirm.click();
    http.expectNone('/api/loans/1/deposit');
    expect(text()).toContain('Use letters, digits, spaces and . _ / # - only.');

    await field.setValue('  PO-2027-0042 ');
    await confirm.click();
    const post = http.expectOne('/api/loans/1/deposit');
    expect(post.request.body).toEqual({
      method: 'credit_agreement',
      purchaseOrderNumber: 'PO-2027-0042',
    });
    post.flush({ ...checkout, outcome: 'waived', checkoutUrl: null, waived: true });
    await settle();
    expect(changed).toHaveBeenCalledTimes(1);
    expect(assign).not.toHaveBeenCalled();
  });

  it('shows the server’s words when the credit agreement was switched off meanwhile (409)', async () => {
    await render({ payments: loanPayments({ creditAgreementActive: true }) });
    await (await loader.getHarness(MatInputHarness)).setValue('PO-2027-0042');
    await (
      await loader.getHarness(MatButtonHarness.with({ text: /Confirm with purchase order/ }))
    ).click();
    const message =
      'Your hospital has no active credit agreement with this lender, so the deposit cannot be ' +
      'waived. Pay it by card, or ask the lender’s fleet manager to set up a credit agreement.';
    http
      .expectOne('/api/loans/1/deposit')
      .flush(
        { error: { code: 'no_credit_agreement', message } },
        { status: 409, statusText: 'Conflict' },
      );
    await settle();
    const alert = fixture.nativeElement.querySelectorAll('[role="alert"]')[1] as HTMLElement;
    expect(alert.textContent?.trim()).toBe(message);
    expect(changed).not.toHaveBeenCalled();
  });

  it('puts the server’s field message on the purchase order field (422)', async () => {
    await render({ payments: loanPayments({ creditAgreementActive: true }) });
    await (await loader.getHarness(MatInputHarness)).setValue('PO-2027-0042');
    await (
      await loader.getHarness(MatButtonHarness.with({ text: /Confirm with purchase order/ }))
    ).click();
    http.expectOne('/api/loans/1/deposit').flush(
      {
        error: {
          code: 'purchase_order_required',
          message: 'A purchase order number is required.',
          details: {
            fieldErrors: { purchaseOrderNumber: ['A purchase order number is required.'] },
            formErrors: [],
          },
        },
      },
      { status: 422, statusText: 'Unprocessable Entity' },
    );
    await settle();
    expect(fixture.nativeElement.querySelector('mat-error').textContent).toContain(
      'A purchase order number is required.',
    );
  });

  it('after a successful payment, asks the server to check, then polls until confirmed', async () => {
    await render({ returned: { outcome: 'success', sessionId: 'cs_test_a1' } });
    const refresh = http.expectOne('/api/loans/1/deposit/refresh');
    expect(refresh.request.method).toBe('POST');
    expect(refresh.request.body).toEqual({ sessionId: 'cs_test_a1' });
    await settle();
    expect(text()).toContain('Confirming your payment…');
    // The form is hidden while confirming, so nobody pays twice.
    expect(text()).not.toContain('Pay by card');

    refresh.flush(loanPayments()); // The webhook has not landed yet: still approved.
    (await nextPoll()).flush({ loan: approved });
    (await nextPoll()).flush({ loan: { ...approved, state: 'confirmed' } });
    await settle(30);

    expect(text()).toContain('Payment received: EV-2026-000001 is confirmed');
    expect(changed).toHaveBeenCalledTimes(1);
    // Polling stopped.
    await settle(50);
    http.expectNone('/api/loans/1');
  });

  it('stops polling after the time limit and says the payment is still processing', async () => {
    await render({
      returned: { outcome: 'success', sessionId: 'cs_test_a1' },
      polling: { intervalMs: 10_000, timeoutMs: 40 },
    });
    http.expectOne('/api/loans/1/deposit/refresh').flush(loanPayments());
    await settle(80);
    expect(text()).toContain('Your payment is still being processed');
    expect(text()).toContain('We’ll notify you as soon as EV-2026-000001 is confirmed');
    expect(changed).not.toHaveBeenCalled();
  });

  it('after a cancelled payment page, says the loan is still waiting and keeps the options', async () => {
    await render({ returned: { outcome: 'cancelled', sessionId: null } });
    http.expectNone('/api/loans/1/deposit/refresh');
    expect(text()).toContain('Payment not completed — the loan is still waiting for the deposit');
    expect(
      await loader.getAllHarnesses(MatButtonHarness.with({ text: /Pay by card/ })),
    ).toHaveLength(1);
  });
});

describe('estimatedCardStrategy', () => {
  const zones = new Map([[depotEast.id, depotEast.timeZone]]);
  // The rule is @evalon/deposits' chooseStrategy (7-day card authorisation window, per the
  // payment provider's documentation in docs/references.md); this checks the footprint we pass.
  it('holds the card when ship-by to ready-again ends within 7 days of now', () => {
    const short = loan({ id: 2, reference: 'EV-2026-000002', state: 'approved' });
    const unit = {
      ...short.units[0]!,
      milestones: { ...short.milestones, shipBy: '2026-12-03', readyAgain: '2026-12-07' },
    };
    // Ready again Dec 7 ends at Dec 8 00:00 New York = 05:00 UTC: 5 days 17 h after now.
    expect(estimatedCardStrategy({ ...short, units: [unit] }, zones, now)).toBe('authorise_hold');
    const longer = {
      ...unit,
      milestones: { ...unit.milestones, readyAgain: '2026-12-09' },
    };
    // Ends Dec 10 05:00 UTC: 7 days 17 h after now, past the window: charged and refunded.
    expect(estimatedCardStrategy({ ...short, units: [longer] }, zones, now)).toBe(
      'charge_now_refund_later',
    );
  });

  it('has no estimate once the footprint has ended', () => {
    const past = loan({
      id: 3,
      reference: 'EV-2026-000003',
      state: 'approved',
      useFrom: '2026-10-01',
      useTo: '2026-10-02',
    });
    expect(estimatedCardStrategy(past, zones, now)).toBeNull();
  });
});
