import { addCalendarDays, toSiteDate } from '@evalon/scheduling';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { bumpBookingVersion, insertHolds, lockUnits } from '../../catalog';
import { applyLoanTransition, canSeeLoan, lockLoan } from '../../loans';
import { settleDeposit } from '../../payments';
import { lockLoanShipments, updateShipment } from '../data-access/shipment-repository';
import { lenderOnly, rolesOn } from './access';
import { claimFindingPhotos } from '../data-access/photo-repository';
import type { ShipmentsDeps } from './deps';
import { recordState } from './history';

/** One finding of the return inspection. */
export interface FindingInput {
  unitId?: number;
  itemId?: number;
  category: string;
  note: string;
  charge: number;
  needsRepair: boolean;
  /** Waiting photos of the loan's return legs that show this finding. */
  photoIds?: readonly number[];
}

/** How long a unit needing repair is held for maintenance (a product default; configurable later). */
export const MAINTENANCE_HOLD_DAYS = 14;

function requireLender(auth: AuthContext, loan: { lenderId: number; hospitalId: number } | null) {
  if (!loan || !canSeeLoan(auth, loan)) {
    throw AppError.notFound('loan_not_found', 'There is no such loan.');
  }
  if (!rolesOn(auth, loan).lender) throw lenderOnly();
}

/**
 * Records the return inspection of a returned loan: findings per unit or item with charges in
 * the deposit's currency; every return leg becomes `inspected`; a unit needing repair gets a
 * maintenance hold from today (depot calendar) for {@link MAINTENANCE_HOLD_DAYS} days. Once.
 */
export async function recordInspection(
  deps: ShipmentsDeps,
  auth: AuthContext,
  loanId: number,
  findings: readonly FindingInput[],
): Promise<void> {
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const loan = await lockLoan(m, loanId);
    requireLender(auth, loan);
    const legs = await lockLoanShipments(m, loanId);
    const returns = legs.filter((s) => s.direction === 'return');
    if (loan!.state !== 'returned' || returns.some((s) => s.state !== 'received')) {
      throw AppError.conflict(
        returns.some((s) => s.state === 'inspected') ? 'already_inspected' : 'illegal_state',
        returns.some((s) => s.state === 'inspected')
          ? 'This loan was inspected already.'
          : 'Inspect once every return shipment has been received at the depot.',
        { state: loan!.state },
      );
    }
    const unitIds: number[] = (
      await m.query('SELECT unit_id FROM loan_units WHERE loan_id = ?', [loanId])
    ).map((r: { unit_id: number }) => Number(r.unit_id));
    for (const f of findings) {
      if (f.unitId !== undefined && !unitIds.includes(f.unitId)) {
        throw AppError.field('unknown_unit', 'findings', `Unit ${f.unitId} is not on this loan.`);
      }
    }
    const photoIds = findings.flatMap((f) => f.photoIds ?? []);
    if (new Set(photoIds).size !== photoIds.length) {
      throw AppError.field(
        'photo_used_twice',
        'findings',
        'A photo can belong to one finding only.',
      );
    }
    for (const f of findings) {
      const inserted: { insertId: number } = await m.query(
        `INSERT INTO inspection_findings (loan_id, unit_id, item_id, category, note, charge, currency,
            needs_repair, actor_user_id, created_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
        [
          loanId,
          f.unitId ?? null,
          f.itemId ?? null,
          f.category,
          f.note,
          f.charge,
          loan!.depositCurrency,
          f.needsRepair,
          auth.user.id,
          now,
        ],
      );
      const wanted = f.photoIds ?? [];
      const tied = await claimFindingPhotos(
        m,
        returns.map((r) => r.id),
        wanted,
        Number(inserted.insertId),
      );
      if (tied !== wanted.length) {
        // Rolls the whole inspection back: nothing is written on a bad photo reference.
        throw AppError.field(
          'unknown_photos',
          'findings',
          'Some photos are not waiting inspection photos of this loan’s returns; upload them again.',
        );
      }
    }
    for (const s of returns) {
      await updateShipment(m, s.id, { state: 'inspected' }, now);
      const total = findings.reduce((sum, f) => sum + f.charge, 0);
      await recordState(
        m,
        s.id,
        'received',
        'inspected',
        `Inspected: ${findings.length} finding(s), charges ${total} (minor units of ${loan!.depositCurrency}).`,
        auth.user.id,
        now,
      );
    }
    const repair = [
      ...new Set(findings.filter((f) => f.needsRepair && f.unitId).map((f) => f.unitId!)),
    ];
    if (repair.length > 0) {
      const locked = await lockUnits(m, repair);
      for (const u of locked) {
        const [depot]: { time_zone: string }[] = await m.query(
          'SELECT time_zone FROM sites WHERE id = ?',
          [u.homeDepotId],
        );
        const start = toSiteDate(now, depot.time_zone);
        await bumpBookingVersion(m, u.id, u.bookingVersion);
        await insertHolds(
          m,
          [
            {
              unitId: u.id,
              kind: 'maintenance',
              start,
              end: addCalendarDays(start, MAINTENANCE_HOLD_DAYS - 1),
              loanId: null,
              hospitalId: null,
              reason: `Repair after the return inspection of loan ${loan!.reference}`.slice(0, 300),
              sequence: u.bookingVersion + 1,
              createdByUserId: auth.user.id,
            },
          ],
          now,
        );
      }
    }
  });
}

/** The settlement as the API answers it. */
export interface SettlementResult {
  currency: string;
  strategy: string;
  charged: number;
  kept: number;
  returned: number;
  uncovered: number;
}

const STALE_CLAIM_MS = 120_000;

/**
 * Settles the deposit of an inspected loan and closes it. One settlement per loan: a claim row
 * (unique per loan) lets only one request at a time call the payments component, whose calls to
 * the provider carry idempotency keys, so a retry after a crash never refunds twice; a request
 * that comes while another settles answers 409 `settlement_in_progress`, one after it answers
 * the stored result. Charges above what was paid are reported as `uncovered`, never taken.
 * The buyer gets a statement e-mail with the deduction and the refund.
 */
export async function settleLoan(
  deps: ShipmentsDeps,
  auth: AuthContext,
  loanId: number,
): Promise<{ settlement: SettlementResult; loanState: string }> {
  const m0 = deps.dataSource.manager;
  const [loanRow]: {
    lender_id: number;
    hospital_id: number;
    deposit_amount: string;
    deposit_currency: string;
  }[] = await m0.query(
    'SELECT lender_id, hospital_id, deposit_amount, deposit_currency FROM loans WHERE id = ?',
    [loanId],
  );
  const loan = loanRow
    ? {
        lenderId: Number(loanRow.lender_id),
        hospitalId: Number(loanRow.hospital_id),
        depositAmount: Number(loanRow.deposit_amount),
        depositCurrency: loanRow.deposit_currency,
      }
    : null;
  requireLender(auth, loan);
  const claim = await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const current = await lockLoan(m, loanId);
    const legs = await lockLoanShipments(m, loanId);
    const [row]: { status: string; result: unknown; claimed_at: Date }[] = await m.query(
      'SELECT status, result, claimed_at FROM loan_settlements WHERE loan_id = ? FOR UPDATE',
      [loanId],
    );
    if (row?.status === 'done') {
      const result = typeof row.result === 'string' ? JSON.parse(row.result) : row.result;
      return { done: result as SettlementResult };
    }
    if (row && now.getTime() - new Date(row.claimed_at).getTime() < STALE_CLAIM_MS) {
      throw AppError.conflict('settlement_in_progress', 'This deposit is being settled right now.');
    }
    const returns = legs.filter((s) => s.direction === 'return');
    if (
      current!.state !== 'returned' ||
      returns.length === 0 ||
      returns.some((s) => s.state !== 'inspected')
    ) {
      throw AppError.conflict(
        'not_inspected',
        'Settle the deposit after the return inspection of every shipment.',
        { state: current!.state },
      );
    }
    await m.query(
      `INSERT INTO loan_settlements (loan_id, status, claimed_at) VALUES (?, 'running', ?)
       ON DUPLICATE KEY UPDATE status = 'running', claimed_at = VALUES(claimed_at)`,
      [loanId, now],
    );
    return { done: null };
  });
  if (claim.done) return { settlement: claim.done, loanState: 'closed' };

  const findings: { category: string; note: string; charge: number }[] = (
    await m0.query(
      'SELECT category, note, charge FROM inspection_findings WHERE loan_id = ? ORDER BY id',
      [loanId],
    )
  ).map((f: { category: string; note: string; charge: number }) => ({
    category: f.category,
    note: f.note,
    charge: Number(f.charge),
  }));
  const charges = findings
    .filter((f) => f.charge > 0)
    .map((f) => ({ reason: `${f.category}: ${f.note}`.slice(0, 200), amount: f.charge }));
  let result: SettlementResult;
  let depositTotal = loan!.depositAmount;
  try {
    const s = await settleDeposit(deps.payments, loanId, charges);
    result = {
      currency: s.currency,
      strategy: s.strategy,
      charged: charges.reduce((a, c) => a + c.amount, 0),
      kept: s.kept,
      returned: s.returned,
      uncovered: s.uncovered,
    };
    depositTotal = s.kept + s.returned;
  } catch (err) {
    if (err instanceof AppError && err.code === 'no_deposit') {
      // No deposit was ever paid (none required): everything charged is invoiced.
      const charged = charges.reduce((a, c) => a + c.amount, 0);
      result = {
        currency: loan!.depositCurrency,
        strategy: 'none',
        charged,
        kept: 0,
        returned: 0,
        uncovered: charged,
      };
      depositTotal = 0;
    } else {
      await m0.query("DELETE FROM loan_settlements WHERE loan_id = ? AND status = 'running'", [
        loanId,
      ]);
      throw err;
    }
  }
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const current = (await lockLoan(m, loanId))!;
    await applyLoanTransition(m, current, 'close', { userId: auth.user.id }, null, { now });
    await m.query(
      "UPDATE loan_settlements SET status = 'done', result = ?, finished_at = ? WHERE loan_id = ?",
      [JSON.stringify(result), now, loanId],
    );
    await deps.notify(m, {
      event: 'statement',
      loanId,
      statement: {
        currency: result.currency,
        deposit: depositTotal,
        findings,
        kept: result.kept,
        returned: result.returned,
        uncovered: result.uncovered,
      },
    });
  });
  return { settlement: result, loanState: 'closed' };
}
