import { addCalendarDays, shipmentEta, toSiteDate } from '@evalon/scheduling';
import { buildSscc } from '@evalon/gs1';
import type { EntityManager } from 'typeorm';
import { applyLoanTransition, lockLoan } from '../../loans';
import {
  findItems,
  insertEvent,
  lockLoanShipments,
  updateShipment,
  type ShipmentRow,
} from '../data-access/shipment-repository';
import {
  endOfDay,
  ensureOutboundShipments,
  ensureReturnShipment,
  returnArrivalDeadline,
} from './creation';
import { recordState } from './history';

/** How far along the demo data takes a loan's shipments. */
export type DemoShipmentStage =
  | 'to_pack'
  | 'packed'
  | 'handed_over'
  | 'at_risk'
  | 'overdue'
  | 'lost'
  | 'delivered'
  | 'returning'
  | 'awaiting_inspection'
  | 'inspected';

const DAY = 86_400_000;

/** A return's expected arrival and depot deadline from its hand-over, as the hand-over sets them. */
async function returnUnderway(
  m: EntityManager,
  ret: ShipmentRow,
  backAtDepot: string,
  campusZone: string,
  handedOverAt: Date,
) {
  const [{ time_zone: depotZone }]: { time_zone: string }[] = await m.query(
    'SELECT time_zone FROM sites WHERE id = ?',
    [ret.depotId],
  );
  const eta = shipmentEta(
    toSiteDate(handedOverAt, campusZone),
    ret.transitDays,
    ret.originCountry,
    ret.destinationCountry,
  );
  const deadline = returnArrivalDeadline(backAtDepot, depotZone);
  return { eta, atRisk: eta > deadline.dueBy, ...deadline };
}

/**
 * Demo data only: confirms an approved loan (as if its deposit had been waived) and walks its
 * legs to `stage` with the same timeline entries the journey writes, so the board shows every
 * state. Tracking numbers are invented (`WPD` + digits) and unknown to the carrier stand-in.
 */
export async function stageDemoShipments(
  m: EntityManager,
  loanId: number,
  stage: DemoShipmentStage,
  actorUserId: number,
  now: Date,
  serial: { next: number },
): Promise<void> {
  const loan = (await lockLoan(m, loanId))!;
  await m.query("UPDATE loans SET state = 'confirmed', updated_at = ? WHERE id = ?", [now, loanId]);
  await m.query(
    `INSERT INTO loan_events (loan_id, at, actor_user_id, from_state, to_state, reason)
     VALUES (?, ?, NULL, ?, 'confirmed', 'Demo data: deposit waived')`,
    [loanId, now, loan.state],
  );
  await ensureOutboundShipments(m, loanId, now);
  let state: string = 'confirmed';
  const step = async (
    action: 'ship' | 'deliver' | 'start_return' | 'receive_return',
    to: string,
  ) => {
    await applyLoanTransition(
      m,
      { id: loanId, state: state as never },
      action,
      { userId: actorUserId },
      null,
      { now },
    );
    state = to;
  };
  const [out] = (await lockLoanShipments(m, loanId)).filter((s) => s.direction === 'outbound');
  const order: DemoShipmentStage[] = [
    'to_pack',
    'packed',
    'handed_over',
    'delivered',
    'returning',
    'awaiting_inspection',
    'inspected',
  ];
  const reach = (s: DemoShipmentStage) => {
    const target = ['at_risk', 'overdue', 'lost'].includes(stage) ? 'handed_over' : stage;
    return order.indexOf(target) >= order.indexOf(s);
  };
  const at = (daysAgo: number) => new Date(now.getTime() - daysAgo * DAY);
  if (stage === 'to_pack') return;

  // Packed: every line ticked, SSCC from the demo lender's prefix.
  await m.query('UPDATE shipment_items SET scanned = quantity WHERE shipment_id = ?', [out.id]);
  const sscc = buildSscc({
    extensionDigit: 0,
    companyPrefix: '0614141',
    serialReference: String(serial.next++).padStart(9, '0'),
  });
  await updateShipment(m, out.id, { state: 'packed', sscc }, now);
  await recordState(m, out.id, 'to_pack', 'packed', `Packed; SSCC ${sscc}.`, actorUserId, at(3));
  if (!reach('handed_over')) return;

  const tracking = `WPD${String(loanId).padStart(7, '0')}`;
  await updateShipment(
    m,
    out.id,
    {
      state: 'handed_over',
      carrier: 'wendrow',
      service: 'standard',
      trackingNumber: tracking,
      carrierStatus: 'booked',
      carrierRank: 0,
      handedOverAt: at(2),
    },
    now,
  );
  await recordState(
    m,
    out.id,
    'packed',
    'handed_over',
    `Booked with the carrier, tracking number ${tracking}.`,
    actorUserId,
    at(2),
  );
  await step('ship', 'shipped');
  if (stage === 'handed_over') return;

  const carrierEvent = async (
    s: ShipmentRow,
    status: string,
    to: string | null,
    from: string | null,
    daysAgo: number,
    words: string,
  ) =>
    insertEvent(
      m,
      {
        shipmentId: s.id,
        kind: 'carrier',
        fromState: from as never,
        toState: to as never,
        carrierEventId: `demo-${s.id}-${status}`,
        carrierStatus: status.startsWith('exception') ? 'exception' : status,
        message: words,
        ignored: false,
        occurredAt: at(daysAgo),
        actorUserId: null,
      },
      now,
    );
  await carrierEvent(
    out,
    'picked_up',
    'in_transit',
    'handed_over',
    1.5,
    'Picked up by the carrier (origin)',
  );
  await updateShipment(
    m,
    out.id,
    { state: 'in_transit', carrierStatus: 'picked_up', carrierRank: 1 },
    now,
  );

  if (stage === 'at_risk') {
    const [{ due }]: { due: string }[] = await m.query(
      'SELECT CAST(due_by AS CHAR) AS due FROM shipments WHERE id = ?',
      [out.id],
    );
    const eta = addCalendarDays(due, 2);
    await carrierEvent(
      out,
      'exception-delayed',
      null,
      null,
      0.5,
      'Carrier exception: delayed (Harlow Gate hub)',
    );
    await updateShipment(m, out.id, { eta, atRisk: true, carrierStatus: 'exception:delayed' }, now);
    return;
  }
  if (stage === 'overdue') {
    // The deliver-by day was yesterday at the campus and the parcel is still on the road.
    const yesterday = new Date(now.getTime() - DAY).toISOString().slice(0, 10);
    await m.query('UPDATE loans SET deliver_by = ? WHERE id = ?', [yesterday, loanId]);
    await m.query(
      'UPDATE shipments SET due_by = ?, overdue_at = ?, eta = ?, at_risk = TRUE WHERE id = ?',
      [yesterday, endOfDay(yesterday, loan.siteTimeZone), yesterday, out.id],
    );
    await carrierEvent(out, 'in_transit', null, null, 1, 'In transit (Harlow Gate hub)');
    await updateShipment(m, out.id, { carrierStatus: 'in_transit', carrierRank: 2 }, now);
    return;
  }
  if (stage === 'lost') {
    await carrierEvent(
      out,
      'exception-lost',
      'exception',
      'in_transit',
      0.3,
      'Carrier exception: lost (in network)',
    );
    await updateShipment(m, out.id, { state: 'exception', carrierStatus: 'exception:lost' }, now);
    return;
  }

  await carrierEvent(out, 'delivered', 'delivered', 'in_transit', 1, 'Delivered (destination)');
  await updateShipment(
    m,
    out.id,
    { state: 'delivered', carrierStatus: 'delivered', carrierRank: 4, arrivedAt: at(1) },
    now,
  );
  const receipt = {
    allPresent: true,
    missing: [],
    notes: 'Case sealed, all items present.',
    at: at(0.9).toISOString(),
  };
  await updateShipment(m, out.id, { receipt }, now);
  await recordState(
    m,
    out.id,
    null,
    'delivered',
    'Receipt confirmed by the hospital: everything present.',
    null,
    at(0.9),
  );
  const returnId = (await ensureReturnShipment(m, { ...out, state: 'delivered' }, now))!;
  await step('deliver', 'delivered');
  if (stage === 'delivered') return;

  const [ret] = (await lockLoanShipments(m, loanId)).filter((s) => s.id === returnId);
  await updateShipment(
    m,
    ret.id,
    {
      decontamination: {
        method: 'Manual clean, then low-temperature sterilisation per the IFU',
        by: 'Sterile processing, day shift',
        at: at(0.8).toISOString(),
      },
      state: 'handed_over',
      carrier: 'wendrow',
      service: 'standard',
      trackingNumber: `WPR${String(loanId).padStart(7, '0')}`,
      carrierStatus: 'booked',
      handedOverAt: at(0.7),
      // On its way back: expected at the depot by the transit rule, due by backAtDepot there.
      ...(await returnUnderway(m, ret, loan.backAtDepot, loan.siteTimeZone, at(0.7))),
    },
    now,
  );
  await recordState(
    m,
    ret.id,
    'awaiting_return',
    'handed_over',
    'Decontamination recorded; booked with the carrier.',
    null,
    at(0.7),
  );
  await carrierEvent(
    ret,
    'picked_up',
    'in_transit',
    'handed_over',
    0.5,
    'Picked up by the carrier (origin)',
  );
  await updateShipment(
    m,
    ret.id,
    { state: 'in_transit', carrierStatus: 'picked_up', carrierRank: 1 },
    now,
  );
  await step('start_return', 'returning');
  if (stage === 'returning') return;

  await m.query('UPDATE shipment_items SET scanned = quantity WHERE shipment_id = ?', [ret.id]);
  await updateShipment(m, ret.id, { state: 'received', arrivedAt: at(0.2) }, now);
  await recordState(
    m,
    ret.id,
    'in_transit',
    'received',
    'Received at the depot: every item scanned back in.',
    actorUserId,
    at(0.2),
  );
  await step('receive_return', 'returned');
  if (stage === 'awaiting_inspection') return;

  const items = await findItems(m, ret.id);
  await m.query(
    `INSERT INTO inspection_findings (loan_id, unit_id, item_id, category, note, charge, currency, needs_repair, actor_user_id, created_at)
     VALUES (?, ?, ?, 'wear', 'Scuffed carrying case corner', 0, ?, FALSE, ?, ?)`,
    [
      loanId,
      items[0]?.unitId ?? null,
      items[0]?.id ?? null,
      loan.depositCurrency,
      actorUserId,
      now,
    ],
  );
  await updateShipment(m, ret.id, { state: 'inspected' }, now);
  await recordState(
    m,
    ret.id,
    'received',
    'inspected',
    'Inspected: 1 finding(s), no charge.',
    actorUserId,
    now,
  );
}
