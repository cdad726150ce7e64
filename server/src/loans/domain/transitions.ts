import type { Loan, LoanAction } from '@evalon/contracts';
import { AppError } from '../../http/errors';
import type { AuthContext } from '../../identity/domain/auth-context';
import { lockUnits } from '../../catalog/data-access/catalog-repository';
import { deleteLoanHolds } from '../../catalog/data-access/hold-repository';
import { isBuyerOf, isFleetManagerOf } from '../../catalog/domain/scope';
import {
  bumpBookingVersions,
  insertLoanEvent,
  loanUnitIds,
  lockLoan,
  updateLoanState,
} from '../data-access/loan-repository';
import type { LoanDeps } from './deps';
import type { LoanNotificationEvent } from './notifications';
import { canSeeLoan, getLoan } from './queries';
import { planTransition, transitions } from './state-machine';

const noticeOf: Record<LoanAction, LoanNotificationEvent> = {
  approve: 'approved',
  decline: 'declined',
  cancel: 'cancelled',
};

/**
 * Approves, declines or cancels a loan under its row lock: 404 when the person may not see the
 * loan, 403 when they may see it but the action is the other side's (or needs another role),
 * 409 when the loan's state does not allow it (the message names the state). Declining and
 * cancelling release the units' holds (units locked in ascending id order, after the loan). The
 * change, its event and the notification hook's writes commit together.
 */
export async function transitionLoan(
  deps: LoanDeps,
  auth: AuthContext,
  loanId: number,
  action: LoanAction,
  reason: string | null,
): Promise<Loan> {
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const loan = await lockLoan(m, loanId);
    if (!loan || !canSeeLoan(auth, loan)) {
      throw AppError.notFound('loan_not_found', 'There is no such loan.');
    }
    const t = transitions[action];
    const allowed =
      t.side === 'lender'
        ? isFleetManagerOf(auth, loan.lenderId)
        : isBuyerOf(auth, loan.hospitalId);
    if (!allowed) {
      throw AppError.forbidden(
        'forbidden',
        t.side === 'lender'
          ? 'Only fleet managers of the lender can approve or decline this loan.'
          : 'Only buyers of the hospital can cancel this loan.',
      );
    }
    const plan = planTransition(loan.state, action, reason);
    if (!plan.ok) {
      if (plan.code === 'reason_required') throw AppError.field(plan.code, 'reason', plan.message);
      throw AppError.conflict(plan.code, plan.message, { state: loan.state });
    }
    const now = deps.now();
    if (plan.releasesHolds) {
      const locked = await lockUnits(m, await loanUnitIds(m, loanId));
      await deleteLoanHolds(m, loanId);
      await bumpBookingVersions(m, locked);
    }
    await updateLoanState(m, loanId, plan.to, now);
    await insertLoanEvent(
      m,
      {
        loanId,
        actorUserId: auth.user.id,
        fromState: plan.from,
        toState: plan.to,
        reason: reason?.trim() || null,
      },
      now,
    );
    await deps.notifyLoanEvent(m, {
      loanId,
      event: noticeOf[action],
      actorUserId: auth.user.id,
      reason: reason?.trim() || null,
    });
  });
  return getLoan(deps.dataSource.manager, auth, loanId);
}
