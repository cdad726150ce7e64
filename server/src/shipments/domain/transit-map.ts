import type { EntityManager } from 'typeorm';
import { lendersOf } from '../../catalog';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { riskOf } from './queries';
import type { ShipmentMapEntry, ShipmentState } from '@evalon/contracts';

/** The most legs the map draws; past that the list says how many more there are. */
export const MAP_LIMIT = 300;

/**
 * The lender's legs with the carrier now (handed over, in transit, or with an exception), both
 * directions, with where they come from and go to, for the coordinator's map. Lender people
 * only (fleet managers read it too); the platform admin sees every lender's.
 */
export async function shipmentsInTransit(
  m: EntityManager,
  auth: AuthContext,
  now: Date,
): Promise<{ shipments: ShipmentMapEntry[]; total: number }> {
  const lenders = lendersOf(auth);
  if (!auth.isPlatformAdmin && lenders.length === 0) {
    throw AppError.forbidden(
      'forbidden',
      'The map of shipments in transit is for the lender’s coordinators and fleet managers.',
    );
  }
  const scope = auth.isPlatformAdmin ? '' : 'AND s.lender_id IN (?)';
  const args: unknown[] = auth.isPlatformAdmin ? [] : [lenders];
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT s.id, s.reference, s.direction, s.state, s.at_risk, s.overdue_at, s.tracking_number,
            CAST(s.due_by AS CHAR) AS due_by, CAST(s.eta AS CHAR) AS eta, l.reference AS loan_reference,
            h.name AS hospital_name, d.name AS depot_name, d.latitude AS depot_lat,
            d.longitude AS depot_lng, c.name AS site_name, c.latitude AS site_lat,
            c.longitude AS site_lng
       FROM shipments s JOIN loans l ON l.id = s.loan_id
       JOIN sites d ON d.id = s.depot_id JOIN sites c ON c.id = s.site_id
       JOIN organisations h ON h.id = s.hospital_id
      WHERE s.state IN ('handed_over', 'in_transit', 'exception') ${scope}
      ORDER BY s.due_by, s.id`,
    args,
  );
  const depot = (r: Record<string, unknown>) => ({
    name: String(r.depot_name),
    lat: Number(r.depot_lat),
    lng: Number(r.depot_lng),
  });
  const campus = (r: Record<string, unknown>) => ({
    name: String(r.site_name),
    lat: Number(r.site_lat),
    lng: Number(r.site_lng),
  });
  return {
    total: rows.length,
    shipments: rows.slice(0, MAP_LIMIT).map((r) => {
      const outbound = r.direction === 'outbound';
      return {
        id: Number(r.id),
        reference: String(r.reference),
        loanReference: String(r.loan_reference),
        hospitalName: String(r.hospital_name),
        direction: outbound ? ('outbound' as const) : ('return' as const),
        state: r.state as ShipmentState,
        trackingNumber: (r.tracking_number as string) ?? null,
        dueBy: String(r.due_by),
        eta: (r.eta as string) ?? null,
        risk: riskOf(
          r.state as ShipmentState,
          Boolean(Number(r.at_risk)),
          r.overdue_at as Date,
          now,
        ),
        from: outbound ? depot(r) : campus(r),
        to: outbound ? campus(r) : depot(r),
      };
    }),
  };
}
