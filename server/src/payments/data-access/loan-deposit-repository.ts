/*
 * Reads of the deposit side of loans (the loans, loan units and loan events tables, with each
 * unit's model deposit rule) that the payments use cases need.
 */
import type { EntityManager } from 'typeorm';
import type { DepositStrategyName, LoanState } from '@evalon/contracts';

/** The deposit side of a loan row. */
export interface LoanDepositRow {
  id: number;
  reference: string;
  state: LoanState;
  hospitalId: number;
  lenderId: number;
  siteId: number;
  depositAmount: number;
  depositCurrency: string;
  depositDueAt: Date | null;
  depositStrategy: DepositStrategyName | null;
  purchaseOrderNumber: string | null;
  confirmedAt: Date | null;
  updatedAt: Date;
}

interface LoanDepositSql {
  id: number;
  reference: string;
  state: LoanState;
  hospital_id: number;
  lender_id: number;
  site_id: number;
  deposit_amount: string | number;
  deposit_currency: string;
  deposit_due_at: Date | null;
  deposit_strategy: DepositStrategyName | null;
  purchase_order_number: string | null;
  confirmed_at: Date | null;
  updated_at: Date;
}

const loanColumns = `id, reference, state, hospital_id, lender_id, site_id, deposit_amount,
  deposit_currency, deposit_due_at, deposit_strategy, purchase_order_number, confirmed_at, updated_at`;

function toLoanDeposit(r: LoanDepositSql): LoanDepositRow {
  return {
    id: Number(r.id),
    reference: r.reference,
    state: r.state,
    hospitalId: Number(r.hospital_id),
    lenderId: Number(r.lender_id),
    siteId: Number(r.site_id),
    depositAmount: Number(r.deposit_amount),
    depositCurrency: r.deposit_currency,
    depositDueAt: r.deposit_due_at ? new Date(r.deposit_due_at) : null,
    depositStrategy: r.deposit_strategy,
    purchaseOrderNumber: r.purchase_order_number,
    confirmedAt: r.confirmed_at ? new Date(r.confirmed_at) : null,
    updatedAt: new Date(r.updated_at),
  };
}

/**
 * A loan's deposit fields, or null. `lock` takes the row lock (`FOR UPDATE`), the first lock of
 * every payments transaction (then payment rows, then units in ascending id order).
 */
export async function findLoanDeposit(
  m: EntityManager,
  loanId: number,
  lock: false | 'update' | 'skip_locked' = false,
): Promise<LoanDepositRow | null> {
  const suffix =
    lock === 'update' ? ' FOR UPDATE' : lock === 'skip_locked' ? ' FOR UPDATE SKIP LOCKED' : '';
  const rows: LoanDepositSql[] = await m.query(
    `SELECT ${loanColumns} FROM loans WHERE id = ?${suffix}`,
    [loanId],
  );
  return rows[0] ? toLoanDeposit(rows[0]) : null;
}

/** One unit of a loan with its depot days and its model's deposit rule. */
export interface LoanUnitDepositRow {
  unitId: number;
  shipBy: string;
  readyAgain: string;
  depotTimeZone: string;
  listValue: number;
  rule: { percentBps: number; min: number; max: number; currency: string };
}

/** The units of a loan (ascending id) with footprint days and deposit rules. */
export async function findLoanUnitDeposits(
  m: EntityManager,
  loanId: number,
): Promise<LoanUnitDepositRow[]> {
  const rows: {
    unit_id: number;
    ship_by: string;
    ready_again: string;
    depot_time_zone: string;
    list_value: string | number;
    deposit_percent_bps: number;
    deposit_min: string | number;
    deposit_max: string | number;
    currency: string;
  }[] = await m.query(
    `SELECT lu.unit_id, DATE_FORMAT(lu.ship_by, '%Y-%m-%d') AS ship_by,
            DATE_FORMAT(lu.ready_again, '%Y-%m-%d') AS ready_again, lu.depot_time_zone,
            md.list_value, md.deposit_percent_bps, md.deposit_min, md.deposit_max, md.currency
       FROM loan_units lu JOIN models md ON md.id = lu.model_id
      WHERE lu.loan_id = ? ORDER BY lu.unit_id`,
    [loanId],
  );
  return rows.map((r) => ({
    unitId: Number(r.unit_id),
    shipBy: r.ship_by,
    readyAgain: r.ready_again,
    depotTimeZone: r.depot_time_zone,
    listValue: Number(r.list_value),
    rule: {
      percentBps: Number(r.deposit_percent_bps),
      min: Number(r.deposit_min),
      max: Number(r.deposit_max),
      currency: r.currency,
    },
  }));
}

/** When the loan was (last) approved: its latest `→ approved` event, else its last change. */
export async function findApprovalTime(m: EntityManager, loanId: number): Promise<Date | null> {
  const rows: { at: Date | null }[] = await m.query(
    `SELECT COALESCE(
        (SELECT MAX(at) FROM loan_events WHERE loan_id = ? AND to_state = 'approved'),
        (SELECT updated_at FROM loans WHERE id = ?)) AS at`,
    [loanId, loanId],
  );
  return rows[0]?.at ? new Date(rows[0].at) : null;
}

/** Approved loans without a deadline yet (approved before the payments component knew them). */
export async function findApprovedWithoutDeadline(
  m: EntityManager,
  limit: number,
): Promise<number[]> {
  const rows: { id: number }[] = await m.query(
    `SELECT id FROM loans WHERE state = 'approved' AND deposit_due_at IS NULL ORDER BY id LIMIT ?`,
    [limit],
  );
  return rows.map((r) => Number(r.id));
}

/** Approved loans whose deadline has passed, oldest deadline first (no lock: candidates only). */
export async function findOverdueLoans(
  m: EntityManager,
  now: Date,
  limit: number,
): Promise<number[]> {
  const rows: { id: number }[] = await m.query(
    `SELECT id FROM loans WHERE state = 'approved' AND deposit_due_at <= ?
      ORDER BY deposit_due_at, id LIMIT ?`,
    [now, limit],
  );
  return rows.map((r) => Number(r.id));
}
