import type { EntityManager } from 'typeorm';
import { applyLoanTransition, type LoanRow } from '../../loans';
import type { ShipmentRow } from '../data-access/shipment-repository';
import { rankOf } from './states';

/**
 * Moves the loan along as far as its legs allow (the loan row must be locked by the caller):
 * shipped once every outbound leg is with the carrier, delivered once the hospital confirmed
 * receipt of every outbound leg, returning once every return leg is with the carrier, returned
 * once the depot received every return leg. Closing is the settlement's step.
 */
export async function advanceLoan(
  m: EntityManager,
  loan: Pick<LoanRow, 'id' | 'state'>,
  legs: readonly ShipmentRow[],
  actor: number | null,
  now: Date,
): Promise<void> {
  const outbound = legs.filter((s) => s.direction === 'outbound');
  const returns = legs.filter((s) => s.direction === 'return');
  const atLeast = (s: ShipmentRow, state: 'handed_over' | 'received') =>
    s.state === 'exception' || rankOf(s.direction, s.state) >= rankOf(s.direction, state);
  let state = loan.state;
  const step = async (
    action: 'ship' | 'deliver' | 'start_return' | 'receive_return',
    from: string,
    ready: boolean,
  ) => {
    if (state !== from || !ready) return;
    await applyLoanTransition(m, { id: loan.id, state }, action, { userId: actor }, null, { now });
    state = (
      {
        ship: 'shipped',
        deliver: 'delivered',
        start_return: 'returning',
        receive_return: 'returned',
      } as const
    )[action];
  };
  await step(
    'ship',
    'confirmed',
    outbound.length > 0 && outbound.every((s) => atLeast(s, 'handed_over')),
  );
  await step(
    'deliver',
    'shipped',
    outbound.length > 0 && outbound.every((s) => s.receipt !== null),
  );
  await step(
    'start_return',
    'delivered',
    returns.length === outbound.length && returns.every((s) => atLeast(s, 'handed_over')),
  );
  await step(
    'receive_return',
    'returning',
    returns.length > 0 && returns.every((s) => s.state !== 'exception' && atLeast(s, 'received')),
  );
}
