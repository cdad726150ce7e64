import { isBuyerOf, worksForHospital, worksForLender } from '../../catalog';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';

/** Which side the person acts for on a shipment, if any. */
export interface ShipmentRoles {
  /** Whether the person is a coordinator or fleet manager of the lender. */
  lender: boolean;
  /** Whether the person is a buyer of the hospital. */
  buyer: boolean;
  /** Whether the person may see the shipment at all. */
  sees: boolean;
}

export function rolesOn(
  auth: AuthContext,
  s: { lenderId: number; hospitalId: number },
): ShipmentRoles {
  const lender = worksForLender(auth, s.lenderId);
  const buyer = isBuyerOf(auth, s.hospitalId);
  return {
    lender,
    buyer,
    sees: auth.isPlatformAdmin || lender || worksForHospital(auth, s.hospitalId),
  };
}

/** 404 when the person may not see it, 403 when the step is the other side's. */
export function requireSide(
  auth: AuthContext,
  s: { lenderId: number; hospitalId: number },
  side: 'lender' | 'buyer',
): void {
  const r = rolesOn(auth, s);
  if (!r.sees) throw AppError.notFound('shipment_not_found', 'There is no such shipment.');
  if (!r[side]) {
    throw AppError.forbidden(
      'forbidden',
      side === 'lender'
        ? 'Only the lender’s coordinators and fleet managers can do this.'
        : 'Only buyers of the hospital can do this.',
    );
  }
}
