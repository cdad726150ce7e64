import { loanStateLabels, type LoanAction, type LoanState, type Role } from '@evalon/contracts';
import type { LoanNotificationEvent } from './notifications';

/**
 * Every step a loan can take, as one table, pure so it can be tested without a database. Each
 * component that moves a loan names a step here and calls the loans front door's
 * `applyLoanTransition`; nothing else writes a loan's state.
 *
 * | action         | from                | to        | taken by                                       | reason   |
 * | -------------- | ------------------- | --------- | ---------------------------------------------- | -------- |
 * | request        | (new loan)          | requested | buyer of the hospital (booking)                | none     |
 * | approve        | requested           | approved  | fleet manager of lender                        | optional |
 * | decline        | requested           | declined  | fleet manager of lender                        | required |
 * | cancel         | requested, approved | cancelled | buyer of the hospital                          | required |
 * | confirm        | approved            | confirmed | payments: a verified payment, or a buyer with an active credit agreement | none |
 * | expire         | approved            | expired   | payments' expiry job (deposit deadline passed) | none     |
 * | ship           | confirmed           | shipped   | shipments (not built yet)                      | none     |
 * | deliver        | shipped             | delivered | shipments                                      | none     |
 * | start_return   | delivered           | returning | shipments                                      | none     |
 * | receive_return | returning           | returned  | shipments                                      | none     |
 * | close          | returned            | closed    | shipments                                      | none     |
 *
 * Declined, cancelled and expired loans release their holds. Only approve, decline and cancel are
 * offered as buttons ({@link allowedActions}); the other steps belong to the component named.
 */
export const loanTransitionActions = [
  'request',
  'approve',
  'decline',
  'cancel',
  'confirm',
  'expire',
  'ship',
  'deliver',
  'start_return',
  'receive_return',
  'close',
] as const;
export type LoanTransitionAction = (typeof loanTransitionActions)[number];

/** One row of {@link loanTransitionTable}. */
export interface TransitionRule {
  /** States the action may start from; `null` is a loan being created. */
  from: readonly (LoanState | null)[];
  to: LoanState;
  /** Whether a reason must be given (it is recorded in the loan's events). */
  reasonRequired: boolean;
  /** The notice sent to the notifications port after the step; null: nobody is told (yet). */
  notice: LoanNotificationEvent | null;
  /**
   * Who may take the step as a button on the loan page: the role in the loan's lender or
   * hospital. Null for steps that a component takes (booking, payments, shipments).
   */
  button: { role: Extract<Role, 'fleet_manager' | 'buyer'>; side: 'lender' | 'hospital' } | null;
}

/** The table of allowed loan transitions (see the module comment). */
export const loanTransitionTable: Readonly<Record<LoanTransitionAction, TransitionRule>> = {
  request: {
    from: [null],
    to: 'requested',
    reasonRequired: false,
    notice: 'requested',
    button: null,
  },
  approve: {
    from: ['requested'],
    to: 'approved',
    reasonRequired: false,
    notice: 'approved',
    button: { role: 'fleet_manager', side: 'lender' },
  },
  decline: {
    from: ['requested'],
    to: 'declined',
    reasonRequired: true,
    notice: 'declined',
    button: { role: 'fleet_manager', side: 'lender' },
  },
  cancel: {
    from: ['requested', 'approved'],
    to: 'cancelled',
    reasonRequired: true,
    notice: 'cancelled',
    button: { role: 'buyer', side: 'hospital' },
  },
  confirm: {
    from: ['approved'],
    to: 'confirmed',
    reasonRequired: false,
    notice: 'confirmed',
    button: null,
  },
  expire: {
    from: ['approved'],
    to: 'expired',
    reasonRequired: false,
    notice: 'expired',
    button: null,
  },
  ship: { from: ['confirmed'], to: 'shipped', reasonRequired: false, notice: null, button: null },
  deliver: {
    from: ['shipped'],
    to: 'delivered',
    reasonRequired: false,
    notice: null,
    button: null,
  },
  start_return: {
    from: ['delivered'],
    to: 'returning',
    reasonRequired: false,
    notice: null,
    button: null,
  },
  receive_return: {
    from: ['returning'],
    to: 'returned',
    reasonRequired: false,
    notice: null,
    button: null,
  },
  close: { from: ['returned'], to: 'closed', reasonRequired: false, notice: null, button: null },
};

/** A step offered as a button: its rule with the role and side that may press it. */
export interface Transition {
  from: readonly LoanState[];
  to: LoanState;
  /** The role that may take the action, in the loan's lender or hospital. */
  role: Extract<Role, 'fleet_manager' | 'buyer'>;
  side: 'lender' | 'hospital';
  /** Whether a reason must be given (it is recorded in the loan's events). */
  reasonRequired: boolean;
}

function buttonTransition(action: LoanAction): Transition {
  const rule = loanTransitionTable[action];
  if (!rule.button) throw new Error(`loan action ${action} is not a button`);
  return {
    from: rule.from.filter((s): s is LoanState => s !== null),
    to: rule.to,
    role: rule.button.role,
    side: rule.button.side,
    reasonRequired: rule.reasonRequired,
  };
}

/** The button steps (approve, decline, cancel), read from {@link loanTransitionTable}. */
export const transitions: Readonly<Record<LoanAction, Transition>> = {
  approve: buttonTransition('approve'),
  decline: buttonTransition('decline'),
  cancel: buttonTransition('cancel'),
};

/** States whose loans no longer block their units. */
export const releasedStates: readonly LoanState[] = ['declined', 'cancelled', 'expired'];

/** Whether a loan in `state` has given up its holds. */
export function releasesHolds(state: LoanState): boolean {
  return releasedStates.includes(state);
}

const actionWords: Record<LoanTransitionAction, string> = {
  request: 'requested',
  approve: 'approved',
  decline: 'declined',
  cancel: 'cancelled',
  confirm: 'confirmed',
  expire: 'expired',
  ship: 'shipped',
  deliver: 'marked delivered',
  start_return: 'sent back',
  receive_return: 'received back',
  close: 'closed',
};

/** The outcome of {@link planTransition}. */
export type TransitionPlan =
  | { ok: true; from: LoanState | null; to: LoanState; releasesHolds: boolean }
  | { ok: false; code: 'illegal_transition' | 'reason_required'; message: string };

const stateWords = (s: LoanState | null) =>
  s === null ? 'not yet created' : `“${loanStateLabels[s]}” (${s})`;

/**
 * Whether `action` may move a loan in `state` (null: a loan being created), and where to.
 * Refusals name the current state so the person sees why (e.g. a loan that is already approved
 * cannot be approved again).
 */
export function planTransition(
  state: LoanState | null,
  action: LoanTransitionAction,
  reason?: string | null,
): TransitionPlan {
  const t = loanTransitionTable[action];
  if (!t.from.includes(state)) {
    const allowed = t.from.map(stateWords).join(' or ');
    return {
      ok: false,
      code: 'illegal_transition',
      message:
        `This loan is ${stateWords(state)}, so it cannot be ` +
        `${actionWords[action]}; only a loan that is ${allowed} can.`,
    };
  }
  if (t.reasonRequired && !reason?.trim()) {
    return { ok: false, code: 'reason_required', message: 'Say why in a few words.' };
  }
  return { ok: true, from: state, to: t.to, releasesHolds: releasesHolds(t.to) };
}

/** The roles a person holds on each side of one loan. */
export interface LoanRoles {
  /** Whether the person is a fleet manager of the loan's lender. */
  lenderFleetManager: boolean;
  /** Whether the person is a buyer of the loan's hospital. */
  hospitalBuyer: boolean;
}

/** The actions a person may take on a loan in `state` now. */
export function allowedActions(state: LoanState, roles: LoanRoles): LoanAction[] {
  return (Object.keys(transitions) as LoanAction[]).filter((action) => {
    const t = transitions[action];
    if (!t.from.includes(state)) return false;
    return t.side === 'lender' ? roles.lenderFleetManager : roles.hospitalBuyer;
  });
}
