import { isBuyerOf, worksForHospital, worksForLender } from '../../catalog';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';

/** Which side the person acts for on a shipment, if any. */
export interface ShipmentRoles {
  /**
   * Whether the person works the lender's side: a coordinator of the lender. Packing, handing
   * over, receiving, inspecting and settling are the loaner-program coordinator's work; the fleet
   * manager owns the fleet and the catalogue and follows shipments read-only.
   */
  lender: boolean;
  /** Whether the person is a buyer of the hospital. */
  buyer: boolean;
  /** Whether the person may see the shipment at all (fleet managers included, read-only). */
  sees: boolean;
}

/** Whether the person is a coordinator of the lender. */
export function coordinatesFor(auth: AuthContext, lenderId: number): boolean {
  return auth.user.memberships.some(
    (m) => m.organisationId === lenderId && m.role === 'coordinator',
  );
}

export function rolesOn(
  auth: AuthContext,
  s: { lenderId: number; hospitalId: number },
): ShipmentRoles {
  return {
    lender: coordinatesFor(auth, s.lenderId),
    buyer: isBuyerOf(auth, s.hospitalId),
    sees:
      auth.isPlatformAdmin ||
      worksForLender(auth, s.lenderId) ||
      worksForHospital(auth, s.hospitalId),
  };
}

/** The refusal for a lender step taken by someone who only follows the shipment. */
export const lenderOnly = (): AppError =>
  AppError.forbidden(
    'forbidden',
    'Only the lender’s coordinators can do this; fleet managers follow shipments read-only.',
  );

/** 404 when the person may not see it, 403 when the step is the other side's. */
export function requireSide(
  auth: AuthContext,
  s: { lenderId: number; hospitalId: number },
  side: 'lender' | 'buyer',
): void {
  const r = rolesOn(auth, s);
  if (!r.sees) throw AppError.notFound('shipment_not_found', 'There is no such shipment.');
  if (!r[side]) {
    throw side === 'lender'
      ? lenderOnly()
      : AppError.forbidden('forbidden', 'Only buyers of the hospital can do this.');
  }
}
