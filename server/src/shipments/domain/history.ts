import type { ShipmentState } from '@evalon/contracts';
import type { EntityManager } from 'typeorm';
import { insertEvent } from '../data-access/shipment-repository';

/** Records a state change on the shipment's timeline. */
export async function recordState(
  m: EntityManager,
  shipmentId: number,
  from: ShipmentState | null,
  to: ShipmentState,
  message: string,
  actorUserId: number | null,
  now: Date,
): Promise<void> {
  await insertEvent(
    m,
    {
      shipmentId,
      kind: 'state',
      fromState: from,
      toState: to,
      carrierEventId: null,
      carrierStatus: null,
      message,
      ignored: false,
      occurredAt: now,
      actorUserId,
    },
    now,
  );
}
