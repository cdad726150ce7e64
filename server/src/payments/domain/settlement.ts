import { settle, settleHold, type Charge, type ChargeAllocation } from '@evalon/deposits';
import { AppError } from '../../errors';
import { findLoanDeposit } from '../data-access/loan-deposit-repository';
import {
  findLoanPayments,
  findPayment,
  updatePayment,
  type PaymentRow,
} from '../data-access/payment-repository';
import { applyPaymentFacts, recordRefund } from './confirmation';
import type { PaymentsDeps } from './deps';
import { factsFromIntent } from './facts';
import { idempotencyKeys } from './provider';

/** What settling a deposit did, in minor units of the deposit's currency. */
export interface DepositSettlement {
  loanId: number;
  paymentId: number | null;
  strategy: 'hold' | 'charge' | 'waived';
  currency: string;
  /** Kept from the deposit for the charges (captured from a hold, or not refunded). */
  kept: number;
  /** Given back: refunded from a charge, or released from a hold. */
  returned: number;
  /** Charges the deposit did not cover, to be invoiced separately. */
  uncovered: number;
  allocations: ChargeAllocation[];
}

/**
 * Settles the deposit of a loan after its return inspection (a hook for the inspection flow):
 * the split comes from @evalon/deposits (`settleHold` for an authorisation hold, `settle` for a
 * charge), and the money moves through the SDK with idempotency keys derived from our ids and
 * the amounts, so a repeated call after a failure never captures or refunds twice. Charges are
 * deducted, never more than was paid; the rest goes back; what the deposit does not cover is
 * reported as `uncovered`. A settled deposit is not settled again (409).
 *
 * Settlement does not change the loan's state; the inspection flow decides that.
 */
export async function settleDeposit(
  deps: PaymentsDeps,
  loanId: number,
  charges: readonly Charge[],
): Promise<DepositSettlement> {
  const m = deps.dataSource.manager;
  const loan = await findLoanDeposit(m, loanId);
  if (!loan) throw AppError.notFound('loan_not_found', 'There is no such loan.');
  const row = (await findLoanPayments(m, loanId)).find((p) => p.securesLoan) ?? null;
  if (!row) {
    throw AppError.conflict('no_deposit', 'This loan has no secured deposit to settle.');
  }
  if (row.settledAt) {
    throw AppError.conflict('already_settled', 'This deposit was settled already.', {
      settlement: row.settlement,
    });
  }
  let result: DepositSettlement;
  if (row.kind === 'waived') {
    // Nothing was paid: every charge is invoiced against the purchase order.
    const s = settle({ paid: 0, charges });
    result = {
      ...base(row),
      strategy: 'waived',
      kept: 0,
      returned: 0,
      uncovered: s.uncovered,
      allocations: s.allocations,
    };
  } else if (row.kind === 'hold') {
    result = await settleAuthorisation(deps, row, charges);
  } else {
    result = await settleCharge(deps, row, charges);
  }
  await deps.dataSource.transaction('READ COMMITTED', async (tx) => {
    await findLoanDeposit(tx, loanId, 'update');
    const current = await findPayment(tx, { paymentId: row.id }, true);
    if (current?.settledAt) return;
    await updatePayment(tx, row.id, { settledAt: deps.now(), settlement: result }, deps.now());
  });
  return result;
}

function base(row: PaymentRow) {
  return { loanId: row.loanId, paymentId: row.id, currency: row.currency };
}

async function settleAuthorisation(
  deps: PaymentsDeps,
  row: PaymentRow,
  charges: readonly Charge[],
): Promise<DepositSettlement> {
  const pi = row.paymentIntentId!;
  // A hold the network let lapse (7 days) can no longer be captured: everything is uncovered.
  const authorised = row.status === 'authorised' ? row.amountAuthorised : 0;
  const s = settleHold({ authorised, charges });
  if (authorised > 0) {
    const intent = s.cancelAuthorisation
      ? await deps.provider.paymentIntents.cancel(
          pi,
          { cancellation_reason: 'requested_by_customer' },
          { idempotencyKey: idempotencyKeys.settle(row.loanId, pi, 'cancel', 0) },
        )
      : await deps.provider.paymentIntents.capture(
          pi,
          { amount_to_capture: s.capture },
          { idempotencyKey: idempotencyKeys.settle(row.loanId, pi, 'capture', s.capture) },
        );
    await applyPaymentFacts(deps, factsFromIntent(intent, row.checkoutSessionId));
  }
  return {
    ...base(row),
    strategy: 'hold',
    kept: s.capture,
    returned: s.release,
    uncovered: s.uncovered,
    allocations: s.allocations,
  };
}

async function settleCharge(
  deps: PaymentsDeps,
  row: PaymentRow,
  charges: readonly Charge[],
): Promise<DepositSettlement> {
  const pi = row.paymentIntentId!;
  // What is still ours to give back: captured less anything refunded already.
  const paid = Math.max(0, row.amountCaptured - row.amountRefunded);
  const s = settle({ paid, charges });
  if (s.refund > 0) {
    const refund = await deps.provider.refunds.create(
      {
        payment_intent: pi,
        amount: s.refund,
        metadata: { loanId: String(row.loanId), paymentId: String(row.id), why: 'settlement' },
      },
      { idempotencyKey: idempotencyKeys.settle(row.loanId, pi, 'refund', s.refund) },
    );
    await recordRefund(deps, row.id, {
      id: refund.id,
      amount: refund.amount,
      currency: refund.currency,
      status: refund.status ?? 'succeeded',
      reason: 'settlement',
    });
  }
  return {
    ...base(row),
    strategy: 'charge',
    kept: s.deducted,
    returned: s.refund,
    uncovered: s.uncovered,
    allocations: s.allocations,
  };
}
