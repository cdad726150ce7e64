import { shipmentEta, toSiteDate } from '@evalon/scheduling';
import type { EntityManager } from 'typeorm';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { lockLoan, type LoanRow } from '../../loans';
import {
  findItems,
  findShipment,
  lockLoanShipments,
  updateShipment,
  type ShipmentRow,
} from '../data-access/shipment-repository';
import { requireSide } from './access';
import type { ShipmentsDeps } from './deps';
import { recordState } from './history';
import { returnArrivalDeadline } from './creation';
import { advanceLoan } from './progress';

/** Locks the shipment's loan, then its legs; 404 when unknown. */
export async function lockForChange(
  m: EntityManager,
  shipmentId: number,
): Promise<{ loan: LoanRow; shipment: ShipmentRow; legs: ShipmentRow[] }> {
  const probe = await findShipment(m, shipmentId);
  if (!probe) throw AppError.notFound('shipment_not_found', 'There is no such shipment.');
  const loan = (await lockLoan(m, probe.loanId))!;
  const legs = await lockLoanShipments(m, probe.loanId);
  return { loan, shipment: legs.find((s) => s.id === shipmentId)!, legs };
}

function wrongState(s: ShipmentRow, wanted: string): AppError {
  return AppError.conflict(
    'illegal_state',
    `This shipment is ${s.state.replace('_', ' ')}; ${wanted}.`,
    { state: s.state },
  );
}

async function siteZone(m: EntityManager, siteId: number): Promise<string> {
  const [r]: { time_zone: string }[] = await m.query('SELECT time_zone FROM sites WHERE id = ?', [
    siteId,
  ]);
  return r.time_zone;
}

/**
 * Hands a leg to the carrier: an outbound leg once packed (the lender's coordinator), a return
 * leg once its decontamination is recorded (the hospital's buyer). The booking call happens
 * outside any transaction with an idempotency key made from our shipment id, so a retry after
 * a timeout gets the same tracking number; then the leg becomes `handed_over` with its tracking
 * number and an expected delivery from today (origin zone) and the transit rule.
 */
export async function handOver(
  deps: ShipmentsDeps,
  auth: AuthContext,
  shipmentId: number,
  input: { carrier: string; service: 'standard' | 'express' },
): Promise<void> {
  const m0 = deps.dataSource.manager;
  const s = await findShipment(m0, shipmentId);
  if (!s) throw AppError.notFound('shipment_not_found', 'There is no such shipment.');
  requireSide(auth, s, s.direction === 'outbound' ? 'lender' : 'buyer');
  if (s.trackingNumber === null) {
    if (s.direction === 'outbound' && s.state !== 'packed') {
      throw wrongState(s, 'only a packed shipment can be handed to the carrier');
    }
    if (s.direction === 'return') {
      if (s.state !== 'awaiting_return') throw wrongState(s, 'it is not waiting for its return');
      if (!s.decontamination) {
        throw AppError.conflict(
          'decontamination_required',
          'Record the decontamination (method, by whom, when) before the return ships.',
        );
      }
    }
  }
  if (input.carrier !== deps.carrier.code) {
    throw AppError.field(
      'unknown_carrier',
      'carrier',
      `We can book with “${deps.carrier.code}” only.`,
    );
  }
  const sites: { id: number; name: string; country: string; postal_code: string | null }[] =
    await m0.query('SELECT id, name, country, postal_code FROM sites WHERE id IN (?, ?)', [
      s.depotId,
      s.siteId,
    ]);
  const site = (id: number) => {
    const r = sites.find((x) => Number(x.id) === id)!;
    return { name: r.name, country: r.country, postalCode: r.postal_code };
  };
  const [from, to] =
    s.direction === 'outbound'
      ? [site(s.depotId), site(s.siteId)]
      : [site(s.siteId), site(s.depotId)];
  const booked =
    s.trackingNumber !== null
      ? null
      : await deps.carrier.book({
          reference: s.reference,
          service: input.service,
          shipFrom: from,
          shipTo: to,
          parcels: [{ reference: s.sscc ?? s.reference, weightGrams: 15_000 }],
          // The creation instant keeps keys apart when a rebuilt database hands out the same id
          // again (the carrier remembers keys longer than a test database lives).
          idempotencyKey: `evalon-shipment-${s.id}-${s.createdAt.getTime()}-booking`,
        });
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const { loan, shipment, legs } = await lockForChange(m, shipmentId);
    if (shipment.trackingNumber !== null || !booked) return;
    const from = shipment.state;
    const origin = shipment.direction === 'outbound' ? shipment.depotId : shipment.siteId;
    const today = toSiteDate(now, await siteZone(m, origin));
    const eta = shipmentEta(
      today,
      shipment.transitDays,
      shipment.originCountry,
      shipment.destinationCountry,
    );
    // A return's deadline becomes the depot's: back by the loan's backAtDepot (depot calendar).
    const deadline =
      shipment.direction === 'return'
        ? returnArrivalDeadline(loan.backAtDepot, await siteZone(m, shipment.depotId))
        : null;
    const dueBy = deadline?.dueBy ?? shipment.dueBy;
    const patch = {
      state: 'handed_over' as const,
      carrier: deps.carrier.code,
      service: input.service,
      trackingNumber: booked.trackingNumber,
      carrierStatus: 'booked',
      carrierRank: 0,
      handedOverAt: now,
      eta,
      atRisk: eta > dueBy,
      ...(deadline ?? {}),
    };
    await updateShipment(m, shipment.id, patch, now);
    await recordState(
      m,
      shipment.id,
      from,
      'handed_over',
      `Booked with the carrier, tracking number ${booked.trackingNumber}.`,
      auth.user.id,
      now,
    );
    const updated = legs.map((l) => (l.id === shipment.id ? { ...l, ...patch } : l));
    await advanceLoan(m, loan, updated, auth.user.id, now);
  });
}

/**
 * The hospital confirms receipt of a delivered outbound leg: which checklist lines were missing
 * and condition notes. When every outbound leg is confirmed the loan is `delivered`.
 */
export async function confirmReceipt(
  deps: ShipmentsDeps,
  auth: AuthContext,
  shipmentId: number,
  input: { missingItemIds: number[]; notes: string },
): Promise<void> {
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const { loan, shipment, legs } = await lockForChange(m, shipmentId);
    requireSide(auth, shipment, 'buyer');
    if (shipment.direction !== 'outbound' || shipment.state !== 'delivered') {
      throw wrongState(shipment, 'receipt is confirmed for a delivered outbound shipment');
    }
    if (shipment.receipt) {
      throw AppError.conflict(
        'already_received',
        'Receipt of this shipment was confirmed already.',
      );
    }
    const items = await findItems(m, shipment.id);
    const unknown = input.missingItemIds.filter((id) => !items.some((i) => i.id === id));
    if (unknown.length > 0) {
      throw AppError.field(
        'unknown_items',
        'missingItemIds',
        'Some items are not on this checklist.',
      );
    }
    const missing = items.filter((i) => input.missingItemIds.includes(i.id)).map((i) => i.name);
    const receipt = {
      allPresent: missing.length === 0,
      missing,
      notes: input.notes,
      at: now.toISOString(),
    };
    await updateShipment(m, shipment.id, { receipt }, now);
    await recordState(
      m,
      shipment.id,
      null,
      'delivered',
      missing.length === 0
        ? 'Receipt confirmed by the hospital: everything present.'
        : `Receipt confirmed by the hospital; missing: ${missing.join(', ')}.`,
      auth.user.id,
      now,
    );
    const updated = legs.map((l) => (l.id === shipment.id ? { ...l, receipt } : l));
    await advanceLoan(m, loan, updated, auth.user.id, now);
  });
}

/**
 * The hospital attests the decontamination of what goes back (method, by whom, when), which the
 * return needs before it ships. Devices are decontaminated per the manufacturer's instructions
 * for use and local sterile-processing policy; Evalon records the attestation, it does not
 * judge it.
 */
export async function attestDecontamination(
  deps: ShipmentsDeps,
  auth: AuthContext,
  shipmentId: number,
  input: { method: string; by: string; at: string },
): Promise<void> {
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const { shipment } = await lockForChange(m, shipmentId);
    requireSide(auth, shipment, 'buyer');
    if (shipment.direction !== 'return' || shipment.state !== 'awaiting_return') {
      throw wrongState(shipment, 'decontamination is recorded on a return waiting to ship');
    }
    const at = new Date(input.at);
    if (at.getTime() > now.getTime() + 5 * 60_000) {
      throw AppError.field('in_the_future', 'at', 'The decontamination cannot be in the future.');
    }
    await updateShipment(
      m,
      shipment.id,
      { decontamination: { method: input.method, by: input.by, at: at.toISOString() } },
      now,
    );
    await recordState(
      m,
      shipment.id,
      null,
      'awaiting_return',
      `Decontamination recorded: ${input.method}, by ${input.by}.`,
      auth.user.id,
      now,
    );
  });
}

/**
 * The depot receives a return leg (after scanning what came back): missing required lines are
 * listed in the answer and on the timeline. When every return leg is received the loan is
 * `returned`.
 */
export async function receiveReturn(
  deps: ShipmentsDeps,
  auth: AuthContext,
  shipmentId: number,
): Promise<{ missing: string[] }> {
  return deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const { loan, shipment, legs } = await lockForChange(m, shipmentId);
    requireSide(auth, shipment, 'lender');
    if (
      shipment.direction !== 'return' ||
      !['handed_over', 'in_transit', 'exception'].includes(shipment.state)
    ) {
      throw wrongState(shipment, 'only a return on its way back can be received');
    }
    const missing = (await findItems(m, shipment.id))
      .filter((i) => i.required && i.scanned < i.quantity)
      .map(
        (i) => `${i.name}${i.quantity > 1 ? ` (${i.quantity - i.scanned} of ${i.quantity})` : ''}`,
      );
    await updateShipment(
      m,
      shipment.id,
      { state: 'received', arrivedAt: shipment.arrivedAt ?? now, atRisk: false },
      now,
    );
    await recordState(
      m,
      shipment.id,
      shipment.state,
      'received',
      missing.length === 0
        ? 'Received at the depot: every item scanned back in.'
        : `Received at the depot; missing: ${missing.join(', ')}.`,
      auth.user.id,
      now,
    );
    const updated = legs.map((l) =>
      l.id === shipment.id ? { ...l, state: 'received' as const } : l,
    );
    await advanceLoan(m, loan, updated, auth.user.id, now);
    return { missing };
  });
}
