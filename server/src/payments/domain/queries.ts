import { depositCaution, type LoanPayments, type Payment } from '@evalon/contracts';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { canSeeLoan } from '../../loans';
import { findActiveCreditAgreement } from '../data-access/credit-agreement-repository';
import { findLoanDeposit } from '../data-access/loan-deposit-repository';
import { findLoanPayments, type PaymentRow } from '../data-access/payment-repository';
import { findLoanRefunds } from '../data-access/refund-repository';
import { ensureDeadline } from './confirmation';
import type { PaymentsDeps } from './deps';

function toPayment(r: PaymentRow): Payment {
  return {
    id: r.id,
    kind: r.kind,
    status: r.status,
    amount: { amount: r.amount, currency: r.currency },
    held: r.status === 'authorised' ? r.amountAuthorised : 0,
    captured: r.amountCaptured,
    refunded: r.amountRefunded,
    securesLoan: r.securesLoan,
    purchaseOrderNumber: r.purchaseOrderNumber,
    checkoutSessionId: r.checkoutSessionId,
    paymentIntentId: r.paymentIntentId,
    failureMessage: r.failureMessage,
    settledAt: r.settledAt ? r.settledAt.toISOString() : null,
    createdAt: r.createdAt.toISOString(),
    updatedAt: r.updatedAt.toISOString(),
  };
}

/**
 * `GET /api/loans/:id/payments`: what was held, charged and refunded for the loan, the strategy
 * and the deadline. For the loan's hospital (buyers, clinicians) and lender (fleet managers,
 * coordinators) and the admin; anyone else gets 404, as for the loan itself.
 */
export async function getLoanPayments(
  deps: Pick<PaymentsDeps, 'dataSource' | 'config'>,
  auth: AuthContext,
  loanId: number,
): Promise<LoanPayments> {
  const m = deps.dataSource.manager;
  const loan = await findLoanDeposit(m, loanId);
  if (!loan || !canSeeLoan(auth, loan)) {
    throw AppError.notFound('loan_not_found', 'There is no such loan.');
  }
  await ensureDeadline(m, deps, loan);
  const [rows, refunds, agreement] = await Promise.all([
    findLoanPayments(m, loanId),
    findLoanRefunds(m, loanId),
    findActiveCreditAgreement(m, loan.lenderId, loan.hospitalId),
  ]);
  const payments = rows.map(toPayment);
  return {
    loanId,
    reference: loan.reference,
    loanState: loan.state,
    deposit: { amount: loan.depositAmount, currency: loan.depositCurrency },
    strategy: loan.depositStrategy,
    depositDueAt: loan.depositDueAt ? loan.depositDueAt.toISOString() : null,
    confirmedAt: loan.confirmedAt ? loan.confirmedAt.toISOString() : null,
    purchaseOrderNumber: loan.purchaseOrderNumber,
    creditAgreementActive: agreement,
    totals: {
      held: payments.reduce((s, p) => s + p.held, 0),
      charged: payments.reduce((s, p) => s + p.captured, 0),
      refunded: payments.reduce((s, p) => s + p.refunded, 0),
    },
    payments,
    refunds,
    caution: depositCaution,
  };
}

/**
 * Refuses (404) a loan the person may not see, before anything else about the request is read:
 * the scope check of the `/api/loans/:id/...` payment routes.
 */
export async function assertLoanVisible(
  deps: Pick<PaymentsDeps, 'dataSource'>,
  auth: AuthContext,
  loanId: number,
): Promise<void> {
  const loan = await findLoanDeposit(deps.dataSource.manager, loanId);
  if (!loan || !canSeeLoan(auth, loan)) {
    throw AppError.notFound('loan_not_found', 'There is no such loan.');
  }
}
