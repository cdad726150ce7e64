/* The `payments` table: card holds, charges and waivers of a loan's deposit. */
import type { EntityManager } from 'typeorm';
import type { PaymentKind, PaymentStatus } from '@evalon/contracts';

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
