import { TestBed } from '@angular/core/testing';
import { SessionStore } from '../../core/session-store';
import { loanPayments, payment } from '../../testing/payments';
import { membership, person } from '../../testing/people';
import { LoanPaymentsCard } from './loan-payments';

describe('LoanPaymentsCard', () => {
  async function render(payments: ReturnType<typeof loanPayments>) {
    TestBed.inject(SessionStore).setUser(
      person([membership('dralvik', 'coordinator')], { timeZone: 'America/New_York' }),
    );
    const fixture = TestBed.createComponent(LoanPaymentsCard);
    fixture.componentRef.setInput('deposit', { amount: 560_000, currency: 'USD' });
    fixture.componentRef.setInput('lenderName', 'Dralvik Medical Loans');
    fixture.componentRef.setInput('payments', payments);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    return { el, text: () => (el.textContent ?? '').replace(/\s+/g, ' ') };
  }

  it('shows what was held, charged and refunded, with each payment’s status and dates', async () => {
    const { el, text } = await render(
      loanPayments({
        loanState: 'confirmed',
        strategy: 'charge_now_refund_later',
        confirmedAt: '2026-12-02T15:01:00.000Z',
        totals: { held: 0, charged: 560_000, refunded: 60_000 },
        payments: [
          payment({ id: 9, status: 'partially_refunded', settledAt: '2027-03-20T14:00:00.000Z' }),
          payment({
            id: 8,
            status: 'failed',
            captured: 0,
            failureMessage: 'Your card was declined.',
            createdAt: '2026-12-02T14:50:00.000Z',
          }),
        ],
        refunds: [
          {
            id: 1,
            paymentId: 9,
            amount: { amount: 60_000, currency: 'USD' },
            reason: 'settlement',
            createdAt: '2027-03-20T14:00:00.000Z',
          },
        ],
      }),
    );
    const totals = Array.from(el.querySelectorAll('.totals div')).map((d) =>
      d.textContent!.replace(/\s+/g, ''),
    );
    expect(totals).toEqual(['Held$0.00', 'Charged$5,600.00', 'Refunded$600.00']);
    expect(Array.from(el.querySelectorAll('.chip')).map((c) => c.textContent)).toEqual([
      'Partly refunded',
      'Failed',
    ]);
    // 15:01 UTC is 10:01 AM in New York in December; 14:00 UTC is 10:00 AM EDT in March.
    expect(text()).toContain('ConfirmedDec 2, 2026, 10:01 AM EST');
    expect(text()).toContain('settled Mar 20, 2027, 10:00 AM EDT');
    expect(text()).toContain('Your card was declined.');
    expect(text()).toContain('Settled after the return inspection$600.00');
    expect(text()).toContain('Refundable security, settled after the return inspection.');
  });

  it('says a waived deposit is waived, with the purchase order, and no card totals', async () => {
    const { el, text } = await render(
      loanPayments({
        loanState: 'confirmed',
        strategy: 'credit_agreement',
        purchaseOrderNumber: 'PO-2027-0042',
        payments: [
          payment({
            id: 10,
            kind: 'waived',
            status: 'waived',
            amount: { amount: 0, currency: 'USD' },
            captured: 0,
            purchaseOrderNumber: 'PO-2027-0042',
          }),
        ],
      }),
    );
    expect(el.querySelector('.amount')?.textContent).toBe('Waived');
    expect(text()).toContain('The $5,600.00 deposit is waived under the credit agreement');
    expect(el.querySelector('.totals')).toBeNull();
    expect(text()).toContain('Purchase orderPO-2027-0042');
  });
});
