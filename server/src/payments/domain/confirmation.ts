import type { EntityManager } from 'typeorm';
import type { DepositStrategyName } from '@evalon/contracts';
import { applyLoanTransition, setLoanDepositDueAt, setLoanDepositOutcome } from '../../loans';
import {
  findApprovalTime,
  findLoanDeposit,
  findLoanUnitDeposits,
  type LoanDepositRow,
} from '../data-access/loan-deposit-repository';
import {
  findOpenCheckouts,
  findPayment,
  findPaymentsToRelease,
  insertPayment,
  updatePayment,
  type PaymentRow,
} from '../data-access/payment-repository';
import {
  insertPaymentEvent,
  setPaymentEventOutcome,
} from '../data-access/payment-event-repository';
import { insertRefund } from '../data-access/refund-repository';
import { depositDeadline } from './deadline';
import type { PaymentsDeps } from './deps';
import {
  factsFromIntent,
  factsFromSession,
  holdsMoney,
  mergeFacts,
  statusAfterRefunds,
  type PaymentFacts,
} from './facts';
import { idempotencyKeys, isProviderRefusal } from './provider';

/** How a loan's deposit came to be secured, for {@link confirmLoan}. */
export interface ConfirmationCause {
  strategy: DepositStrategyName;
  purchaseOrderNumber: string | null;
  /** The buyer who confirmed under a credit agreement; null for the system (a payment). */
  actorUserId: number | null;
  /** Recorded in the loan's event trail. */
  reason: string;
}

/**
 * Moves a locked, approved loan to `confirmed` through the loans front door's `confirm` step:
 * deposit outcome, state, event, and the confirmation e-mails (with the calendar invite) and
 * in-app notifications, all with the caller's manager, i.e. in the caller's transaction. A loan
 * in another state is refused with 409 `illegal_transition` (and the transaction rolls back).
 */
export async function confirmLoan(
  m: EntityManager,
  deps: Pick<PaymentsDeps, 'notifyLoanEvent' | 'now' | 'config'>,
  loan: LoanDepositRow,
  cause: ConfirmationCause,
): Promise<void> {
  const now = deps.now();
  // The deposit outcome first: the confirmation e-mail written by the step reads it.
  await setLoanDepositOutcome(
    m,
    loan.id,
    { strategy: cause.strategy, purchaseOrderNumber: cause.purchaseOrderNumber },
    now,
  );
  await applyLoanTransition(m, loan, 'confirm', { userId: cause.actorUserId }, cause.reason, {
    now,
    notifyLoanEvent: deps.notifyLoanEvent,
    depositWindowMs: deps.config.depositWindowMs,
  });
}

/**
 * The loan's deposit deadline, computed and stored on first use (a loan approved before this
 * component knew it, or by a flow that does not set it). The rule is deterministic, so every
 * process computes the same instant.
 */
export async function ensureDeadline(
  m: EntityManager,
  deps: Pick<PaymentsDeps, 'config'>,
  loan: LoanDepositRow,
): Promise<Date | null> {
  if (loan.depositDueAt) return loan.depositDueAt;
  if (loan.state !== 'approved') return null;
  const approvedAt = await findApprovalTime(m, loan.id);
  const units = await findLoanUnitDeposits(m, loan.id);
  if (!approvedAt || units.length === 0) return null;
  const due = depositDeadline(approvedAt, units, deps.config.depositWindowMs);
  await setLoanDepositDueAt(m, loan.id, due);
  loan.depositDueAt = due;
  return due;
}

const strategyOf = (kind: PaymentRow['kind']): DepositStrategyName =>
  kind === 'hold' ? 'authorise_hold' : 'charge_now_refund_later';

/** What {@link applyPaymentFacts} did. */
export interface ApplyOutcome {
  /**
   * `duplicate`: this event id was handled before, nothing changed; `confirmed`: the loan moved to
   * confirmed; `recorded`: the payment row changed (or was already current); `release`: the
   * money does not secure a live loan and is being given back; `ignored`: nothing of ours.
   */
  outcome: 'duplicate' | 'confirmed' | 'recorded' | 'release' | 'ignored' | 'unknown_loan';
  loanId: number | null;
  paymentId: number | null;
}

/** A provider event as far as the idempotency record needs it. */
export interface EventRef {
  id: string;
  type: string;
  created: number;
}

/**
 * The one place where what the provider says about a payment changes our state; the webhook, the
 * success-redirect reconciliation and the expiry job all come through here, so whichever arrives
 * first makes the one state change and the others find it made.
 *
 * In ONE transaction: the event id is recorded first (unique: a duplicate delivery stops here and
 * changes nothing), then the loan row is locked, then the payment row (found by our id from the
 * metadata, else by the provider's ids; created when the provider holds money we had no row
 * for). The row takes the newer facts (statuses never move back). Money held or captured that
 * covers the deposit confirms an approved loan: state, event, `secures_loan` on the row, e-mails
 * and in-app notifications, together. Money for a loan that is no longer approved (cancelled,
 * expired, confirmed otherwise) is marked for release, and released after the commit.
 *
 * Provider reads (the SDK) happen BEFORE this is called, never inside the transaction.
 */
export async function applyPaymentFacts(
  deps: PaymentsDeps,
  facts: PaymentFacts | null,
  event?: EventRef,
): Promise<ApplyOutcome> {
  const result = await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    let eventRow: number | null = null;
    if (event) {
      eventRow = await insertPaymentEvent(
        m,
        {
          providerEventId: event.id,
          type: event.type,
          providerCreatedAt: new Date(event.created * 1000),
        },
        now,
      );
      if (eventRow === null)
        return { outcome: 'duplicate', loanId: null, paymentId: null } as const;
    }
    const finish = async (o: ApplyOutcome): Promise<ApplyOutcome> => {
      if (eventRow !== null) await setPaymentEventOutcome(m, eventRow, o);
      return o;
    };
    if (!facts) return finish({ outcome: 'ignored', loanId: null, paymentId: null });

    const loan = await findLoanDeposit(m, facts.loanId, 'update');
    if (!loan) return finish({ outcome: 'unknown_loan', loanId: null, paymentId: null });
    let row = await findPayment(
      m,
      {
        paymentId: facts.paymentId,
        paymentIntentId: facts.paymentIntentId,
        checkoutSessionId: facts.checkoutSessionId,
      },
      true,
    );
    if (row && row.loanId !== loan.id) {
      deps.logger.error({ facts, paymentId: row.id }, 'payment facts name another loan; ignored');
      return finish({ outcome: 'ignored', loanId: loan.id, paymentId: null });
    }
    if (!row) {
      // Money we have no row for (e.g. a row lost with a crashed request): track it, so that
      // it either confirms the loan or is given back; never left unaccounted.
      if (!holdsMoney(facts.status))
        return finish({ outcome: 'ignored', loanId: loan.id, paymentId: null });
      const id = await insertPayment(
        m,
        {
          loanId: loan.id,
          provider: 'processor',
          kind: facts.kind ?? 'charge',
          status: 'pending',
          amount: facts.amount,
          currency: facts.currency,
          checkoutSessionId: facts.checkoutSessionId,
          paymentIntentId: facts.paymentIntentId,
          createdByUserId: null,
        },
        now,
      );
      row = await findPayment(m, { paymentId: id }, true);
      if (!row) throw new Error(`payment ${id} vanished`);
    }

    const changes = mergeFacts(row, facts);
    if (Object.keys(changes).length > 0) await updatePayment(m, row.id, changes, now);
    const current: PaymentRow = { ...row, ...changes };

    if (!holdsMoney(current.status) || current.securesLoan) {
      return finish({ outcome: 'recorded', loanId: loan.id, paymentId: row.id });
    }
    const held =
      current.status === 'authorised' ? current.amountAuthorised : current.amountCaptured;
    const covers = held >= loan.depositAmount && current.currency === loan.depositCurrency;
    if (loan.state === 'approved' && covers) {
      await updatePayment(m, row.id, { securesLoan: true }, now);
      const notifyLoanEvent = deps.notifyLoanEventDeferred ?? deps.notifyLoanEvent;
      await confirmLoan(m, { ...deps, notifyLoanEvent }, loan, {
        strategy: strategyOf(current.kind),
        purchaseOrderNumber: null,
        actorUserId: null,
        reason:
          current.status === 'authorised'
            ? 'Deposit secured: card authorisation hold.'
            : 'Deposit secured: card charge (refunded at settlement).',
      });
      return finish({ outcome: 'confirmed', loanId: loan.id, paymentId: row.id });
    }
    if (loan.state === 'approved' && !covers) {
      deps.logger.error(
        { loanId: loan.id, paymentId: row.id, held, currency: current.currency },
        'payment does not cover the deposit; it is given back and the loan stays approved',
      );
    }
    return finish({ outcome: 'release', loanId: loan.id, paymentId: row.id });
  });
  if (result.outcome === 'release' && result.loanId !== null) {
    await releasePayments(deps, result.loanId);
  }
  return result;
}

/**
 * Gives back money that does not secure a live loan (a payment for a cancelled or expired loan,
 * a second payment for a confirmed one): an authorisation hold is cancelled, a charge refunded in
 * full of what is left. Idempotency keys come from our ids, so a retry after a failure or a
 * crash never refunds twice. Failures are logged and left for the next run (the expiry job calls
 * this for every loan): the money stays recorded as held until it is released.
 *
 * @returns How many payments were released in this call.
 */
export async function releasePayments(deps: PaymentsDeps, loanId?: number): Promise<number> {
  const rows = await findPaymentsToRelease(deps.dataSource.manager, 50, loanId);
  let released = 0;
  for (const row of rows) {
    try {
      if (await releasePayment(deps, row)) released += 1;
    } catch (err) {
      deps.logger.warn(
        { err, paymentId: row.id, loanId: row.loanId },
        'release failed; will retry',
      );
    }
  }
  return released;
}

async function releasePayment(deps: PaymentsDeps, row: PaymentRow): Promise<boolean> {
  if (!row.paymentIntentId) return false;
  const pi = row.paymentIntentId;
  if (row.status === 'authorised') {
    let intent;
    try {
      intent = await deps.provider.paymentIntents.cancel(
        pi,
        { cancellation_reason: 'abandoned' },
        { idempotencyKey: idempotencyKeys.releaseHold(row.loanId, pi) },
      );
    } catch (error) {
      if (!isProviderRefusal(error)) throw error;
      // Already cancelled (or captured meanwhile): record what the provider has.
      intent = await deps.provider.paymentIntents.retrieve(pi);
    }
    await applyPaymentFacts(deps, factsFromIntent(intent, row.checkoutSessionId));
    deps.logger.info({ loanId: row.loanId, paymentId: row.id }, 'hold released');
    return intent.status === 'canceled';
  }
  const remaining = row.amountCaptured - row.amountRefunded;
  if (remaining <= 0) return false;
  const refund = await deps.provider.refunds.create(
    {
      payment_intent: pi,
      amount: remaining,
      reason: 'requested_by_customer',
      metadata: { loanId: String(row.loanId), paymentId: String(row.id), why: 'loan_not_active' },
    },
    { idempotencyKey: `${idempotencyKeys.releaseCharge(row.loanId, pi)}-${remaining}` },
  );
  await recordRefund(deps, row.id, {
    id: refund.id,
    amount: refund.amount,
    currency: refund.currency,
    status: refund.status ?? 'succeeded',
    reason: 'loan_not_active',
  });
  deps.logger.info({ loanId: row.loanId, paymentId: row.id, amount: remaining }, 'charge refunded');
  return true;
}

/**
 * Records a refund the provider made (by us, or seen in a webhook): once per refund id, adding its
 * amount to the payment's refunded total (never past what was captured).
 */
export async function recordRefund(
  deps: Pick<PaymentsDeps, 'dataSource' | 'now'>,
  paymentId: number,
  refund: {
    id: string;
    amount: number;
    currency: string;
    status: string;
    reason: 'loan_not_active' | 'duplicate' | 'settlement';
  },
): Promise<void> {
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const probe = await findPayment(m, { paymentId });
    if (!probe) return;
    // Lock order: loan, then payment.
    await findLoanDeposit(m, probe.loanId, 'update');
    const row = await findPayment(m, { paymentId }, true);
    if (!row) return;
    const added = await insertRefund(
      m,
      {
        paymentId,
        loanId: row.loanId,
        providerRefundId: refund.id,
        amount: refund.amount,
        currency: refund.currency.toUpperCase(),
        reason: refund.reason,
        status: refund.status,
      },
      now,
    );
    if (!added) return;
    const refunded = Math.min(row.amountCaptured, row.amountRefunded + refund.amount);
    await updatePayment(
      m,
      paymentId,
      { amountRefunded: refunded, status: statusAfterRefunds(row.amountCaptured, refunded) },
      now,
    );
  });
}

/**
 * Closes a loan's open checkout pages (the loan was confirmed another way, expired or is about to
 * expire): each session is expired at the provider, so nobody can pay for it afterwards. A
 * session that turns out to be paid already is applied instead (it may confirm the loan).
 */
export async function closeOpenCheckouts(deps: PaymentsDeps, loanId: number): Promise<void> {
  const rows = await findOpenCheckouts(deps.dataSource.manager, loanId);
  for (const row of rows) {
    const sessionId = row.checkoutSessionId!;
    let session;
    try {
      session = await deps.provider.checkout.sessions.expire(
        sessionId,
        {},
        { idempotencyKey: idempotencyKeys.expireSession(loanId, sessionId) },
      );
    } catch (error) {
      if (!isProviderRefusal(error)) throw error;
      session = await deps.provider.checkout.sessions.retrieve(sessionId, {
        expand: ['payment_intent'],
      });
    }
    if (session.status === 'complete' && typeof session.payment_intent === 'string') {
      session = await deps.provider.checkout.sessions.retrieve(sessionId, {
        expand: ['payment_intent'],
      });
    }
    await applyPaymentFacts(deps, factsFromSession(session));
  }
}
