import type { EntityManager } from 'typeorm';
import type {
  DepositStrategyName,
  LoanState,
  PaymentKind,
  PaymentStatus,
  Refund,
} from '@evalon/contracts';

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

/** A row of `payments`. */
export interface PaymentRow {
  id: number;
  loanId: number;
  provider: 'processor' | 'credit_agreement' | 'none';
  kind: PaymentKind;
  status: PaymentStatus;
  amount: number;
  currency: string;
  amountAuthorised: number;
  amountCaptured: number;
  amountRefunded: number;
  checkoutSessionId: string | null;
  paymentIntentId: string | null;
  securesLoan: boolean;
  purchaseOrderNumber: string | null;
  failureCode: string | null;
  failureMessage: string | null;
  settledAt: Date | null;
  settlement: unknown;
  createdByUserId: number | null;
  createdAt: Date;
  updatedAt: Date;
}

interface PaymentSql {
  id: number;
  loan_id: number;
  provider: PaymentRow['provider'];
  kind: PaymentKind;
  status: PaymentStatus;
  amount: string | number;
  currency: string;
  amount_authorised: string | number;
  amount_captured: string | number;
  amount_refunded: string | number;
  checkout_session_id: string | null;
  payment_intent_id: string | null;
  secures_loan: number;
  purchase_order_number: string | null;
  failure_code: string | null;
  failure_message: string | null;
  settled_at: Date | null;
  settlement: unknown;
  created_by_user_id: number | null;
  created_at: Date;
  updated_at: Date;
}

const paymentColumns = `id, loan_id, provider, kind, status, amount, currency, amount_authorised,
  amount_captured, amount_refunded, checkout_session_id, payment_intent_id, secures_loan,
  purchase_order_number, failure_code, failure_message, settled_at, settlement,
  created_by_user_id, created_at, updated_at`;

function toPayment(r: PaymentSql): PaymentRow {
  return {
    id: Number(r.id),
    loanId: Number(r.loan_id),
    provider: r.provider,
    kind: r.kind,
    status: r.status,
    amount: Number(r.amount),
    currency: r.currency,
    amountAuthorised: Number(r.amount_authorised),
    amountCaptured: Number(r.amount_captured),
    amountRefunded: Number(r.amount_refunded),
    checkoutSessionId: r.checkout_session_id,
    paymentIntentId: r.payment_intent_id,
    securesLoan: Number(r.secures_loan) === 1,
    purchaseOrderNumber: r.purchase_order_number,
    failureCode: r.failure_code,
    failureMessage: r.failure_message,
    settledAt: r.settled_at ? new Date(r.settled_at) : null,
    settlement: typeof r.settlement === 'string' ? JSON.parse(r.settlement) : r.settlement,
    createdByUserId: r.created_by_user_id === null ? null : Number(r.created_by_user_id),
    createdAt: new Date(r.created_at),
    updatedAt: new Date(r.updated_at),
  };
}

/** A new payment row. */
export interface NewPayment {
  loanId: number;
  provider: PaymentRow['provider'];
  kind: PaymentKind;
  status: PaymentStatus;
  amount: number;
  currency: string;
  securesLoan?: boolean;
  purchaseOrderNumber?: string | null;
  checkoutSessionId?: string | null;
  paymentIntentId?: string | null;
  createdByUserId: number | null;
}

/** Inserts a payment row; returns its id. */
export async function insertPayment(m: EntityManager, p: NewPayment, now: Date): Promise<number> {
  const result: { insertId: number } = await m.query(
    `INSERT INTO payments (loan_id, provider, kind, status, amount, currency, secures_loan,
        purchase_order_number, checkout_session_id, payment_intent_id, created_by_user_id,
        created_at, updated_at)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    [
      p.loanId,
      p.provider,
      p.kind,
      p.status,
      p.amount,
      p.currency,
      p.securesLoan ? 1 : 0,
      p.purchaseOrderNumber ?? null,
      p.checkoutSessionId ?? null,
      p.paymentIntentId ?? null,
      p.createdByUserId,
      now,
      now,
    ],
  );
  return Number(result.insertId);
}

/** How to find a payment row: our id (from the provider object's metadata) or a provider id. */
export interface PaymentLookup {
  paymentId?: number | null;
  checkoutSessionId?: string | null;
  paymentIntentId?: string | null;
}

/**
 * The payment row the lookup names, locked when asked (after the loan row). Our own id wins;
 * then the intent id, then the session id.
 */
export async function findPayment(
  m: EntityManager,
  lookup: PaymentLookup,
  lock = false,
): Promise<PaymentRow | null> {
  const suffix = lock ? ' FOR UPDATE' : '';
  const tries: [string, unknown][] = [];
  if (lookup.paymentId) tries.push(['id = ?', lookup.paymentId]);
  if (lookup.paymentIntentId) tries.push(['payment_intent_id = ?', lookup.paymentIntentId]);
  if (lookup.checkoutSessionId) tries.push(['checkout_session_id = ?', lookup.checkoutSessionId]);
  for (const [where, value] of tries) {
    const rows: PaymentSql[] = await m.query(
      `SELECT ${paymentColumns} FROM payments WHERE ${where}${suffix}`,
      [value],
    );
    if (rows[0]) return toPayment(rows[0]);
  }
  return null;
}

/** Every payment of a loan, oldest first. */
export async function findLoanPayments(m: EntityManager, loanId: number): Promise<PaymentRow[]> {
  const rows: PaymentSql[] = await m.query(
    `SELECT ${paymentColumns} FROM payments WHERE loan_id = ? ORDER BY id`,
    [loanId],
  );
  return rows.map(toPayment);
}

/**
 * The loan's newest card payment that may still have an open checkout session (pending, or
 * declined with the session still open), locked when asked.
 */
export async function findReusableCheckout(
  m: EntityManager,
  loanId: number,
): Promise<PaymentRow | null> {
  const rows: PaymentSql[] = await m.query(
    `SELECT ${paymentColumns} FROM payments
      WHERE loan_id = ? AND provider = 'processor' AND status IN ('pending', 'failed')
      ORDER BY id DESC LIMIT 1 FOR UPDATE`,
    [loanId],
  );
  return rows[0] ? toPayment(rows[0]) : null;
}

/** The fields a payment update may change. */
export type PaymentChanges = Partial<
  Pick<
    PaymentRow,
    | 'status'
    | 'amountAuthorised'
    | 'amountCaptured'
    | 'amountRefunded'
    | 'checkoutSessionId'
    | 'paymentIntentId'
    | 'securesLoan'
    | 'failureCode'
    | 'failureMessage'
    | 'settledAt'
    | 'settlement'
    | 'kind'
  >
>;

const changeColumns: Record<keyof PaymentChanges, string> = {
  status: 'status',
  amountAuthorised: 'amount_authorised',
  amountCaptured: 'amount_captured',
  amountRefunded: 'amount_refunded',
  checkoutSessionId: 'checkout_session_id',
  paymentIntentId: 'payment_intent_id',
  securesLoan: 'secures_loan',
  failureCode: 'failure_code',
  failureMessage: 'failure_message',
  settledAt: 'settled_at',
  settlement: 'settlement',
  kind: 'kind',
};

/** Applies changes to a payment row. */
export async function updatePayment(
  m: EntityManager,
  paymentId: number,
  changes: PaymentChanges,
  now: Date,
): Promise<void> {
  const sets: string[] = [];
  const params: unknown[] = [];
  for (const [key, value] of Object.entries(changes) as [keyof PaymentChanges, unknown][]) {
    if (value === undefined) continue;
    sets.push(`${changeColumns[key]} = ?`);
    if (key === 'securesLoan') params.push(value ? 1 : 0);
    else if (key === 'settlement') params.push(value === null ? null : JSON.stringify(value));
    else params.push(value);
  }
  sets.push('updated_at = ?');
  params.push(now, paymentId);
  await m.query(`UPDATE payments SET ${sets.join(', ')} WHERE id = ?`, params);
}

/**
 * Card payments holding money without securing a live loan: authorised or captured (and not
 * fully refunded) with `secures_loan = 0`. A payment that confirms a loan gets `secures_loan = 1`
 * in the same transaction, so every such row is money to give back.
 */
export async function findPaymentsToRelease(
  m: EntityManager,
  limit: number,
  loanId?: number,
): Promise<PaymentRow[]> {
  const rows: PaymentSql[] = await m.query(
    `SELECT ${paymentColumns} FROM payments
      WHERE secures_loan = 0 AND provider = 'processor'
        AND status IN ('authorised', 'captured', 'partially_refunded')
        ${loanId === undefined ? '' : 'AND loan_id = ?'}
      ORDER BY id LIMIT ?`,
    loanId === undefined ? [limit] : [loanId, limit],
  );
  return rows.map(toPayment);
}

/** Open-looking checkout payments of a loan (pending or failed, with a session). */
export async function findOpenCheckouts(m: EntityManager, loanId: number): Promise<PaymentRow[]> {
  const rows: PaymentSql[] = await m.query(
    `SELECT ${paymentColumns} FROM payments
      WHERE loan_id = ? AND provider = 'processor' AND status IN ('pending', 'failed')
        AND checkout_session_id IS NOT NULL
      ORDER BY id`,
    [loanId],
  );
  return rows.map(toPayment);
}

/**
 * Records a provider event id; false when it was recorded before (a duplicate delivery). The
 * unique key decides, so two concurrent deliveries of one event are serialised by the database:
 * the second waits for the first's commit and then finds the key taken.
 */
export async function insertPaymentEvent(
  m: EntityManager,
  event: { providerEventId: string; type: string; providerCreatedAt: Date | null },
  now: Date,
): Promise<number | null> {
  try {
    const result: { insertId: number } = await m.query(
      `INSERT INTO payment_events (provider_event_id, type, outcome, provider_created_at, received_at)
       VALUES (?, ?, 'received', ?, ?)`,
      [event.providerEventId, event.type, event.providerCreatedAt, now],
    );
    return Number(result.insertId);
  } catch (error) {
    // A duplicate key fails the statement only; the transaction goes on (InnoDB).
    if (isDuplicateKey(error)) return null;
    throw error;
  }
}

/** Whether a query failed on a unique key (MariaDB error 1062). */
export function isDuplicateKey(error: unknown): boolean {
  const e = error as { errno?: number; driverError?: { errno?: number } } | null;
  return e?.errno === 1062 || e?.driverError?.errno === 1062;
}

/** What handling an event did (for the record and for counting duplicates in tests). */
export async function setPaymentEventOutcome(
  m: EntityManager,
  eventRowId: number,
  outcome: { outcome: string; loanId: number | null; paymentId: number | null },
): Promise<void> {
  await m.query('UPDATE payment_events SET outcome = ?, loan_id = ?, payment_id = ? WHERE id = ?', [
    outcome.outcome,
    outcome.loanId,
    outcome.paymentId,
    eventRowId,
  ]);
}

/** Records a refund the provider made; a refund id seen before is not recorded twice. */
export async function insertRefund(
  m: EntityManager,
  refund: {
    paymentId: number;
    loanId: number;
    providerRefundId: string;
    amount: number;
    currency: string;
    reason: Refund['reason'];
    status: string;
  },
  now: Date,
): Promise<boolean> {
  try {
    await m.query(
      `INSERT INTO refunds (payment_id, loan_id, provider_refund_id, amount, currency, reason, status, created_at)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?)`,
      [
        refund.paymentId,
        refund.loanId,
        refund.providerRefundId,
        refund.amount,
        refund.currency,
        refund.reason,
        refund.status,
        now,
      ],
    );
    return true;
  } catch (error) {
    if (isDuplicateKey(error)) return false;
    throw error;
  }
}

/** A loan's refunds, oldest first. */
export async function findLoanRefunds(m: EntityManager, loanId: number): Promise<Refund[]> {
  const rows: {
    id: number;
    payment_id: number;
    amount: string | number;
    currency: string;
    reason: Refund['reason'];
    created_at: Date;
  }[] = await m.query(
    'SELECT id, payment_id, amount, currency, reason, created_at FROM refunds WHERE loan_id = ? ORDER BY id',
    [loanId],
  );
  return rows.map((r) => ({
    id: Number(r.id),
    paymentId: Number(r.payment_id),
    amount: { amount: Number(r.amount), currency: r.currency },
    reason: r.reason,
    createdAt: new Date(r.created_at).toISOString(),
  }));
}
