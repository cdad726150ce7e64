import { EntitySchema } from 'typeorm';
import { bigintAsNumber, idColumn, instantColumn, refColumn } from '../../database/columns';
import type { ShipmentRow } from './shipment-repository';

const dateColumn = (name: string, nullable = false) => ({ type: 'date' as const, name, nullable });

/**
 * The shipments tables for TypeORM's metadata (the repository reads and writes them with SQL,
 * so these mirror the migration and are not used for schema sync). The keys, foreign keys and
 * defaults are declared too, so the schema check compares every table the migration made.
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
    carrierRank: { type: 'tinyint', unsigned: true, name: 'carrier_rank', default: 0 },
    sscc: { type: 'char', length: 18, nullable: true },
    shipBy: dateColumn('ship_by'),
    dueBy: dateColumn('due_by'),
    dueZone: { type: 'varchar', length: 64, name: 'due_zone' },
    overdueAt: instantColumn('overdue_at'),
    originCountry: { type: 'char', length: 2, name: 'origin_country' },
    destinationCountry: { type: 'char', length: 2, name: 'destination_country' },
    transitDays: { type: 'tinyint', unsigned: true, name: 'transit_days' },
    eta: dateColumn('eta', true),
    atRisk: { type: 'boolean', width: 1, name: 'at_risk', default: false },
    receipt: { type: 'json', nullable: true },
    decontamination: { type: 'json', nullable: true },
    handedOverAt: instantColumn('handed_over_at', true),
    arrivedAt: instantColumn('arrived_at', true),
    createdAt: instantColumn('created_at'),
    updatedAt: instantColumn('updated_at'),
  },
  indices: [
    { name: 'ix_shipments_board', columns: ['lenderId', 'state', 'dueBy'] },
    {
      name: 'ix_shipments_board_direction',
      columns: ['lenderId', 'direction', 'state', 'dueBy'],
    },
    { name: 'ix_shipments_hospital', columns: ['hospitalId', 'state'] },
    { name: 'ix_shipments_open', columns: ['state', 'overdueAt'] },
    { name: 'uq_shipments_leg', columns: ['loanId', 'direction', 'depotId'], unique: true },
    { name: 'uq_shipments_sscc', columns: ['sscc'], unique: true },
    { name: 'uq_shipments_tracking', columns: ['trackingNumber'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_shipments_depot',
      target: 'Site',
      columnNames: ['depotId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_shipments_loan',
      target: 'Loan',
      columnNames: ['loanId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_shipments_outbound',
      target: 'Shipment',
      columnNames: ['outboundId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_shipments_site',
      target: 'Site',
      columnNames: ['siteId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
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
    scanned: { type: 'smallint', unsigned: true, default: 0 },
    needsLot: { type: 'boolean', width: 1, name: 'needs_lot' },
    needsSerial: { type: 'boolean', width: 1, name: 'needs_serial' },
    needsExpiry: { type: 'boolean', width: 1, name: 'needs_expiry' },
    required: { type: 'boolean', width: 1 },
    manualReason: { type: 'varchar', length: 500, nullable: true, name: 'manual_reason' },
  },
  indices: [{ name: 'ix_shipment_items_gtin', columns: ['shipmentId', 'gtin'] }],
  foreignKeys: [
    {
      name: 'fk_shipment_items_shipment',
      target: 'Shipment',
      columnNames: ['shipmentId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
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
    ignored: { type: 'boolean', width: 1, default: false },
    occurredAt: instantColumn('occurred_at'),
    actorUserId: refColumn('actor_user_id', true),
    createdAt: instantColumn('created_at'),
  },
  indices: [
    { name: 'ix_shipment_events_shipment', columns: ['shipmentId', 'occurredAt'] },
    { name: 'uq_shipment_events_carrier', columns: ['carrierEventId'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_shipment_events_shipment',
      target: 'Shipment',
      columnNames: ['shipmentId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `shipment_scans`: one scan, refused ones too. */
export const ShipmentScanEntity = new EntitySchema<{
  id: number;
  shipmentId: number;
  itemId: number | null;
  phase: string;
  outcome: string;
  raw: string | null;
  code: string | null;
  message: string | null;
  gtin: string | null;
  lot: string | null;
  serial: string | null;
  expiry: string | null;
  serialKey: string | null;
  actorUserId: number | null;
  createdAt: Date;
}>({
  name: 'ShipmentScan',
  tableName: 'shipment_scans',
  columns: {
    id: idColumn,
    shipmentId: refColumn('shipment_id'),
    itemId: refColumn('item_id', true),
    phase: { type: 'varchar', length: 8 },
    outcome: { type: 'varchar', length: 8 },
    raw: { type: 'varchar', length: 300, nullable: true },
    code: { type: 'varchar', length: 32, nullable: true },
    message: { type: 'varchar', length: 500, nullable: true },
    gtin: { type: 'char', length: 14, nullable: true },
    lot: { type: 'varchar', length: 20, nullable: true },
    serial: { type: 'varchar', length: 20, nullable: true },
    expiry: dateColumn('expiry', true),
    serialKey: { type: 'varchar', length: 40, nullable: true, name: 'serial_key' },
    actorUserId: refColumn('actor_user_id', true),
    createdAt: instantColumn('created_at'),
  },
  indices: [
    { name: 'ix_shipment_scans_shipment', columns: ['shipmentId', 'id'] },
    {
      name: 'uq_shipment_scans_serial',
      columns: ['shipmentId', 'phase', 'serialKey'],
      unique: true,
    },
  ],
  foreignKeys: [
    {
      name: 'fk_shipment_scans_shipment',
      target: 'Shipment',
      columnNames: ['shipmentId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `shipment_alerts`: an alert sent, once per shipment and condition. */
export const ShipmentAlertEntity = new EntitySchema<{
  shipmentId: number;
  kind: string;
  createdAt: Date;
}>({
  name: 'ShipmentAlert',
  tableName: 'shipment_alerts',
  columns: {
    shipmentId: { type: 'int', unsigned: true, primary: true, name: 'shipment_id' },
    kind: { type: 'varchar', length: 24, primary: true },
    createdAt: instantColumn('created_at'),
  },
  foreignKeys: [
    {
      name: 'fk_shipment_alerts_shipment',
      target: 'Shipment',
      columnNames: ['shipmentId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `inspection_findings`: what the lender found on a returned loan. */
export const InspectionFindingEntity = new EntitySchema<{
  id: number;
  loanId: number;
  unitId: number | null;
  itemId: number | null;
  category: string;
  note: string;
  charge: number;
  currency: string;
  needsRepair: boolean;
  actorUserId: number | null;
  createdAt: Date;
}>({
  name: 'InspectionFinding',
  tableName: 'inspection_findings',
  columns: {
    id: idColumn,
    loanId: refColumn('loan_id'),
    unitId: refColumn('unit_id', true),
    itemId: refColumn('item_id', true),
    category: { type: 'varchar', length: 16 },
    note: { type: 'text' },
    charge: { type: 'bigint', unsigned: true, transformer: bigintAsNumber },
    currency: { type: 'char', length: 3 },
    needsRepair: { type: 'boolean', width: 1, name: 'needs_repair' },
    actorUserId: refColumn('actor_user_id', true),
    createdAt: instantColumn('created_at'),
  },
  indices: [{ name: 'ix_inspection_findings_loan', columns: ['loanId'] }],
  foreignKeys: [
    {
      name: 'fk_inspection_findings_loan',
      target: 'Loan',
      columnNames: ['loanId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `loan_settlements`: the claim that makes two submissions at once settle once. */
export const LoanSettlementEntity = new EntitySchema<{
  loanId: number;
  status: string;
  result: unknown;
  claimedAt: Date;
  finishedAt: Date | null;
}>({
  name: 'LoanSettlement',
  tableName: 'loan_settlements',
  columns: {
    loanId: { type: 'int', unsigned: true, primary: true, name: 'loan_id' },
    status: { type: 'varchar', length: 8 },
    result: { type: 'json', nullable: true },
    claimedAt: instantColumn('claimed_at'),
    finishedAt: instantColumn('finished_at', true),
  },
  foreignKeys: [
    {
      name: 'fk_loan_settlements_loan',
      target: 'Loan',
      columnNames: ['loanId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `shipment_settings`: a lender's GS1 prefix and the next SSCC serial. */
export const ShipmentSettingsEntity = new EntitySchema<{
  lenderId: number;
  gs1CompanyPrefix: string;
  ssccExtensionDigit: number;
  nextSerial: number;
  updatedAt: Date;
}>({
  name: 'ShipmentSettings',
  tableName: 'shipment_settings',
  columns: {
    lenderId: { type: 'int', unsigned: true, primary: true, name: 'lender_id' },
    gs1CompanyPrefix: { type: 'varchar', length: 12, name: 'gs1_company_prefix' },
    ssccExtensionDigit: {
      type: 'tinyint',
      unsigned: true,
      name: 'sscc_extension_digit',
      default: 0,
    },
    nextSerial: {
      type: 'bigint',
      unsigned: true,
      name: 'next_serial',
      default: 1,
      transformer: bigintAsNumber,
    },
    updatedAt: instantColumn('updated_at'),
  },
  foreignKeys: [
    {
      name: 'fk_shipment_settings_lender',
      target: 'Organisation',
      columnNames: ['lenderId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `shipment_photos`: a receipt or inspection-finding photo in the uploads store. */
export const ShipmentPhotoEntity = new EntitySchema<{
  id: number;
  shipmentId: number;
  kind: string;
  findingId: number | null;
  storageKey: string;
  contentType: string;
  sizeBytes: number;
  createdByUserId: number | null;
  createdAt: Date;
}>({
  name: 'ShipmentPhoto',
  tableName: 'shipment_photos',
  columns: {
    id: idColumn,
    shipmentId: refColumn('shipment_id'),
    kind: { type: 'varchar', length: 8 },
    findingId: refColumn('finding_id', true),
    storageKey: { type: 'varchar', length: 64, name: 'storage_key' },
    contentType: { type: 'varchar', length: 16, name: 'content_type' },
    sizeBytes: { type: 'int', unsigned: true, name: 'size_bytes' },
    createdByUserId: refColumn('created_by_user_id', true),
    createdAt: instantColumn('created_at'),
  },
  indices: [
    { name: 'ix_shipment_photos_shipment', columns: ['shipmentId', 'kind'] },
    { name: 'ix_shipment_photos_finding', columns: ['findingId'] },
    { name: 'uq_shipment_photos_key', columns: ['storageKey'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_shipment_photos_shipment',
      target: 'Shipment',
      columnNames: ['shipmentId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_shipment_photos_finding',
      target: 'InspectionFinding',
      columnNames: ['findingId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** Every entity of the component, for the data source's list. */
export const shipmentEntities = [
  ShipmentEntity,
  ShipmentItemEntity,
  ShipmentEventEntity,
  ShipmentScanEntity,
  ShipmentAlertEntity,
  InspectionFindingEntity,
  ShipmentPhotoEntity,
  LoanSettlementEntity,
  ShipmentSettingsEntity,
];

/** Tables the component owns, children first (for test truncation). */
export const shipmentTables = [
  'loan_settlements',
  'shipment_photos',
  'inspection_findings',
  'shipment_alerts',
  'shipment_events',
  'shipment_scans',
  'shipment_items',
  'shipments',
  'shipment_settings',
] as const;
