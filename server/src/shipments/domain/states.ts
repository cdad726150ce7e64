import type { ShipmentDirection, ShipmentState } from '@evalon/contracts';

/**
 * The ladders shipments climb. A shipment only ever moves to a rung above its own; `exception`
 * (the carrier lost it) is a side state that a later forward carrier event may leave.
 */
const ladders: Record<ShipmentDirection, readonly ShipmentState[]> = {
  outbound: ['to_pack', 'packed', 'handed_over', 'in_transit', 'delivered'],
  return: ['awaiting_return', 'handed_over', 'in_transit', 'received', 'inspected'],
};

/** The rung of `state` on the direction's ladder (-1 for `exception` or a foreign state). */
export function rankOf(direction: ShipmentDirection, state: ShipmentState): number {
  return ladders[direction].indexOf(state);
}

/**
 * Whether a shipment in `from` may move to `to`: only upwards on its ladder. From `exception`
 * any rung from `handed_over` up is forward (the parcel turned up again); into `exception` only
 * while the carrier has it (handed over or in transit).
 */
export function canMove(
  direction: ShipmentDirection,
  from: ShipmentState,
  to: ShipmentState,
): boolean {
  if (to === 'exception') return from === 'handed_over' || from === 'in_transit';
  const target = rankOf(direction, to);
  if (target < 0) return false;
  if (from === 'exception') return target > rankOf(direction, 'handed_over');
  const current = rankOf(direction, from);
  return current >= 0 && target > current;
}

/** Whether the leg is still on its way (counts for ETA, risk and overdue). */
export function isUnderway(state: ShipmentState): boolean {
  return [
    'to_pack',
    'packed',
    'awaiting_return',
    'handed_over',
    'in_transit',
    'exception',
  ].includes(state);
}

/** The carrier's status ladder (the stand-in's, and the usual one of parcel carriers). */
export const carrierLadder = [
  'booked',
  'picked_up',
  'in_transit',
  'out_for_delivery',
  'delivered',
] as const;
export type CarrierStatus = (typeof carrierLadder)[number] | 'exception';

/** Rank of a carrier status (0 = booked); -1 for `exception` and unknown words. */
export function carrierRank(status: string): number {
  return (carrierLadder as readonly string[]).indexOf(status);
}

/**
 * Where a carrier status takes a shipment of `direction`: picked up and on the road are our
 * `in_transit`; delivered is `delivered` outbound, while a return stays `in_transit` until the
 * depot has scanned it in (`received`); a lost parcel is `exception`. Null: no state change.
 */
export function stateForCarrierStatus(
  direction: ShipmentDirection,
  status: string,
  detail: string | null,
): ShipmentState | null {
  if (status === 'exception') return detail === 'lost' ? 'exception' : null;
  if (status === 'picked_up' || status === 'in_transit' || status === 'out_for_delivery') {
    return 'in_transit';
  }
  if (status === 'delivered') return direction === 'outbound' ? 'delivered' : 'in_transit';
  return null;
}
