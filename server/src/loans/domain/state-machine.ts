import { loanStateLabels, type LoanAction, type LoanState, type Role } from '@evalon/contracts';

/**
 * The loan state machine for the steps this part of Evalon handles, pure so it can be tested
 * without a database:
 *
 * | action  | from                  | to        | who                      | reason   |
 * | ------- | --------------------- | --------- | ------------------------ | -------- |
 * | approve | requested             | approved  | fleet manager of lender  | optional |
 * | decline | requested             | declined  | fleet manager of lender  | required |
 * | cancel  | requested, approved   | cancelled | buyer of the hospital    | required |
 * | confirm | approved              | confirmed | system (verified payment) or buyer with an active credit agreement | none |
 * | expire  | approved              | expired   | system (deposit deadline passed) | none |
 *
 * Declined, cancelled and expired loans release their holds. `confirm` and `expire` belong to the
 * deposit flow (payments component): they are in {@link depositTransitions}, not offered as
 * buttons by {@link allowedActions}; the later states (shipped, ...) belong to the shipment flow.
 */
export interface Transition {
  /** States the action may start from. */
  from: readonly LoanState[];
  to: LoanState;
  /** The role that may take the action, in the loan's lender or hospital. */
  role: Extract<Role, 'fleet_manager' | 'buyer'>;
  side: 'lender' | 'hospital';
  /** Whether a reason must be given (it is recorded in the loan's events). */
  reasonRequired: boolean;
}

export const transitions: Readonly<Record<LoanAction, Transition>> = {
  approve: {
    from: ['requested'],
    to: 'approved',
    role: 'fleet_manager',
    side: 'lender',
    reasonRequired: false,
  },
  decline: {
    from: ['requested'],
    to: 'declined',
    role: 'fleet_manager',
    side: 'lender',
    reasonRequired: true,
  },
  cancel: {
    from: ['requested', 'approved'],
    to: 'cancelled',
    role: 'buyer',
    side: 'hospital',
    reasonRequired: true,
  },
};

/** States whose loans no longer block their units. */
export const releasedStates: readonly LoanState[] = ['declined', 'cancelled', 'expired'];

/** Whether a loan in `state` has given up its holds. */
export function releasesHolds(state: LoanState): boolean {
  return releasedStates.includes(state);
}

/** Steps of the deposit flow: taken by the payments component, never offered as buttons. */
export type DepositAction = 'confirm' | 'expire';

/**
 * The deposit flow's transitions. Who may take them is decided by the payments component: the
 * system after a verified payment (webhook or reconciliation) or a buyer of the hospital under an
 * active credit agreement (`confirm`), the expiry job (`expire`).
 */
export const depositTransitions: Readonly<
  Record<DepositAction, Pick<Transition, 'from' | 'to' | 'reasonRequired'>>
> = {
  confirm: { from: ['approved'], to: 'confirmed', reasonRequired: false },
  expire: { from: ['approved'], to: 'expired', reasonRequired: false },
};

const actionWords: Record<LoanAction | DepositAction, string> = {
  approve: 'approved',
  decline: 'declined',
  cancel: 'cancelled',
  confirm: 'confirmed',
  expire: 'expired',
};

/** The outcome of {@link planTransition}. */
export type TransitionPlan =
  | { ok: true; from: LoanState; to: LoanState; releasesHolds: boolean }
  | { ok: false; code: 'illegal_transition' | 'reason_required'; message: string };

/**
 * Whether `action` may move a loan in `state`, and where to. Refusals name the current state so
 * the person sees why (e.g. a loan that is already approved cannot be approved again).
 */
export function planTransition(
  state: LoanState,
  action: LoanAction | DepositAction,
  reason?: string | null,
): TransitionPlan {
  const t =
    action === 'confirm' || action === 'expire' ? depositTransitions[action] : transitions[action];
  if (!t.from.includes(state)) {
    const allowed = t.from.map((s) => `“${loanStateLabels[s]}” (${s})`).join(' or ');
    return {
      ok: false,
      code: 'illegal_transition',
      message:
        `This loan is “${loanStateLabels[state]}” (${state}), so it cannot be ` +
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
