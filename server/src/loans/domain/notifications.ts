import type { EntityManager } from 'typeorm';

/**
 * Loan events that tell people something; each is the `notice` of a step in the loans state
 * machine's table. The notifications component implements the port below for all of them.
 */
export const loanNotificationEvents = [
  'requested',
  'approved',
  'declined',
  'cancelled',
  'confirmed',
  'expired',
] as const;
export type LoanNotificationEvent = (typeof loanNotificationEvents)[number];

/** What happened to a loan; the hook reads whatever else it needs with `manager`. */
export interface LoanEventNotice {
  loanId: number;
  event: LoanNotificationEvent;
  /** Who caused it (shown as "cancelled by"); absent when the system did (payment, expiry). */
  actorUserId?: number;
  /** The reason given (decline, cancel), if any. */
  reason?: string | null;
}

/**
 * The one notification port of the loans component. Called inside the transaction that changed
 * the loan, with that transaction's manager, so a transactional outbox can write its messages
 * atomically with the change (if the hook throws, the change is rolled back). It must not send
 * anything itself: the outbox worker does that after commit. Whatever it returns is ignored.
 */
export type NotifyLoanEvent = (manager: EntityManager, notice: LoanEventNotice) => Promise<unknown>;

/** The default hook: nothing to notify (until the outbox plugs in its own). */
export const noLoanNotifications: NotifyLoanEvent = async () => undefined;
