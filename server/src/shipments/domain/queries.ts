import type {
  ShipmentDetail,
  ShipmentQuery,
  ShipmentRisk,
  ShipmentState,
  ShipmentSummary,
} from '@evalon/contracts';
import { shipmentQuery } from '@evalon/contracts';
import type { EntityManager } from 'typeorm';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { hospitalsOf, lendersOf } from '../../catalog';
import { findEvents, findItems, findScans, findShipment } from '../data-access/shipment-repository';
import { findPhotos } from '../data-access/photo-repository';
import { toShipmentPhoto } from './photos';
import { requireSide, rolesOn } from './access';
import { isUnderway } from './states';

type Sql = Record<string, unknown>;

const summaryColumns = `s.id, s.reference, s.loan_id, l.reference AS loan_reference,
  l.state AS loan_state, s.direction, s.state, s.depot_id, d.name AS depot_name, s.site_id,
  c.name AS site_name, h.name AS hospital_name, s.carrier, s.tracking_number, s.carrier_status,
  CAST(s.due_by AS CHAR) AS due_by, CAST(s.ship_by AS CHAR) AS ship_by, CAST(s.eta AS CHAR) AS eta,
  s.at_risk, s.overdue_at, s.updated_at, s.lender_id, s.hospital_id, s.sscc, s.service,
  s.outbound_id, CAST(l.use_to AS CHAR) AS use_to, s.receipt, s.decontamination,
  (SELECT COUNT(*) FROM shipment_items i WHERE i.shipment_id = s.id) AS items_total,
  (SELECT COUNT(*) FROM shipment_items i WHERE i.shipment_id = s.id AND i.scanned >= i.quantity)
    AS items_done`;

const fromClause = `FROM shipments s JOIN loans l ON l.id = s.loan_id
  JOIN sites d ON d.id = s.depot_id JOIN sites c ON c.id = s.site_id
  JOIN organisations h ON h.id = s.hospital_id`;

/** Risk now: overdue once the deadline has passed while underway; at risk when the ETA is after it. */
export function riskOf(
  state: ShipmentState,
  atRisk: boolean,
  overdueAt: Date,
  now: Date,
): ShipmentRisk {
  // Open: an outbound leg until delivered; a return from waiting at the campus until the depot
  // receives it (its deadline moves from the ship-back day to the back-at-depot day at hand-over).
  const open = isUnderway(state);
  if (!open) return 'on_time';
  if (now.getTime() >= new Date(overdueAt).getTime()) return 'overdue';
  return atRisk ? 'at_risk' : 'on_time';
}

function toSummary(r: Sql, now: Date): ShipmentSummary {
  const state = r.state as ShipmentState;
  const direction = r.direction as 'outbound' | 'return';
  return {
    id: Number(r.id),
    reference: String(r.reference),
    loanId: Number(r.loan_id),
    loanReference: String(r.loan_reference),
    loanState: String(r.loan_state),
    direction,
    state,
    depotId: Number(r.depot_id),
    depotName: String(r.depot_name),
    siteId: Number(r.site_id),
    siteName: String(r.site_name),
    hospitalName: String(r.hospital_name),
    carrier: (r.carrier as string) ?? null,
    trackingNumber: (r.tracking_number as string) ?? null,
    carrierStatus: (r.carrier_status as string) ?? null,
    dueBy: String(r.due_by),
    shipBy: String(r.ship_by),
    eta: (r.eta as string) ?? null,
    risk: riskOf(state, Boolean(Number(r.at_risk)), r.overdue_at as Date, now),
    itemsDone: Number(r.items_done),
    itemsTotal: Number(r.items_total),
    updatedAt: (r.updated_at as Date).toISOString(),
  };
}

const sorts: Record<string, string> = {
  due: 's.due_by ASC, s.id ASC',
  '-due': 's.due_by DESC, s.id DESC',
  updated: 's.updated_at ASC, s.id ASC',
  '-updated': 's.updated_at DESC, s.id DESC',
  reference: 's.reference ASC',
  state: 's.state ASC, s.due_by ASC, s.id ASC',
};

/**
 * Shipments the person may see (lender people: their lender's; hospital people: their
 * hospital's; the admin: all), filtered, sorted and paged in the database. `risk=late` is
 * at risk or overdue. Open legs only unless a state is asked for... all legs are listed; the
 * board asks for the states it shows.
 */
export async function listShipments(
  m: EntityManager,
  auth: AuthContext,
  input: ShipmentQuery,
  now: Date,
): Promise<{ shipments: ShipmentSummary[]; total: number; page: number; pageSize: number }> {
  const q = shipmentQuery.parse(input);
  const where: string[] = [];
  const args: unknown[] = [];
  if (!auth.isPlatformAdmin) {
    const lenders = lendersOf(auth);
    const hospitals = hospitalsOf(auth);
    if (lenders.length === 0 && hospitals.length === 0) {
      return { shipments: [], total: 0, page: q.page, pageSize: q.pageSize };
    }
    const scope: string[] = [];
    if (lenders.length) {
      scope.push('s.lender_id IN (?)');
      args.push(lenders);
    }
    if (hospitals.length) {
      scope.push('s.hospital_id IN (?)');
      args.push(hospitals);
    }
    where.push(`(${scope.join(' OR ')})`);
  }
  if (q.direction) {
    where.push('s.direction = ?');
    args.push(q.direction);
  }
  if (q.state) {
    where.push('s.state = ?');
    args.push(q.state);
  }
  if (q.depotId) {
    where.push('s.depot_id = ?');
    args.push(q.depotId);
  }
  if (q.loanId) {
    where.push('s.loan_id = ?');
    args.push(q.loanId);
  }
  const open = `((s.direction = 'outbound' AND s.state IN ('to_pack','packed','handed_over','in_transit','exception'))
    OR (s.direction = 'return' AND s.state IN ('awaiting_return','handed_over','in_transit','exception')))`;
  if (q.risk === 'overdue') {
    where.push(`${open} AND s.overdue_at <= ?`);
    args.push(now);
  } else if (q.risk === 'at_risk') {
    where.push(`${open} AND s.at_risk = 1 AND s.overdue_at > ?`);
    args.push(now);
  } else if (q.risk === 'late') {
    where.push(`${open} AND (s.at_risk = 1 OR s.overdue_at <= ?)`);
    args.push(now);
  }
  const whereSql = where.length ? `WHERE ${where.join(' AND ')}` : '';
  const [{ n }]: { n: number }[] = await m.query(
    `SELECT COUNT(*) AS n FROM shipments s ${whereSql}`,
    args,
  );
  const rows: Sql[] = await m.query(
    `SELECT STRAIGHT_JOIN ${summaryColumns} ${fromClause} ${whereSql} ORDER BY ${sorts[q.sort]} LIMIT ? OFFSET ?`,
    [...args, q.pageSize, (q.page - 1) * q.pageSize],
  );
  return {
    shipments: rows.map((r) => toSummary(r, now)),
    total: Number(n),
    page: q.page,
    pageSize: q.pageSize,
  };
}

const json = <T>(v: unknown): T | null =>
  v === null || v === undefined ? null : typeof v === 'string' ? (JSON.parse(v) as T) : (v as T);

/** One shipment with its checklist, scans, timeline and what the person may do. */
export async function getShipment(
  m: EntityManager,
  auth: AuthContext,
  id: number,
  now: Date,
): Promise<ShipmentDetail> {
  const [r]: Sql[] = await m.query(`SELECT ${summaryColumns} ${fromClause} WHERE s.id = ?`, [id]);
  const roles = r
    ? rolesOn(auth, { lenderId: Number(r.lender_id), hospitalId: Number(r.hospital_id) })
    : null;
  if (!r || !roles?.sees)
    throw AppError.notFound('shipment_not_found', 'There is no such shipment.');
  const summary = toSummary(r, now);
  const items = await findItems(m, id);
  const scans = await findScans(m, id);
  const events = await findEvents(m, id);
  const photos = await findPhotos(m, id);
  const decontamination = json<{ method: string; by: string; at: string }>(r.decontamination);
  const receipt = json<{ allPresent: boolean; missing: string[]; notes: string; at: string }>(
    r.receipt,
  );
  const actions: string[] = [];
  const s = summary;
  if (roles.lender) {
    if (s.direction === 'outbound' && s.state === 'to_pack') actions.push('scan', 'pack');
    if (s.direction === 'outbound' && s.state === 'packed')
      actions.push('hand_over', 'packing_slip');
    if (s.direction === 'return' && ['handed_over', 'in_transit', 'exception'].includes(s.state)) {
      actions.push('scan', 'receive');
    }
    if (s.direction === 'return' && s.state === 'received') actions.push('inspect');
    if (s.direction === 'return' && s.state === 'inspected' && s.loanState === 'returned') {
      actions.push('settle');
    }
  }
  if (roles.buyer) {
    if (s.direction === 'outbound' && s.state === 'delivered' && !receipt) actions.push('receipt');
    if (s.direction === 'return' && s.state === 'awaiting_return') {
      actions.push(decontamination ? 'hand_over' : 'decontamination');
    }
  }
  return {
    ...summary,
    sscc: (r.sscc as string) ?? null,
    service: (r.service as string) ?? null,
    outboundId: r.outbound_id === null ? null : Number(r.outbound_id),
    lastCaseDay: String(r.use_to),
    checklist: items.map((i) => ({
      id: i.id,
      unitId: i.unitId,
      unitSerial: i.unitSerial,
      name: i.name,
      gtin: i.gtin,
      quantity: i.quantity,
      scanned: i.scanned,
      needsLot: i.needsLot,
      needsSerial: i.needsSerial,
      needsExpiry: i.needsExpiry,
      required: i.required,
      complete: i.scanned >= i.quantity,
      manualReason: i.manualReason,
    })),
    scans: scans.map((x) => ({
      id: Number(x.id),
      itemId: x.item_id === null ? null : Number(x.item_id),
      phase: x.phase as 'pack' | 'receive',
      outcome: x.outcome as 'ticked' | 'refused' | 'manual',
      raw: (x.raw as string) ?? null,
      code: (x.code as string) ?? null,
      message: (x.message as string) ?? null,
      gtin: (x.gtin as string) ?? null,
      lot: (x.lot as string) ?? null,
      serial: (x.serial as string) ?? null,
      expiry: (x.expiry_text as string) ?? null,
      by: (x.actor_name as string) ?? null,
      at: (x.created_at as Date).toISOString(),
    })),
    events: events.map((e) => ({
      id: Number(e.id),
      kind: e.kind as 'state' | 'carrier' | 'alert' | 'note',
      fromState: (e.from_state as ShipmentState) ?? null,
      toState: (e.to_state as ShipmentState) ?? null,
      carrierStatus: (e.carrier_status as string) ?? null,
      message: String(e.message),
      ignored: Boolean(Number(e.ignored)),
      occurredAt: (e.occurred_at as Date).toISOString(),
      by: (e.actor_name as string) ?? null,
    })),
    photos: photos.map(toShipmentPhoto),
    receipt,
    decontamination,
    actions,
  };
}

/**
 * The scope check of the `/api/shipments/:id/...` routes that change a shipment, run before the
 * body is validated: 404 when the person may not see the shipment, 403 when the step belongs to
 * the other side (`by-direction`: the lender hands over outbound legs, the hospital returns).
 * The use case checks again under its lock.
 */
export async function assertShipmentSide(
  m: EntityManager,
  auth: AuthContext,
  shipmentId: number,
  side: 'lender' | 'buyer' | 'by-direction',
): Promise<void> {
  const s = await findShipment(m, shipmentId);
  if (!s) throw AppError.notFound('shipment_not_found', 'There is no such shipment.');
  requireSide(
    auth,
    s,
    side === 'by-direction' ? (s.direction === 'outbound' ? 'lender' : 'buyer') : side,
  );
}

/**
 * The scope check of `/api/loans/:id/inspection` and `/settle`: 404 for a loan the person may
 * not see, 403 for anyone but the lender's people, before the body is validated.
 */
export async function assertLenderOfLoan(
  m: EntityManager,
  auth: AuthContext,
  loanId: number,
): Promise<void> {
  const [row]: Sql[] = await m.query('SELECT lender_id, hospital_id FROM loans WHERE id = ?', [
    loanId,
  ]);
  const loan = row
    ? { lenderId: Number(row.lender_id), hospitalId: Number(row.hospital_id) }
    : null;
  if (!loan || !rolesOn(auth, loan).sees) {
    throw AppError.notFound('loan_not_found', 'There is no such loan.');
  }
  if (!rolesOn(auth, loan).lender) {
    throw AppError.forbidden(
      'forbidden',
      'Only the lender’s coordinators and fleet managers can do this.',
    );
  }
}
