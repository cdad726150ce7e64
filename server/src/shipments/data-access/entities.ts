import { EntitySchema } from 'typeorm';
import { idColumn, instantColumn, refColumn } from '../../database/columns';
import type { ShipmentRow } from './shipment-repository';

const dateColumn = (name: string, nullable = false) => ({ type: 'date' as const, name, nullable });

/**
 * The shipments tables for TypeORM's metadata (the repository reads and writes them with SQL,
 * so these mirror the migration and are not used for schema sync).
 */
export const ShipmentEntity = new EntitySchema<ShipmentRow>({
  name: 'Shipment',
  tableName: 'shipments',
  columns: {
    id: idColumn,
    reference: { type: 'varchar', length: 32 },
    loanId: refColumn('loan_id'),
    lenderId: refColumn('lender_id'),
    hospitalId: refColumn('hospital_id'),
    direction: { type: 'varchar', length: 8 },
    depotId: refColumn('depot_id'),
    siteId: refColumn('site_id'),
    outboundId: refColumn('outbound_id', true),
    state: { type: 'varchar', length: 16 },
    carrier: { type: 'varchar', length: 32, nullable: true },
    service: { type: 'varchar', length: 16, nullable: true },
    trackingNumber: { type: 'varchar', length: 40, nullable: true, name: 'tracking_number' },
    carrierStatus: { type: 'varchar', length: 20, nullable: true, name: 'carrier_status' },
    carrierRank: { type: 'tinyint', unsigned: true, name: 'carrier_rank' },
    sscc: { type: 'char', length: 18, nullable: true },
    shipBy: dateColumn('ship_by'),
    dueBy: dateColumn('due_by'),
    dueZone: { type: 'varchar', length: 64, name: 'due_zone' },
    overdueAt: instantColumn('overdue_at'),
    originCountry: { type: 'char', length: 2, name: 'origin_country' },
    destinationCountry: { type: 'char', length: 2, name: 'destination_country' },
    transitDays: { type: 'tinyint', unsigned: true, name: 'transit_days' },
    eta: dateColumn('eta', true),
    atRisk: { type: 'boolean', name: 'at_risk' },
    receipt: { type: 'json', nullable: true },
    decontamination: { type: 'json', nullable: true },
    handedOverAt: instantColumn('handed_over_at', true),
    arrivedAt: instantColumn('arrived_at', true),
    createdAt: instantColumn('created_at'),
    updatedAt: instantColumn('updated_at'),
  },
});

/** A row of `shipment_items` (checklist line). */
export const ShipmentItemEntity = new EntitySchema<{
  id: number;
  shipmentId: number;
  position: number;
  unitId: number | null;
  name: string;
  gtin: string | null;
  quantity: number;
  scanned: number;
  needsLot: boolean;
  needsSerial: boolean;
  needsExpiry: boolean;
  required: boolean;
  manualReason: string | null;
}>({
  name: 'ShipmentItem',
  tableName: 'shipment_items',
  columns: {
    id: idColumn,
    shipmentId: refColumn('shipment_id'),
    position: { type: 'smallint', unsigned: true },
    unitId: refColumn('unit_id', true),
    name: { type: 'varchar', length: 160 },
    gtin: { type: 'char', length: 14, nullable: true },
    quantity: { type: 'smallint', unsigned: true },
    scanned: { type: 'smallint', unsigned: true },
    needsLot: { type: 'boolean', name: 'needs_lot' },
    needsSerial: { type: 'boolean', name: 'needs_serial' },
    needsExpiry: { type: 'boolean', name: 'needs_expiry' },
    required: { type: 'boolean' },
    manualReason: { type: 'varchar', length: 500, nullable: true, name: 'manual_reason' },
  },
});

/** A row of `shipment_events` (timeline). */
export const ShipmentEventEntity = new EntitySchema<{
  id: number;
  shipmentId: number;
  kind: string;
  fromState: string | null;
  toState: string | null;
  carrierEventId: string | null;
  carrierStatus: string | null;
  message: string;
  ignored: boolean;
  occurredAt: Date;
  actorUserId: number | null;
  createdAt: Date;
}>({
  name: 'ShipmentEvent',
  tableName: 'shipment_events',
  columns: {
    id: idColumn,
    shipmentId: refColumn('shipment_id'),
    kind: { type: 'varchar', length: 8 },
    fromState: { type: 'varchar', length: 16, nullable: true, name: 'from_state' },
    toState: { type: 'varchar', length: 16, nullable: true, name: 'to_state' },
    carrierEventId: { type: 'varchar', length: 64, nullable: true, name: 'carrier_event_id' },
    carrierStatus: { type: 'varchar', length: 20, nullable: true, name: 'carrier_status' },
    message: { type: 'varchar', length: 500 },
    ignored: { type: 'boolean' },
    occurredAt: instantColumn('occurred_at'),
    actorUserId: refColumn('actor_user_id', true),
    createdAt: instantColumn('created_at'),
  },
});

/** Every entity of the component, for the data source's list. */
export const shipmentEntities = [ShipmentEntity, ShipmentItemEntity, ShipmentEventEntity];

/** Tables the component owns, children first (for test truncation). */
export const shipmentTables = [
  'loan_settlements',
  'inspection_findings',
  'shipment_alerts',
  'shipment_events',
  'shipment_scans',
  'shipment_items',
  'shipments',
  'shipment_settings',
] as const;
