import type { EntityManager } from 'typeorm';
import {
  loanStates,
  type DepositStrategyName,
  type LoanEvent,
  type LoanSortField,
  type LoanState,
  type Milestones,
  type PageQuery,
} from '@evalon/contracts';
import { pageSql } from '../../database/paging';
import { likePattern } from '../../database/sql';
import { LoanEntity, type LoanRow } from './entities';

/** A new loan's fields. */
export interface NewLoan {
  hospitalId: number;
  siteId: number;
  siteTimeZone: string;
  lenderId: number;
  /** Overall milestones: earliest outbound dates, latest return dates across the units. */
  milestones: Milestones;
  depositAmount: number;
  depositCurrency: string;
  note: string | null;
  requestedByUserId: number;
}

/** `EV-<year>-<number>` with the number zero-padded to at least 6 digits. */
export function loanReference(year: number, number: number): string {
  return `EV-${year}-${String(number).padStart(6, '0')}`;
}

/**
 * Inserts a loan in state `requested`, numbered from `loan_reference_seq` in the same
 * statement (the reference is built as {@link loanReference} does, year of `now` in UTC);
 * returns its id and reference via RETURNING: one round trip.
 */
export async function insertLoan(
  m: EntityManager,
  loan: NewLoan,
  now: Date,
): Promise<{ id: number; reference: string }> {
  const ms = loan.milestones;
  const rows: { id: number; reference: string }[] = await m.query(
    `INSERT INTO loans (reference, state, hospital_id, site_id, site_time_zone, lender_id,
        use_from, use_to, ship_by, deliver_by, return_ship_by, back_at_depot, ready_again,
        deposit_amount, deposit_currency, note, requested_by_user_id, created_at, updated_at)
     SELECT CONCAT('EV-', ?, '-', IF(seq.n < 1000000, LPAD(seq.n, 6, '0'), seq.n)), 'requested',
            ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?
       FROM (SELECT NEXTVAL(loan_reference_seq) AS n) seq
     RETURNING id, reference`,
    [
      now.getUTCFullYear(),
      loan.hospitalId,
      loan.siteId,
      loan.siteTimeZone,
      loan.lenderId,
      ms.useFrom,
      ms.useTo,
      ms.shipBy,
      ms.deliverBy,
      ms.returnShipBy,
      ms.backAtDepot,
      ms.readyAgain,
      loan.depositAmount,
      loan.depositCurrency,
      loan.note,
      loan.requestedByUserId,
      now,
      now,
    ],
  );
  return { id: Number(rows[0]!.id), reference: rows[0]!.reference };
}

/** One unit of a new loan. */
export interface NewLoanUnit {
  unitId: number;
  modelId: number;
  depotId: number;
  depotTimeZone: string;
  milestones: Milestones;
  depositAmount: number;
}

/** Inserts a loan's units in one statement. */
export async function insertLoanUnits(
  m: EntityManager,
  loanId: number,
  hospitalId: number,
  units: readonly NewLoanUnit[],
): Promise<void> {
  await m.query(
    `INSERT INTO loan_units (loan_id, unit_id, hospital_id, model_id, depot_id, depot_time_zone,
        ship_by, deliver_by, use_from, use_to, return_ship_by, back_at_depot, ready_again,
        deposit_amount)
     VALUES ${units.map(() => '(?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)').join(', ')}`,
    units.flatMap((u) => [
      loanId,
      u.unitId,
      hospitalId,
      u.modelId,
      u.depotId,
      u.depotTimeZone,
      u.milestones.shipBy,
      u.milestones.deliverBy,
      u.milestones.useFrom,
      u.milestones.useTo,
      u.milestones.returnShipBy,
      u.milestones.backAtDepot,
      u.milestones.readyAgain,
      u.depositAmount,
    ]),
  );
}

/**
 * Moves several locked units' booking versions on by one, each only if it still holds the
 * version read under the lock. Returns whether every unit moved.
 */
export async function bumpBookingVersions(
  m: EntityManager,
  units: readonly { id: number; bookingVersion: number }[],
): Promise<boolean> {
  if (units.length === 0) return true;
  const result: { affectedRows?: number } = await m.query(
    `UPDATE units SET booking_version = booking_version + 1
      WHERE ${units.map(() => '(id = ? AND booking_version = ?)').join(' OR ')}`,
    units.flatMap((u) => [u.id, u.bookingVersion]),
  );
  return result.affectedRows === units.length;
}

/** Records one state change of a loan. */
export async function insertLoanEvent(
  m: EntityManager,
  event: {
    loanId: number;
    actorUserId: number | null;
    fromState: LoanState | null;
    toState: LoanState;
    reason: string | null;
  },
  at: Date,
): Promise<void> {
  await m.query(
    'INSERT INTO loan_events (loan_id, at, actor_user_id, from_state, to_state, reason) VALUES (?, ?, ?, ?, ?, ?)',
    [event.loanId, at, event.actorUserId, event.fromState, event.toState, event.reason],
  );
}

/** A loan row, locked for a state change (`SELECT ... FOR UPDATE`), or null. */
export async function lockLoan(m: EntityManager, id: number): Promise<LoanRow | null> {
  return (
    (await m
      .createQueryBuilder(LoanEntity, 'l')
      .where('l.id = :id', { id })
      .setLock('pessimistic_write')
      .getOne()) ?? null
  );
}

/** Sets a loan's state. */
export async function updateLoanState(
  m: EntityManager,
  id: number,
  state: LoanState,
  now: Date,
): Promise<void> {
  await m.query('UPDATE loans SET state = ?, updated_at = ? WHERE id = ?', [state, now, id]);
}

/** Each unit's ship-by day and depot zone, which bound the deposit deadline. */
export async function loanUnitShipDays(
  m: EntityManager,
  loanId: number,
): Promise<{ shipBy: string; depotTimeZone: string }[]> {
  const rows: { shipBy: string; depotTimeZone: string }[] = await m.query(
    `SELECT DATE_FORMAT(ship_by, '%Y-%m-%d') AS shipBy, depot_time_zone AS depotTimeZone
       FROM loan_units WHERE loan_id = ? ORDER BY unit_id`,
    [loanId],
  );
  return rows;
}

/** Stores a loan's deposit deadline; set once (a stored deadline is never moved). */
export async function setLoanDepositDueAt(
  m: EntityManager,
  loanId: number,
  due: Date,
): Promise<void> {
  await m.query('UPDATE loans SET deposit_due_at = ? WHERE id = ? AND deposit_due_at IS NULL', [
    due,
    loanId,
  ]);
}

/** Records how the deposit was secured on a loan the caller is confirming. */
export async function setLoanDepositOutcome(
  m: EntityManager,
  loanId: number,
  outcome: { strategy: DepositStrategyName; purchaseOrderNumber: string | null },
  now: Date,
): Promise<void> {
  await m.query(
    `UPDATE loans SET confirmed_at = ?, deposit_strategy = ?,
            purchase_order_number = COALESCE(?, purchase_order_number)
      WHERE id = ?`,
    [now, outcome.strategy, outcome.purchaseOrderNumber, loanId],
  );
}

/** Unit ids of a loan. */
export async function loanUnitIds(m: EntityManager, loanId: number): Promise<number[]> {
  const rows: { unit_id: number }[] = await m.query(
    'SELECT unit_id FROM loan_units WHERE loan_id = ? ORDER BY unit_id',
    [loanId],
  );
  return rows.map((r) => Number(r.unit_id));
}

/** A loan with the names a screen shows. */
export interface LoanView {
  id: number;
  reference: string;
  state: LoanState;
  hospitalId: number;
  hospitalName: string;
  siteId: number;
  siteName: string;
  siteTimeZone: string;
  lenderId: number;
  lenderName: string;
  milestones: Milestones;
  depositAmount: number;
  depositCurrency: string;
  note: string | null;
  requestedBy: string;
  createdAt: Date;
}

/** Which loans to read. */
export interface LoanFilter {
  ids?: readonly number[];
  /** Only loans of these hospitals or these lenders; absent = all (platform admin). */
  scope?: { hospitalIds: readonly number[]; lenderIds: readonly number[] };
  /** Only loans in one of these states. */
  states?: readonly LoanState[];
  q?: string;
  /** Which page, in which order; absent = newest first, `limit` rows. */
  page?: PageQuery;
  limit?: number;
}

/** SQL for each sortable column of the loan list. */
const loanSortColumns: Record<LoanSortField, string> = {
  reference: 'l.reference',
  equipment: `(SELECT MIN(md.name) FROM loan_units lu JOIN models md ON md.id = lu.model_id
                WHERE lu.loan_id = l.id)`,
  campus: 's.name',
  window: 'l.use_from',
  state: `FIELD(l.state, ${loanStates.map((st) => `'${st}'`).join(', ')})`,
  deposit: 'l.deposit_amount',
  requested: 'l.created_at',
};

/** WHERE clause and parameters of a loan filter (without paging); null when nothing can match. */
function loanWhere(
  filter: Omit<LoanFilter, 'page' | 'limit'>,
): { sql: string; params: unknown[] } | null {
  const where: string[] = [];
  const params: unknown[] = [];
  if (filter.ids) {
    if (filter.ids.length === 0) return null;
    where.push(`l.id IN (${filter.ids.map(() => '?').join(', ')})`);
    params.push(...filter.ids);
  }
  if (filter.scope) {
    const { hospitalIds, lenderIds } = filter.scope;
    const parts: string[] = [];
    if (hospitalIds.length) {
      parts.push(`l.hospital_id IN (${hospitalIds.map(() => '?').join(', ')})`);
      params.push(...hospitalIds);
    }
    if (lenderIds.length) {
      parts.push(`l.lender_id IN (${lenderIds.map(() => '?').join(', ')})`);
      params.push(...lenderIds);
    }
    if (parts.length === 0) return null;
    where.push(`(${parts.join(' OR ')})`);
  }
  if (filter.states?.length) {
    where.push(`l.state IN (${filter.states.map(() => '?').join(', ')})`);
    params.push(...filter.states);
  }
  if (filter.q) {
    const p = likePattern(filter.q);
    where.push(`(l.reference LIKE ? OR h.name LIKE ? OR s.name LIKE ? OR EXISTS (
      SELECT 1 FROM loan_units lu JOIN units u ON u.id = lu.unit_id JOIN models md ON md.id = lu.model_id
       WHERE lu.loan_id = l.id AND (u.serial_number LIKE ? OR md.name LIKE ?)))`);
    params.push(p, p, p, p, p);
  }
  return { sql: where.length ? `WHERE ${where.join(' AND ')}` : '', params };
}

const loanFrom = `FROM loans l
       JOIN organisations h ON h.id = l.hospital_id
       JOIN organisations ln ON ln.id = l.lender_id
       JOIN sites s ON s.id = l.site_id
       JOIN users u ON u.id = l.requested_by_user_id`;

/** How many loans match the filter, per state (states without loans are left out). */
export async function countLoansByState(
  m: EntityManager,
  filter: Omit<LoanFilter, 'page' | 'limit'>,
): Promise<{ state: LoanState; count: number }[]> {
  const where = loanWhere(filter);
  if (!where) return [];
  const rows: { state: LoanState; count: string | number }[] = await m.query(
    `SELECT l.state AS state, COUNT(*) AS count ${loanFrom} ${where.sql} GROUP BY l.state`,
    where.params,
  );
  return rows.map((r) => ({ state: r.state, count: Number(r.count) }));
}

const dates = (alias: string) =>
  ['use_from', 'use_to', 'ship_by', 'deliver_by', 'return_ship_by', 'back_at_depot', 'ready_again']
    .map((c) => `CAST(${alias}.${c} AS CHAR) AS ${c}`)
    .join(', ');

interface LoanSqlRow {
  id: number;
  reference: string;
  state: LoanState;
  hospital_id: number;
  hospital_name: string;
  site_id: number;
  site_name: string;
  site_time_zone: string;
  lender_id: number;
  lender_name: string;
  use_from: string;
  use_to: string;
  ship_by: string;
  deliver_by: string;
  return_ship_by: string;
  back_at_depot: string;
  ready_again: string;
  deposit_amount: string;
  deposit_currency: string;
  note: string | null;
  requested_by: string;
  created_at: Date;
}

function milestonesOf(r: {
  ship_by: string;
  deliver_by: string;
  use_from: string;
  use_to: string;
  return_ship_by: string;
  back_at_depot: string;
  ready_again: string;
}): Milestones {
  return {
    shipBy: r.ship_by,
    deliverBy: r.deliver_by,
    useFrom: r.use_from,
    useTo: r.use_to,
    returnShipBy: r.return_ship_by,
    backAtDepot: r.back_at_depot,
    readyAgain: r.ready_again,
  };
}

/** Loans matching the filter: one page in its order, or newest first up to `limit`. */
export async function findLoans(m: EntityManager, filter: LoanFilter): Promise<LoanView[]> {
  const where = loanWhere(filter);
  if (!where) return [];
  const order = filter.page
    ? pageSql(filter.page, loanSortColumns, 'l.id')
    : { sql: 'ORDER BY l.id DESC LIMIT ?', params: [filter.limit ?? 100] };
  const rows: LoanSqlRow[] = await m.query(
    `SELECT l.id, l.reference, l.state, l.hospital_id, h.name AS hospital_name, l.site_id,
            s.name AS site_name, l.site_time_zone, l.lender_id, ln.name AS lender_name,
            ${dates('l')}, l.deposit_amount, l.deposit_currency, l.note,
            u.name AS requested_by, l.created_at
       ${loanFrom}
      ${where.sql}
      ${order.sql}`,
    [...where.params, ...order.params],
  );
  return rows.map((r) => ({
    id: Number(r.id),
    reference: r.reference,
    state: r.state,
    hospitalId: Number(r.hospital_id),
    hospitalName: r.hospital_name,
    siteId: Number(r.site_id),
    siteName: r.site_name,
    siteTimeZone: r.site_time_zone,
    lenderId: Number(r.lender_id),
    lenderName: r.lender_name,
    milestones: milestonesOf(r),
    depositAmount: Number(r.deposit_amount),
    depositCurrency: r.deposit_currency,
    note: r.note,
    requestedBy: r.requested_by,
    createdAt: r.created_at,
  }));
}

/** One unit of a loan with names. */
export interface LoanUnitView {
  loanId: number;
  unitId: number;
  modelId: number;
  modelName: string;
  serialNumber: string;
  depotId: number;
  depotName: string;
  milestones: Milestones;
  depositAmount: number;
}

/** The units of some loans, by loan then unit id. */
export async function findLoanUnits(
  m: EntityManager,
  loanIds: readonly number[],
): Promise<LoanUnitView[]> {
  if (loanIds.length === 0) return [];
  const rows: (LoanSqlRow & {
    loan_id: number;
    unit_id: number;
    model_id: number;
    model_name: string;
    serial_number: string;
    depot_id: number;
    depot_name: string;
  })[] = await m.query(
    `SELECT lu.loan_id, lu.unit_id, lu.model_id, md.name AS model_name, u.serial_number,
            lu.depot_id, d.name AS depot_name, ${dates('lu')}, lu.deposit_amount
       FROM loan_units lu
       JOIN units u ON u.id = lu.unit_id
       JOIN models md ON md.id = lu.model_id
       JOIN sites d ON d.id = lu.depot_id
      WHERE lu.loan_id IN (${loanIds.map(() => '?').join(', ')})
      ORDER BY lu.loan_id, lu.unit_id`,
    [...loanIds],
  );
  return rows.map((r) => ({
    loanId: Number(r.loan_id),
    unitId: Number(r.unit_id),
    modelId: Number(r.model_id),
    modelName: r.model_name,
    serialNumber: r.serial_number,
    depotId: Number(r.depot_id),
    depotName: r.depot_name,
    milestones: milestonesOf(r),
    depositAmount: Number(r.deposit_amount),
  }));
}

/** A loan's events, oldest first, with the actor's name. */
export async function findLoanEvents(m: EntityManager, loanId: number): Promise<LoanEvent[]> {
  const rows: {
    id: number;
    at: Date;
    actor_name: string | null;
    from_state: LoanState | null;
    to_state: LoanState;
    reason: string | null;
  }[] = await m.query(
    `SELECT e.id, e.at, u.name AS actor_name, e.from_state, e.to_state, e.reason
       FROM loan_events e LEFT JOIN users u ON u.id = e.actor_user_id
      WHERE e.loan_id = ? ORDER BY e.id`,
    [loanId],
  );
  return rows.map((r) => ({
    id: Number(r.id),
    at: new Date(r.at).toISOString(),
    actorName: r.actor_name,
    fromState: r.from_state,
    toState: r.to_state,
    reason: r.reason,
  }));
}
