import type { CreditAgreement } from '@evalon/contracts';
import { insertAuditEvent } from '../../audit';
import type { AuthContext } from '../../identity';
import { findOrganisation } from '../../organisations';
import { AppError } from '../../errors';
import {
  findCreditAgreement,
  findCreditAgreements,
  upsertCreditAgreement,
} from '../data-access/credit-agreement-repository';
import type { PaymentsDeps } from './deps';

async function lenderOrThrow(deps: Pick<PaymentsDeps, 'dataSource'>, lenderId: number) {
  const lender = await findOrganisation(deps.dataSource.manager, lenderId);
  if (!lender || lender.kind !== 'lender') {
    throw AppError.notFound('lender_not_found', 'There is no such lender.');
  }
  return lender;
}

/** A lender's credit agreements (its fleet managers and coordinators, or the admin). */
export async function listCreditAgreements(
  deps: Pick<PaymentsDeps, 'dataSource'>,
  lenderId: number,
): Promise<CreditAgreement[]> {
  await lenderOrThrow(deps, lenderId);
  return findCreditAgreements(deps.dataSource.manager, lenderId);
}

/**
 * Turns a hospital's credit agreement with the lender on or off (the lender's fleet manager).
 * With an active agreement the hospital's buyers may confirm loans against a purchase order
 * instead of a card deposit. Loans already confirmed keep their terms. Audited.
 */
export async function setCreditAgreement(
  deps: Pick<PaymentsDeps, 'dataSource' | 'now'>,
  auth: AuthContext,
  lenderId: number,
  hospitalId: number,
  active: boolean,
): Promise<CreditAgreement> {
  await lenderOrThrow(deps, lenderId);
  return deps.dataSource.transaction(async (m) => {
    const hospital = await findOrganisation(m, hospitalId);
    if (!hospital || hospital.kind !== 'hospital') {
      throw AppError.notFound('hospital_not_found', 'There is no such hospital.');
    }
    const now = deps.now();
    const before = await findCreditAgreement(m, lenderId, hospitalId);
    await upsertCreditAgreement(m, { lenderId, hospitalId, active, userId: auth.user.id }, now);
    if ((before?.active ?? false) !== active) {
      await insertAuditEvent(m, {
        actorUserId: auth.user.id,
        organisationId: lenderId,
        action: active ? 'credit_agreement.activated' : 'credit_agreement.deactivated',
        subject: `organisation:${hospitalId}`,
        detail: { hospitalId, hospitalName: hospital.name },
        at: now,
      });
    }
    const after = await findCreditAgreement(m, lenderId, hospitalId);
    if (!after) throw new Error('credit agreement vanished');
    return after;
  });
}
