import type { VisitState } from '@evalon/contracts';

/** What can be done to a visit. */
export type VisitAction =
  | 'offer'
  | 'accept'
  | 'decline'
  | 'expire'
  | 'exhaust'
  | 'reopen'
  | 'cancel'
  | 'withdraw'
  | 'complete'
  | 'sign_off'
  | 'record_case';

/**
 * The visit's states and the actions each allows (product brief: requested → offered →
 * accepted → completed → signed_off, exits cancelled and unfilled; a declined or expired offer
 * leaves the visit offered to the next candidate, or unfilled when none is left). `reopen`
 * offers an unfilled visit to newly picked candidates (the requester widened the search).
 */
const allowed: Record<VisitState, readonly VisitAction[]> = {
  requested: ['offer', 'exhaust', 'cancel'],
  offered: ['accept', 'decline', 'expire', 'offer', 'exhaust', 'cancel'],
  // `withdraw`: the accepted proctor steps back before the first day; the visit is offered again.
  accepted: ['cancel', 'withdraw', 'complete', 'sign_off', 'record_case'],
  completed: ['sign_off', 'record_case'],
  signed_off: ['sign_off', 'record_case'],
  cancelled: [],
  unfilled: ['reopen', 'cancel'],
};

/** Whether `action` is allowed in `state`. */
export function canDo(state: VisitState, action: VisitAction): boolean {
  return allowed[state].includes(action);
}

/** The sentence a 409 answers with when an action does not fit the state. */
export function illegalMessage(state: VisitState, action: VisitAction): string {
  const words: Record<VisitAction, string> = {
    offer: 'offered',
    accept: 'accepted',
    decline: 'declined',
    expire: 'expired',
    exhaust: 'closed',
    reopen: 'offered again',
    cancel: 'cancelled',
    withdraw: 'withdrawn from',
    complete: 'completed',
    sign_off: 'signed off',
    record_case: 'given case records',
  };
  return `This visit is ${state.replace('_', ' ')}; it cannot be ${words[action]} now.`;
}
