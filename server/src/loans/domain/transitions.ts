import type { EntityManager } from 'typeorm';
import type { Loan, LoanAction, LoanState } from '@evalon/contracts';
import { depositDeadline } from '@evalon/deposits';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { lockUnits, deleteLoanHolds, isBuyerOf, isFleetManagerOf } from '../../catalog';
import {
  bumpBookingVersions,
  insertLoanEvent,
  loanUnitIds,
  lockLoan,
  loanUnitShipDays,
  setLoanDepositDueAt,
  updateLoanState,
} from '../data-access/loan-repository';
import type { LoanDeps } from './deps';
import type { NotifyLoanEvent } from './notifications';
import { canSeeLoan, getLoan } from './queries';
import {
  loanTransitionTable,
  planTransition,
  transitions,
  type LoanTransitionAction,
} from './state-machine';

/** Who takes a step: a person, or the system (null: a verified payment, the expiry job). */
export interface LoanActor {
  userId: number | null;
}

/** What {@link applyLoanTransition} needs besides the loan. */
export interface TransitionContext {
  now: Date;
  /** Needed by the steps whose table row names a notice (the journey steps after confirmation have none). */
  notifyLoanEvent?: NotifyLoanEvent;
  /**
   * How long a buyer has to secure the deposit after approval (`EVALON_DEPOSIT_WINDOW_HOURS`);
   * needed by `approve` only.
   */
  depositWindowMs?: number;
}

/**
 * The one way to change a loan's state, for every component: checks `action` against the state
 * machine's table (409 `illegal_transition` naming the state, 422 `reason_required`), releases
 * the units' holds when the new state gives them up (units locked in ascending id order, after
 * the loan), writes the state and the loan event, and tells the notification port, all with the
 * caller's manager. The caller has locked the loan row (or just inserted it, for `request`) and
 * checked who may take the step.
 *
 * @returns The states moved between.
 */
export async function applyLoanTransition(
  m: EntityManager,
  loan: { id: number; state: LoanState | null },
  action: LoanTransitionAction,
  actor: LoanActor,
  reason: string | null,
  ctx: TransitionContext,
): Promise<{ from: LoanState | null; to: LoanState }> {
  const plan = planTransition(loan.state, action, reason);
  if (!plan.ok) {
    if (plan.code === 'reason_required') throw AppError.field(plan.code, 'reason', plan.message);
    throw AppError.conflict(plan.code, plan.message, { state: loan.state });
  }
  const why = reason?.trim() || null;
  if (plan.releasesHolds) {
    const locked = await lockUnits(m, await loanUnitIds(m, loan.id));
    await deleteLoanHolds(m, loan.id);
    await bumpBookingVersions(m, locked);
  }
  // A new loan is inserted in its first state; the step records its event and notice.
  if (plan.from !== null) await updateLoanState(m, loan.id, plan.to, ctx.now);
  if (plan.to === 'approved') {
    // The deposit deadline is fixed once, here, by the @evalon/deposits rule; the approval
    // e-mail, the deposit page and the expiry job all read the stored instant.
    if (ctx.depositWindowMs === undefined) throw new Error('approve needs depositWindowMs');
    const due = depositDeadline(ctx.now, await loanUnitShipDays(m, loan.id), ctx.depositWindowMs);
    await setLoanDepositDueAt(m, loan.id, due);
  }
  await insertLoanEvent(
    m,
    {
      loanId: loan.id,
      actorUserId: actor.userId,
      fromState: plan.from,
      toState: plan.to,
      reason: why,
    },
    ctx.now,
  );
  const notice = loanTransitionTable[action].notice;
  if (notice) {
    // A caller without the notifier for a step that has a notice is a wiring mistake.
    if (!ctx.notifyLoanEvent) throw new Error(`${action} needs notifyLoanEvent`);
    await ctx.notifyLoanEvent(m, {
      loanId: loan.id,
      event: notice,
      ...(actor.userId === null ? {} : { actorUserId: actor.userId }),
      ...(why === null ? {} : { reason: why }),
    });
  }
  return { from: plan.from, to: plan.to };
}

/**
 * Approves, declines or cancels a loan under its row lock: 404 when the person may not see the
 * loan, 403 when they may see it but the action is the other side's (or needs another role),
 * 409 when the loan's state does not allow it (the message names the state). The change, its
 * event, the released holds and the notification hook's writes commit together.
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
    await applyLoanTransition(m, loan, action, { userId: auth.user.id }, reason, {
      now: deps.now(),
      notifyLoanEvent: deps.notifyLoanEvent,
      depositWindowMs: deps.depositWindowMs,
    });
  });
  return getLoan(deps.dataSource.manager, auth, loanId);
}
