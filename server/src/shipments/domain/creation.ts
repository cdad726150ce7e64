import { estimateTransit, shipmentEta, type DistanceBand } from '@evalon/scheduling';
import { DateTime } from 'luxon';
import type { EntityManager } from 'typeorm';
import {
  copyItems,
  insertItems,
  insertShipment,
  type NewItem,
  type ShipmentRow,
} from '../data-access/shipment-repository';
import { recordState } from './history';

type Sql = Record<string, unknown>;

/** The first instant after `date` ends in `zone`: a leg not done by then is overdue. */
export function endOfDay(date: string, zone: string): Date {
  return DateTime.fromISO(date, { zone }).plus({ days: 1 }).startOf('day').toJSDate();
}

/**
 * The deadline of a return leg once it is on its way: back at the depot by the loan's
 * `backAtDepot` day, in the depot's calendar. Before the hand-over the leg's deadline is the
 * hospital's (`returnShipBy`, campus calendar); the hand-over moves it to this one.
 */
export function returnArrivalDeadline(
  backAtDepot: string,
  depotZone: string,
): { dueBy: string; dueZone: string; overdueAt: Date } {
  return { dueBy: backAtDepot, dueZone: depotZone, overdueAt: endOfDay(backAtDepot, depotZone) };
}

/** Whether `gtin` is a 14-digit GTIN we can match scans against. */
const gtin14 = (value: unknown): string | null =>
  typeof value === 'string' && /^\d{14}$/.test(value) ? value : null;

/**
 * The checklist of the units leaving one depot: per unit (by id), a line for the unit itself
 * (its UDI device identifier and its serial number) unless the packing list names the device,
 * then its model's packing list. Lines with
 * a GTIN that are not serialised record lot and expiry (single-use and sterile-packed items
 * carry both; common practice for loaner kits); serialised lines record the serial.
 */
export function checklistFor(
  units: readonly { unitId: number; modelName: string; udiDi: string | null; modelId: number }[],
  packing: ReadonlyMap<
    number,
    readonly { name: string; gtin: string | null; quantity: number; serialised: boolean }[]
  >,
): NewItem[] {
  const items: NewItem[] = [];
  for (const u of [...units].sort((a, b) => a.unitId - b.unitId)) {
    const list = packing.get(u.modelId) ?? [];
    // When the packing list names the device itself (its GTIN is the unit's UDI device
    // identifier), that line stands for the unit; otherwise the unit gets a line of its own.
    const listed = u.udiDi !== null && list.some((p) => gtin14(p.gtin) === gtin14(u.udiDi));
    if (!listed)
      items.push({
        position: items.length + 1,
        unitId: u.unitId,
        name: `${u.modelName} (unit)`,
        gtin: gtin14(u.udiDi),
        quantity: 1,
        needsLot: false,
        needsSerial: true,
        needsExpiry: false,
        required: true,
      });
    for (const p of list) {
      const gtin = gtin14(p.gtin);
      items.push({
        position: items.length + 1,
        unitId: u.unitId,
        name: p.name,
        gtin,
        quantity: p.quantity,
        needsLot: gtin !== null && !p.serialised,
        needsSerial: p.serialised,
        needsExpiry: gtin !== null && !p.serialised,
        required: true,
      });
    }
  }
  return items;
}

/**
 * Creates the outbound legs of a confirmed loan, one per depot its units leave from, with their
 * checklists, expected delivery (ship-by day plus the lender's transit rule, from the scheduling
 * package) and risk. Runs in the caller's transaction (the one that confirmed the loan, or the
 * sweep that catches up); a leg that exists already is left as it is (unique per loan, direction
 * and depot), so calling it twice creates nothing more. Returns the new legs' ids.
 */
export async function ensureOutboundShipments(
  m: EntityManager,
  loanId: number,
  now: Date,
): Promise<number[]> {
  const [loan]: Sql[] = await m.query(
    `SELECT l.id, l.reference, l.state, l.lender_id, l.hospital_id, l.site_id, l.site_time_zone,
            CAST(l.deliver_by AS CHAR) AS deliver_by, c.country, c.latitude, c.longitude,
            ls.distance_bands, ls.customs_days
       FROM loans l JOIN sites c ON c.id = l.site_id
       LEFT JOIN lender_settings ls ON ls.organisation_id = l.lender_id
      WHERE l.id = ?`,
    [loanId],
  );
  if (!loan) return [];
  const units: Sql[] = await m.query(
    `SELECT lu.unit_id, lu.model_id, lu.depot_id, CAST(lu.ship_by AS CHAR) AS ship_by,
            u.udi_di, mo.name AS model_name, d.country, d.latitude, d.longitude
       FROM loan_units lu JOIN units u ON u.id = lu.unit_id
       JOIN models mo ON mo.id = lu.model_id JOIN sites d ON d.id = lu.depot_id
      WHERE lu.loan_id = ? ORDER BY lu.depot_id, lu.unit_id`,
    [loanId],
  );
  const modelIds = [...new Set(units.map((u) => Number(u.model_id)))];
  const packingRows: Sql[] = modelIds.length
    ? await m.query(
        `SELECT model_id, name, gtin, quantity, serialised FROM model_packing_items
          WHERE model_id IN (?) ORDER BY model_id, position`,
        [modelIds],
      )
    : [];
  const packing = new Map<
    number,
    { name: string; gtin: string | null; quantity: number; serialised: boolean }[]
  >();
  for (const p of packingRows) {
    const list = packing.get(Number(p.model_id)) ?? [];
    list.push({
      name: String(p.name),
      gtin: (p.gtin as string) ?? null,
      quantity: Number(p.quantity),
      serialised: Boolean(Number(p.serialised)),
    });
    packing.set(Number(p.model_id), list);
  }
  const bands =
    typeof loan.distance_bands === 'string'
      ? (JSON.parse(loan.distance_bands) as DistanceBand[])
      : ((loan.distance_bands as DistanceBand[] | null) ?? undefined);
  const depots = [...new Set(units.map((u) => Number(u.depot_id)))];
  const created: number[] = [];
  for (const [index, depotId] of depots.entries()) {
    const legUnits = units.filter((u) => Number(u.depot_id) === depotId);
    const first = legUnits[0];
    const transit = estimateTransit({
      from: { lat: Number(first.latitude), lng: Number(first.longitude) },
      to: { lat: Number(loan.latitude), lng: Number(loan.longitude) },
      originCountry: String(first.country),
      destinationCountry: String(loan.country),
      ...(bands ? { bands } : {}),
      ...(loan.customs_days !== null && loan.customs_days !== undefined
        ? { customsDays: Number(loan.customs_days) }
        : {}),
    }).totalDays;
    const shipBy = legUnits.map((u) => String(u.ship_by)).sort()[0];
    const eta = shipmentEta(shipBy, transit, String(first.country), String(loan.country));
    const dueBy = String(loan.deliver_by);
    const { id, created: isNew } = await insertShipment(
      m,
      {
        reference: `${String(loan.reference)}-O${index + 1}`,
        loanId,
        lenderId: Number(loan.lender_id),
        hospitalId: Number(loan.hospital_id),
        direction: 'outbound',
        depotId,
        siteId: Number(loan.site_id),
        outboundId: null,
        state: 'to_pack',
        shipBy,
        dueBy,
        dueZone: String(loan.site_time_zone),
        overdueAt: endOfDay(dueBy, String(loan.site_time_zone)),
        originCountry: String(first.country),
        destinationCountry: String(loan.country),
        transitDays: transit,
        eta,
        atRisk: eta > dueBy,
      },
      now,
    );
    if (!isNew) continue;
    await insertItems(
      m,
      id,
      checklistFor(
        legUnits.map((u) => ({
          unitId: Number(u.unit_id),
          modelId: Number(u.model_id),
          modelName: String(u.model_name),
          udiDi: (u.udi_di as string) ?? null,
        })),
        packing,
      ),
    );
    await recordState(m, id, null, 'to_pack', 'Created when the loan was confirmed.', null, now);
    created.push(id);
  }
  return created;
}

/**
 * Creates the return leg of a delivered outbound one (same depot and campus, the checklist
 * copied so the depot scans the same items back in). Due: handed to the carrier by the loan's
 * `returnShipBy` (campus calendar). Idempotent like {@link ensureOutboundShipments}.
 */
export async function ensureReturnShipment(
  m: EntityManager,
  outbound: ShipmentRow,
  now: Date,
): Promise<number | null> {
  const [loan]: Sql[] = await m.query(
    `SELECT reference, site_time_zone, CAST(return_ship_by AS CHAR) AS return_ship_by
       FROM loans WHERE id = ?`,
    [outbound.loanId],
  );
  const dueBy = String(loan.return_ship_by);
  const { id, created } = await insertShipment(
    m,
    {
      reference: outbound.reference.replace(/-O(\d+)$/, '-R$1'),
      loanId: outbound.loanId,
      lenderId: outbound.lenderId,
      hospitalId: outbound.hospitalId,
      direction: 'return',
      depotId: outbound.depotId,
      siteId: outbound.siteId,
      outboundId: outbound.id,
      state: 'awaiting_return',
      shipBy: dueBy,
      dueBy,
      dueZone: String(loan.site_time_zone),
      overdueAt: endOfDay(dueBy, String(loan.site_time_zone)),
      originCountry: outbound.destinationCountry,
      destinationCountry: outbound.originCountry,
      transitDays: outbound.transitDays,
      eta: null,
      atRisk: false,
    },
    now,
  );
  if (!created) return null;
  await copyItems(m, outbound.id, id);
  await recordState(
    m,
    id,
    null,
    'awaiting_return',
    'Created when the outbound shipment was delivered.',
    null,
    now,
  );
  return id;
}
