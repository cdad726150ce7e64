/* The `refunds` table: money the provider gave back, each provider refund once. */
import type { EntityManager } from 'typeorm';
import type { Refund } from '@evalon/contracts';
import { isDuplicateKey } from './duplicate-key';

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
