import type {
  CreditAgreement,
  LoanDocument,
  LoanPayments,
  Notification,
  OutboxMessage,
  Payment,
} from '@evalon/contracts';
import { organisations } from './people';

/*
 * Invented payment, document, notification and outbox data for client tests. Amounts are
 * integer minor units (5,600.00 USD = 560000), as the API sends them. No real names.
 */

/** The payments of Velmora's loan 1 while it waits for its deposit. */
export function loanPayments(overrides: Partial<LoanPayments> = {}): LoanPayments {
  return {
    loanId: 1,
    reference: 'EV-2026-000001',
    loanState: 'approved',
    deposit: { amount: 560_000, currency: 'USD' },
    strategy: null,
    depositDueAt: '2026-12-04T14:00:00.000Z',
    confirmedAt: null,
    purchaseOrderNumber: null,
    creditAgreementActive: false,
    totals: { held: 0, charged: 0, refunded: 0 },
    payments: [],
    refunds: [],
    caution:
      'The deposit is refundable security, settled after the return inspection; inspection charges are deducted, never more than was paid. Amounts are estimates until the lender confirms; contracts and local rules prevail.',
    ...overrides,
  };
}

/** A card charge row. */
export function payment(overrides: Partial<Payment> & Pick<Payment, 'id'>): Payment {
  return {
    kind: 'charge',
    status: 'captured',
    amount: { amount: 560_000, currency: 'USD' },
    held: 0,
    captured: 560_000,
    refunded: 0,
    securesLoan: true,
    purchaseOrderNumber: null,
    checkoutSessionId: 'cs_test_0001',
    paymentIntentId: 'pi_test_0001',
    failureMessage: null,
    settledAt: null,
    createdAt: '2026-12-02T15:00:00.000Z',
    updatedAt: '2026-12-02T15:01:00.000Z',
    ...overrides,
  };
}

/** A filed document of loan 1. */
export function loanDocument(
  overrides: Partial<LoanDocument> & Pick<LoanDocument, 'id'>,
): LoanDocument {
  return {
    loanId: 1,
    kind: 'purchase_order',
    originalName: 'PO-2027-0042.pdf',
    sizeBytes: 245_760,
    sha256: 'a'.repeat(64),
    uploadedBy: 'Dana Whitlock',
    uploadedAt: '2026-12-02T16:30:00.000Z',
    downloadUrl: `/api/loans/1/documents/${overrides.id}`,
    ...overrides,
  };
}

/** An in-app notification. */
export function notification(
  overrides: Partial<Notification> & Pick<Notification, 'id' | 'title'>,
): Notification {
  return {
    kind: 'loan.confirmed',
    body: 'The deposit is secured; the calendar invitation is in your e-mail.',
    link: '/loans/1',
    createdAt: '2026-12-02T15:02:00.000Z',
    readAt: null,
    ...overrides,
  };
}

/** A credit agreement of Dralvik Medical Loans with a hospital. */
export function creditAgreement(
  overrides: Partial<CreditAgreement> & Pick<CreditAgreement, 'hospitalId' | 'hospitalName'>,
): CreditAgreement {
  return {
    lenderId: organisations.dralvik.id,
    active: true,
    approvedBy: 'Priya Lennox',
    approvedAt: '2026-10-01T13:00:00.000Z',
    updatedAt: '2026-10-01T13:00:00.000Z',
    ...overrides,
  };
}

/** A parked outbox e-mail. */
export function outboxMessage(
  overrides: Partial<OutboxMessage> & Pick<OutboxMessage, 'id' | 'subject'>,
): OutboxMessage {
  return {
    messageId: `0b5e1c7e-0000-4000-8000-${String(overrides.id).padStart(12, '0')}`,
    kind: 'email',
    to: ['dana.whitlock@velmora.example'],
    cc: [],
    attachmentCount: 0,
    status: 'parked',
    attempts: 8,
    nextAttemptAt: '2026-12-02T10:00:00.000Z',
    lastError: '421 4.7.0 Try again later',
    createdAt: '2026-12-01T09:00:00.000Z',
    sentAt: null,
    dedupeKey: null,
    ...overrides,
  };
}
