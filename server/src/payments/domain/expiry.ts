import { applyLoanTransition, planTransition } from '../../loans';
import {
  findApprovedWithoutDeadline,
  findLoanDeposit,
  findOverdueLoans,
} from '../data-access/loan-deposit-repository';
import { closeOpenCheckouts, ensureDeadline, releasePayments } from './confirmation';
import type { PaymentsDeps } from './deps';

/** What one run of the expiry job did. */
export interface ExpiryRun {
  /** Approved loans that got their deposit deadline stored in this run. */
  deadlinesSet: number;
  /** Loans this run moved to `expired`. */
  expired: number[];
  /** Overdue loans another process was handling (row locked), or that changed meanwhile. */
  skipped: number[];
  /** Payments given back (holds cancelled, charges refunded) in this run. */
  released: number;
}

/**
 * One run of the deposit expiry job. Several processes may run it at once:
 *
 * 1. Approved loans without a deadline get one (deterministic, so two runs agree).
 * 2. For each approved loan past its deadline: its open checkout pages are closed at the
 *    provider first (so nobody pays for an expiring loan; a page that turns out paid is applied
 *    and may confirm the loan instead); then, in a transaction per loan, the loan row is taken
 *    with `SELECT … FOR UPDATE SKIP LOCKED` (a loan another process holds is skipped, not
 *    waited for), re-checked, moved `approved → expired` by the loans state machine, its unit
 *    holds released (units locked in ascending id order after the loan), the event written and
 *    the `expired` e-mails and notifications enqueued.
 * 3. Money held for loans that are no longer live is given back (retries of earlier failures).
 */
export async function runDepositExpiry(
  deps: PaymentsDeps,
  options: { limit?: number } = {},
): Promise<ExpiryRun> {
  const limit = options.limit ?? 100;
  const m = deps.dataSource.manager;
  const run: ExpiryRun = { deadlinesSet: 0, expired: [], skipped: [], released: 0 };

  for (const id of await findApprovedWithoutDeadline(m, limit)) {
    const loan = await findLoanDeposit(m, id);
    if (loan && (await ensureDeadline(m, deps, loan))) run.deadlinesSet += 1;
  }

  for (const id of await findOverdueLoans(m, deps.now(), limit)) {
    try {
      await closeOpenCheckouts(deps, id);
    } catch (err) {
      // The provider is away: try again next run rather than expire a loan whose page may be
      // in the middle of being paid.
      deps.logger.warn({ err, loanId: id }, 'could not close checkout pages; expiry postponed');
      run.skipped.push(id);
      continue;
    }
    const expired = await deps.dataSource.transaction('READ COMMITTED', async (tx) => {
      const now = deps.now();
      const loan = await findLoanDeposit(tx, id, 'skip_locked');
      if (!loan || !loan.depositDueAt || loan.depositDueAt > now) return false;
      if (!planTransition(loan.state, 'expire').ok) return false;
      await applyLoanTransition(
        tx,
        loan,
        'expire',
        { userId: null },
        `The deposit was not secured by ${loan.depositDueAt.toISOString()}.`,
        {
          now,
          notifyLoanEvent: deps.notifyLoanEvent,
          depositWindowMs: deps.config.depositWindowMs,
        },
      );
      return true;
    });
    if (expired) run.expired.push(id);
    else run.skipped.push(id);
  }

  run.released = await releasePayments(deps);
  return run;
}

/** A running expiry job; `stop` waits for a run in progress. */
export interface ExpiryJob {
  stop(): Promise<void>;
}

/**
 * Runs {@link runDepositExpiry} every `intervalMs` (never two runs of one process at once). A
 * failed run is logged and the next one tries again.
 */
export function startDepositExpiryJob(deps: PaymentsDeps, intervalMs: number): ExpiryJob {
  let running: Promise<unknown> | null = null;
  let stopped = false;
  const tick = () => {
    if (running || stopped) return;
    running = runDepositExpiry(deps)
      .then((r) => {
        if (r.expired.length || r.released || r.deadlinesSet) {
          deps.logger.info(
            { expired: r.expired.length, released: r.released, deadlinesSet: r.deadlinesSet },
            'deposit expiry run',
          );
        }
      })
      .catch((err: unknown) => deps.logger.warn({ err }, 'deposit expiry run failed'))
      .finally(() => {
        running = null;
      });
  };
  const timer = setInterval(tick, intervalMs);
  timer.unref();
  return {
    async stop() {
      stopped = true;
      clearInterval(timer);
      await running;
    },
  };
}
