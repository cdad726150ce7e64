import { DepositError, depositForLoan, type DepositStrategy } from '@evalon/deposits';
import type { DepositRequest, DepositResponse } from '@evalon/contracts';
import { insertAuditEvent } from '../../audit';
import { isBuyerOf } from '../../catalog';
import type { AuthContext } from '../../identity';
import { canSeeLoan, planTransition } from '../../loans';
import { AppError } from '../../errors';
import { findActiveCreditAgreement } from '../data-access/credit-agreement-repository';
import {
  findLoanDeposit,
  findLoanUnitDeposits,
  type LoanDepositRow,
} from '../data-access/loan-deposit-repository';
import {
  findPayment,
  findReusableCheckout,
  insertPayment,
  updatePayment,
  type PaymentRow,
} from '../data-access/payment-repository';
import {
  applyPaymentFacts,
  closeOpenCheckouts,
  confirmLoan,
  ensureDeadline,
  releasePayments,
} from './confirmation';
import { cardStrategy } from './deadline';
import type { PaymentsDeps } from './deps';
import { factsFromSession } from './facts';
import { idempotencyKeys, isProviderRefusal, type ProviderCheckoutSession } from './provider';

/** The hosted page may stay open at most this long (the provider's limit, from its SDK docs). */
const sessionMaxMs = 24 * 3_600_000;
/** …and at least this long (the provider's minimum of 30 minutes, plus a margin). */
const sessionMinMs = 31 * 60_000;

/** The line item and page title the buyer sees (our words). */
export const depositLineItem = (reference: string) => `Refundable deposit for loan ${reference}`;

type Prepared =
  | { kind: 'done'; response: DepositResponse }
  | {
      kind: 'card';
      loan: LoanDepositRow;
      row: PaymentRow;
      strategy: DepositStrategy;
    };

function response(
  loan: LoanDepositRow,
  outcome: DepositResponse['outcome'],
  extra: Partial<DepositResponse> = {},
): DepositResponse {
  return {
    outcome,
    checkoutUrl: null,
    waived: outcome === 'waived',
    strategy: loan.depositStrategy,
    deposit: { amount: loan.depositAmount, currency: loan.depositCurrency },
    depositDueAt: loan.depositDueAt ? loan.depositDueAt.toISOString() : null,
    loanState: loan.state,
    ...extra,
  };
}

/** Turns an SDK failure into our words: a refusal is a 502, anything else the service being away. */
function providerError(error: unknown): AppError {
  if (error instanceof AppError) return error;
  if (isProviderRefusal(error)) {
    return new AppError(
      502,
      'payment_provider_refused',
      'The payment service refused the request. Try again; if it keeps happening, contact support.',
    );
  }
  return new AppError(
    503,
    'payment_provider_unavailable',
    'The payment service did not answer. Nothing was charged; try again in a minute.',
    undefined,
    { 'Retry-After': '30' },
  );
}

/**
 * Step 1, under the loan's row lock: checks who asks and the loan's state, stores the deadline,
 * and either confirms at once (credit agreement with a purchase order, or nothing to pay) or
 * finds or creates the payment row of a card checkout (the SDK is not called here).
 */
async function prepare(
  deps: PaymentsDeps,
  auth: AuthContext,
  loanId: number,
  body: DepositRequest,
): Promise<Prepared> {
  return deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const loan = await findLoanDeposit(m, loanId, 'update');
    if (!loan || !canSeeLoan(auth, loan)) {
      throw AppError.notFound('loan_not_found', 'There is no such loan.');
    }
    if (!isBuyerOf(auth, loan.hospitalId)) {
      throw AppError.forbidden(
        'forbidden',
        'Only buyers of the hospital can secure the deposit of this loan.',
      );
    }
    if (loan.state === 'confirmed')
      return { kind: 'done', response: response(loan, 'already_confirmed') };
    const plan = planTransition(loan.state, 'confirm');
    if (!plan.ok) throw AppError.conflict(plan.code, plan.message, { state: loan.state });
    const due = await ensureDeadline(m, deps, loan);
    if (due && due <= now) {
      throw AppError.conflict(
        'deposit_deadline_passed',
        `The deadline to secure the deposit passed at ${due.toISOString()}; the loan expires.`,
        { depositDueAt: due.toISOString() },
      );
    }
    const units = await findLoanUnitDeposits(m, loanId);

    if (body.method === 'credit_agreement') {
      const agreement = await findActiveCreditAgreement(m, loan.lenderId, loan.hospitalId);
      if (!agreement) {
        throw AppError.conflict(
          'no_credit_agreement',
          'Your hospital has no active credit agreement with this lender, so the deposit ' +
            'cannot be waived. Pay it by card, or ask the lender’s fleet manager to set up ' +
            'a credit agreement.',
        );
      }
      let purchaseOrderNumber: string;
      try {
        // The waiver rule lives in @evalon/deposits: an approved agreement and a PO number.
        const waiver = depositForLoan(
          units.map((u) => ({ unitId: String(u.unitId), listValue: u.listValue, rule: u.rule })),
          {
            hasApprovedCreditAgreement: true,
            purchaseOrderNumber: body.purchaseOrderNumber,
          },
        );
        if (!waiver.waived) throw new Error('a credit agreement must waive the deposit');
        purchaseOrderNumber = waiver.purchaseOrderNumber;
      } catch (error) {
        if (error instanceof DepositError && error.code === 'purchase_order_required') {
          throw AppError.field('purchase_order_required', 'purchaseOrderNumber', error.message);
        }
        throw error;
      }
      await insertPayment(
        m,
        {
          loanId,
          provider: 'credit_agreement',
          kind: 'waived',
          status: 'waived',
          amount: 0,
          currency: loan.depositCurrency,
          securesLoan: true,
          purchaseOrderNumber,
          createdByUserId: auth.user.id,
        },
        now,
      );
      await confirmLoan(m, deps, loan, {
        strategy: 'credit_agreement',
        purchaseOrderNumber,
        actorUserId: auth.user.id,
        reason: `Deposit waived under the credit agreement; purchase order ${purchaseOrderNumber}.`,
      });
      await insertAuditEvent(m, {
        actorUserId: auth.user.id,
        organisationId: loan.hospitalId,
        action: 'loan.deposit_waived',
        subject: `loan:${loanId}`,
        detail: { purchaseOrderNumber, lenderId: loan.lenderId },
        at: now,
      });
      return {
        kind: 'done',
        response: response(
          { ...loan, state: 'confirmed', depositStrategy: 'credit_agreement' },
          'waived',
        ),
      };
    }

    if (loan.depositAmount === 0) {
      await insertPayment(
        m,
        {
          loanId,
          provider: 'none',
          kind: 'waived',
          status: 'waived',
          amount: 0,
          currency: loan.depositCurrency,
          securesLoan: true,
          createdByUserId: auth.user.id,
        },
        now,
      );
      await confirmLoan(m, deps, loan, {
        strategy: 'no_deposit',
        purchaseOrderNumber: null,
        actorUserId: auth.user.id,
        reason: 'No deposit is required for this loan.',
      });
      return {
        kind: 'done',
        response: response(
          { ...loan, state: 'confirmed', depositStrategy: 'no_deposit' },
          'no_deposit',
        ),
      };
    }

    let strategy: DepositStrategy;
    try {
      strategy = cardStrategy(units, now);
    } catch (error) {
      if (error instanceof DepositError) {
        throw AppError.conflict(
          'footprint_over',
          'This loan’s dates have passed; it cannot be paid.',
        );
      }
      throw error;
    }
    const reusable = await findReusableCheckout(m, loanId);
    if (reusable) return { kind: 'card', loan, row: reusable, strategy };
    const id = await insertPayment(
      m,
      {
        loanId,
        provider: 'processor',
        kind: strategy === 'authorise_hold' ? 'hold' : 'charge',
        status: 'pending',
        amount: loan.depositAmount,
        currency: loan.depositCurrency,
        createdByUserId: auth.user.id,
      },
      now,
    );
    const row = await findPayment(m, { paymentId: id });
    return { kind: 'card', loan, row: row!, strategy };
  });
}

/**
 * The session's `expires_at` (seconds), or undefined for the provider's default of 24 h. Derived
 * from the payment row's creation time and the deadline only, so a retry with the same
 * idempotency key sends the same parameters. The page closes at the deadline (or after 31 min,
 * the provider's minimum, when the deadline is nearer), so nobody pays for an expiring loan.
 */
function sessionExpiry(row: PaymentRow, due: Date | null): number | undefined {
  if (!due) return undefined;
  const created = row.createdAt.getTime();
  if (due.getTime() - created >= sessionMaxMs) return undefined;
  return Math.ceil(Math.max(due.getTime(), created + sessionMinMs) / 1000);
}

async function createCheckout(
  deps: PaymentsDeps,
  loan: LoanDepositRow,
  row: PaymentRow,
): Promise<ProviderCheckoutSession> {
  const metadata = {
    loanId: String(loan.id),
    paymentId: String(row.id),
    loanReference: loan.reference,
  };
  const name = depositLineItem(loan.reference);
  const loanPage = `${deps.publicUrl}/loans/${loan.id}`;
  const expiresAt = sessionExpiry(row, loan.depositDueAt);
  return deps.provider.checkout.sessions.create(
    {
      mode: 'payment',
      line_items: [
        {
          quantity: 1,
          price_data: {
            currency: row.currency.toLowerCase(),
            unit_amount: row.amount,
            product_data: { name },
          },
        },
      ],
      success_url: `${loanPage}?deposit=success&session={CHECKOUT_SESSION_ID}`,
      cancel_url: `${loanPage}?deposit=cancelled`,
      client_reference_id: `loan-${loan.id}`,
      metadata,
      payment_intent_data: {
        capture_method: row.kind === 'hold' ? 'manual' : 'automatic',
        metadata,
        description: name,
      },
      ...(expiresAt ? { expires_at: expiresAt } : {}),
    },
    { idempotencyKey: idempotencyKeys.checkout(loan.id, row.id, row.createdAt) },
  );
}

/**
 * `POST /api/loans/:id/deposit`: the buyer secures the deposit of an approved loan.
 *
 * - Credit agreement: only with an active agreement between the hospital and the lender (409
 *   otherwise) and a purchase order number (422): the loan is confirmed at once, with a `waived`
 *   payment row, its event and the confirmation e-mails, in one transaction.
 * - Nothing to pay (the rules asked for 0): confirmed at once the same way.
 * - Card: the strategy comes from `chooseStrategy` (a hold only when the footprint ends within
 *   the card authorisation window), and the answer is the hosted page of a Checkout Session.
 *   An open session of the loan is handed out again instead of a second one; the session is
 *   created with an idempotency key derived from the payment row, so a retry returns the same
 *   session. The loan is confirmed later by the webhook (or the reconciliation).
 */
export async function startDeposit(
  deps: PaymentsDeps,
  auth: AuthContext,
  loanId: number,
  body: DepositRequest,
): Promise<DepositResponse> {
  // Two rounds at most: the second after finding the reusable session expired.
  for (let round = 0; round < 2; round++) {
    const prepared = await prepare(deps, auth, loanId, body);
    if (prepared.kind === 'done') {
      if (prepared.response.outcome !== 'already_confirmed') {
        // Confirmed without a card: nobody should pay on a page left open.
        await closeOpenCheckouts(deps, loanId).catch((err: unknown) =>
          deps.logger.warn({ err, loanId }, 'could not close open checkout pages'),
        );
      }
      return prepared.response;
    }
    const { loan, row } = prepared;
    const strategy = row.kind === 'hold' ? 'authorise_hold' : 'charge_now_refund_later';
    let session: ProviderCheckoutSession;
    try {
      if (row.checkoutSessionId) {
        session = await deps.provider.checkout.sessions.retrieve(row.checkoutSessionId, {
          expand: ['payment_intent'],
        });
      } else {
        session = await createCheckout(deps, loan, row);
        await deps.dataSource.query(
          'UPDATE payments SET checkout_session_id = ?, updated_at = ? WHERE id = ? AND checkout_session_id IS NULL',
          [session.id, deps.now(), row.id],
        );
      }
    } catch (error) {
      if (isProviderRefusal(error) && !row.checkoutSessionId) {
        // A request the provider will never accept under this key: retire the row, so the
        // next attempt starts a new one with a new key.
        await updatePayment(
          deps.dataSource.manager,
          row.id,
          { status: 'cancelled', failureMessage: (error as Error).message.slice(0, 500) },
          deps.now(),
        );
      }
      throw providerError(error);
    }
    if (session.status === 'open' && session.url) {
      return response(loan, 'checkout', { checkoutUrl: session.url, strategy });
    }
    // Paid already, or the page expired: record what the provider says, then look again.
    await applyPaymentFacts(deps, factsFromSession(session));
    if (session.status === 'complete') {
      await releasePayments(deps, loanId);
      const after = await findLoanDeposit(deps.dataSource.manager, loanId);
      if (after?.state === 'confirmed') return response(after, 'already_confirmed');
      throw AppError.conflict(
        'payment_not_applicable',
        'The payment went through but did not match this loan’s deposit; it is being given back.',
      );
    }
  }
  throw new AppError(503, 'payment_provider_unavailable', 'Try again in a minute.');
}

/**
 * `POST /api/loans/:id/deposit/refresh`: after the hosted page sends the buyer back, reads the
 * loan's checkout sessions through the SDK and applies them through the same path as the
 * webhook, so the loan shows confirmed even when the webhook is late; whichever comes first
 * makes the one change.
 */
export async function refreshDeposit(
  deps: PaymentsDeps,
  auth: AuthContext,
  loanId: number,
  sessionId: string | undefined,
): Promise<void> {
  const m = deps.dataSource.manager;
  const loan = await findLoanDeposit(m, loanId);
  if (!loan || !canSeeLoan(auth, loan)) {
    throw AppError.notFound('loan_not_found', 'There is no such loan.');
  }
  const rows: { checkout_session_id: string }[] = await m.query(
    `SELECT checkout_session_id FROM payments
      WHERE loan_id = ? AND checkout_session_id IS NOT NULL
        AND (status IN ('pending', 'failed') OR checkout_session_id = ?)
      ORDER BY id`,
    [loanId, sessionId ?? ''],
  );
  const ids = rows.map((r) => r.checkout_session_id);
  if (sessionId && !ids.includes(sessionId)) {
    throw AppError.notFound('session_not_found', 'This payment page does not belong to this loan.');
  }
  for (const id of sessionId ? [sessionId] : ids) {
    let session: ProviderCheckoutSession;
    try {
      session = await deps.provider.checkout.sessions.retrieve(id, { expand: ['payment_intent'] });
    } catch (error) {
      throw providerError(error);
    }
    await applyPaymentFacts(deps, factsFromSession(session));
  }
  await releasePayments(deps, loanId);
}
