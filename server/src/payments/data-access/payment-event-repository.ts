/* The `payment_events` table: each provider event once, with what handling it did. */
import type { EntityManager } from 'typeorm';
import { isDuplicateKey } from './duplicate-key';

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
