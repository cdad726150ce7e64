import { carrierStatusLabels } from '@evalon/contracts';
import { lockLoan } from '../../loans';
import {
  findShipment,
  findShipmentIdByTracking,
  insertEvent,
  lockLoanShipments,
  updateShipment,
  type ShipmentPatch,
} from '../data-access/shipment-repository';
import type { TrackingEvent } from './carrier';
import { ensureReturnShipment } from './creation';
import type { ShipmentsDeps } from './deps';
import { advanceLoan } from './progress';
import { canMove, carrierRank, isUnderway, stateForCarrierStatus } from './states';

/** What became of a tracking event. */
export type TrackingOutcome = 'applied' | 'duplicate' | 'stale' | 'unknown_tracking';

/**
 * Applies one carrier tracking event. Each carrier event id is stored once (a repeated delivery
 * is `duplicate`); an event below the carrier status already reached is stored but moves
 * nothing (`stale`: carriers deliver out of order); otherwise the shipment moves forward (never
 * back), its expected delivery follows the carrier's, and the loan follows its legs. A
 * delivered outbound leg gets its return leg. Locks: loan, then the loan's legs.
 */
export async function handleTrackingEvent(
  deps: ShipmentsDeps,
  event: TrackingEvent,
): Promise<TrackingOutcome> {
  return deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const ref = await findShipmentIdByTracking(m, event.trackingNumber);
    if (!ref) return 'unknown_tracking';
    const loan = await lockLoan(m, ref.loanId);
    await lockLoanShipments(m, ref.loanId);
    const s = (await findShipment(m, ref.id, true))!;
    const rank = carrierRank(event.status);
    const stale = rank >= 0 && rank <= s.carrierRank;
    const target = stale ? null : stateForCarrierStatus(s.direction, event.status, event.detail);
    const moves = target !== null && canMove(s.direction, s.state, target);
    const words =
      event.status === 'exception'
        ? `Carrier exception: ${event.detail ?? 'unspecified'}`
        : (carrierStatusLabels[event.status] ?? event.status);
    const stored = await insertEvent(
      m,
      {
        shipmentId: s.id,
        kind: 'carrier',
        fromState: moves ? s.state : null,
        toState: moves ? target : null,
        carrierEventId: event.id,
        carrierStatus: event.status,
        message: `${words}${event.location ? ` (${event.location})` : ''}${stale ? ' — arrived late, already past this' : ''}`,
        ignored: stale,
        occurredAt: event.occurredAt,
        actorUserId: null,
      },
      now,
    );
    if (!stored) return 'duplicate';
    if (stale) return 'stale';
    const patch: ShipmentPatch = {};
    if (rank > s.carrierRank) {
      patch.carrierStatus = event.status;
      patch.carrierRank = rank;
    } else if (event.status === 'exception') {
      patch.carrierStatus = `exception:${event.detail ?? ''}`.slice(0, 20);
    }
    if (moves) patch.state = target;
    const next = target && moves ? target : s.state;
    if (event.estimatedDelivery && isUnderway(next)) {
      patch.eta = event.estimatedDelivery;
      // Outbound: after the deliver-by day; return (underway): after the back-at-depot day.
      patch.atRisk = event.estimatedDelivery > s.dueBy;
    }
    if (event.status === 'delivered') {
      patch.arrivedAt = event.occurredAt;
      patch.atRisk = false;
    }
    await updateShipment(m, s.id, patch, now);
    if (s.direction === 'outbound' && moves && target === 'delivered') {
      await ensureReturnShipment(m, { ...s, ...patch } as typeof s, now);
    }
    if (loan) await advanceLoan(m, loan, await lockLoanShipments(m, s.loanId), null, now);
    return 'applied';
  });
}
