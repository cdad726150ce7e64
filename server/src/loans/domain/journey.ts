import type { LoanState } from '@evalon/contracts';
import type { EntityManager } from 'typeorm';
import { AppError } from '../../http/errors';
import type { LoanRow } from '../data-access/entities';
import { insertLoanEvent, updateLoanState } from '../data-access/loan-repository';

/**
 * The loan's steps after confirmation, taken by the shipment flow (never offered as buttons):
 *
 * | action        | from      | to        | when                                         |
 * | ------------- | --------- | --------- | -------------------------------------------- |
 * | ship          | confirmed | shipped   | every outbound shipment is with the carrier  |
 * | deliver       | shipped   | delivered | the hospital confirmed receipt of everything |
 * | start_return  | delivered | returning | every return shipment is with the carrier    |
 * | receive_back  | returning | returned  | every return shipment was received at depot  |
 * | close         | returned  | closed    | inspected and the deposit settled            |
 */
export const journeyTransitions = {
  ship: { from: ['confirmed'], to: 'shipped' },
  deliver: { from: ['shipped'], to: 'delivered' },
  start_return: { from: ['delivered'], to: 'returning' },
  receive_back: { from: ['returning'], to: 'returned' },
  close: { from: ['returned'], to: 'closed' },
} as const satisfies Record<string, { from: readonly LoanState[]; to: LoanState }>;

/** A step of {@link journeyTransitions}. */
export type JourneyAction = keyof typeof journeyTransitions;

/**
 * Moves a loan (already locked by the caller, in the caller's transaction) one step along
 * {@link journeyTransitions} and records the event. Taking a step the loan has already passed
 * (its state is the step's target) is a no-op returning `false`, so a replayed carrier event or a
 * second click changes nothing; any other state answers 409 `illegal_transition`.
 * @param actor The person who caused it, or null for the system (carrier events, jobs).
 */
export async function applyLoanTransition(
  manager: EntityManager,
  loan: Pick<LoanRow, 'id' | 'state'>,
  action: JourneyAction,
  actor: number | null,
  reason: string | null = null,
  now: Date = new Date(),
): Promise<boolean> {
  const t = journeyTransitions[action];
  if (loan.state === t.to) return false;
  if (!(t.from as readonly LoanState[]).includes(loan.state)) {
    throw AppError.conflict(
      'illegal_transition',
      `This loan is ${loan.state}, so it cannot move to ${t.to}; only a loan that is ${t.from.join(' or ')} can.`,
      { state: loan.state },
    );
  }
  await updateLoanState(manager, loan.id, t.to, now);
  await insertLoanEvent(
    manager,
    { loanId: loan.id, actorUserId: actor, fromState: loan.state, toState: t.to, reason },
    now,
  );
  return true;
}
