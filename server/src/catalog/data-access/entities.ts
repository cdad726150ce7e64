import { EntitySchema } from 'typeorm';
import type { ModelCategory, UnitStatus } from '@evalon/contracts';
import { bigintAsNumber, idColumn, instantColumn, refColumn } from '../../database/columns';

/** A row of `lender_settings`: one lender's shipping settings. */
export interface LenderSettingsRow {
  organisationId: number;
  distanceBands: { maxKm: number | null; days: number }[];
  customsDays: number;
  leadDays: number;
  firstLoanLeadDays: number;
  decontaminationDays: number;
  turnaroundDays: number;
  /** Supervised cases a proctor needs on a model of this lender (the column default is 20). */
  minSupervisedCases: number;
  updatedAt: Date;
  updatedByUserId: number | null;
}

export const LenderSettingsEntity = new EntitySchema<LenderSettingsRow>({
  name: 'LenderSettings',
  tableName: 'lender_settings',
  columns: {
    organisationId: { type: 'int', unsigned: true, primary: true, name: 'organisation_id' },
    distanceBands: { type: 'json', name: 'distance_bands' },
    customsDays: { type: 'tinyint', unsigned: true, name: 'customs_days' },
    leadDays: { type: 'tinyint', unsigned: true, name: 'lead_days' },
    firstLoanLeadDays: { type: 'tinyint', unsigned: true, name: 'first_loan_lead_days' },
    decontaminationDays: { type: 'tinyint', unsigned: true, name: 'decontamination_days' },
    turnaroundDays: { type: 'tinyint', unsigned: true, name: 'turnaround_days' },
    minSupervisedCases: {
      type: 'smallint',
      unsigned: true,
      name: 'min_supervised_cases',
      default: 20,
    },
    updatedAt: instantColumn('updated_at'),
    updatedByUserId: refColumn('updated_by_user_id', true),
  },
  foreignKeys: [
    {
      name: 'fk_lender_settings_organisation',
      target: 'Organisation',
      columnNames: ['organisationId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_lender_settings_user',
      target: 'User',
      columnNames: ['updatedByUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `models`. */
export interface ModelRow {
  id: number;
  lenderId: number;
  name: string;
  category: ModelCategory;
  description: string;
  listValue: number;
  currency: string;
  depositPercentBps: number;
  depositMin: number;
  depositMax: number;
  createdAt: Date;
  updatedAt: Date;
}

export const ModelEntity = new EntitySchema<ModelRow>({
  name: 'Model',
  tableName: 'models',
  columns: {
    id: idColumn,
    lenderId: refColumn('lender_id'),
    name: { type: 'varchar', length: 160 },
    category: { type: 'varchar', length: 32 },
    description: { type: 'text' },
    listValue: { type: 'bigint', unsigned: true, name: 'list_value', transformer: bigintAsNumber },
    currency: { type: 'char', length: 3 },
    depositPercentBps: { type: 'smallint', unsigned: true, name: 'deposit_percent_bps' },
    depositMin: {
      type: 'bigint',
      unsigned: true,
      name: 'deposit_min',
      transformer: bigintAsNumber,
    },
    depositMax: {
      type: 'bigint',
      unsigned: true,
      name: 'deposit_max',
      transformer: bigintAsNumber,
    },
    createdAt: instantColumn('created_at'),
    updatedAt: instantColumn('updated_at'),
  },
  indices: [
    { name: 'ix_models_category', columns: ['category'] },
    { name: 'uq_models_lender_name', columns: ['lenderId', 'name'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_models_lender',
      target: 'Organisation',
      columnNames: ['lenderId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `model_packing_items`. */
export interface PackingItemRow {
  id: number;
  modelId: number;
  position: number;
  name: string;
  gtin: string | null;
  quantity: number;
  serialised: boolean;
}

export const PackingItemEntity = new EntitySchema<PackingItemRow>({
  name: 'PackingItem',
  tableName: 'model_packing_items',
  columns: {
    id: idColumn,
    modelId: refColumn('model_id'),
    position: { type: 'smallint', unsigned: true },
    name: { type: 'varchar', length: 160 },
    gtin: { type: 'char', length: 14, nullable: true },
    quantity: { type: 'smallint', unsigned: true },
    serialised: { type: 'boolean', width: 1, default: false },
  },
  indices: [{ name: 'ix_model_packing_items_model', columns: ['modelId', 'position'] }],
  foreignKeys: [
    {
      name: 'fk_model_packing_items_model',
      target: 'Model',
      columnNames: ['modelId'],
      referencedColumnNames: ['id'],
      onDelete: 'CASCADE',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `model_compatibility` (stored in both directions). */
export interface CompatibilityRow {
  modelId: number;
  compatibleModelId: number;
}

export const CompatibilityEntity = new EntitySchema<CompatibilityRow>({
  name: 'ModelCompatibility',
  tableName: 'model_compatibility',
  columns: {
    modelId: { type: 'int', unsigned: true, primary: true, name: 'model_id' },
    compatibleModelId: { type: 'int', unsigned: true, primary: true, name: 'compatible_model_id' },
  },
  indices: [{ name: 'ix_model_compatibility_other', columns: ['compatibleModelId'] }],
  foreignKeys: [
    {
      name: 'fk_model_compatibility_model',
      target: 'Model',
      columnNames: ['modelId'],
      referencedColumnNames: ['id'],
      onDelete: 'CASCADE',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_model_compatibility_other',
      target: 'Model',
      columnNames: ['compatibleModelId'],
      referencedColumnNames: ['id'],
      onDelete: 'CASCADE',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `model_photos`. */
export interface PhotoRow {
  id: number;
  modelId: number;
  /** Random name in the photo store; never derived from the uploaded file name. */
  storageKey: string;
  contentType: 'image/jpeg' | 'image/png' | 'image/webp';
  sizeBytes: number;
  createdAt: Date;
  createdByUserId: number | null;
}

export const PhotoEntity = new EntitySchema<PhotoRow>({
  name: 'ModelPhoto',
  tableName: 'model_photos',
  columns: {
    id: idColumn,
    modelId: refColumn('model_id'),
    storageKey: { type: 'varchar', length: 120, name: 'storage_key' },
    contentType: { type: 'varchar', length: 32, name: 'content_type' },
    sizeBytes: { type: 'int', unsigned: true, name: 'size_bytes' },
    createdAt: instantColumn('created_at'),
    createdByUserId: refColumn('created_by_user_id', true),
  },
  indices: [
    { name: 'ix_model_photos_model', columns: ['modelId'] },
    { name: 'uq_model_photos_storage_key', columns: ['storageKey'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_model_photos_model',
      target: 'Model',
      columnNames: ['modelId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_model_photos_user',
      target: 'User',
      columnNames: ['createdByUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `units`. */
export interface UnitRow {
  id: number;
  modelId: number;
  serialNumber: string;
  udiDi: string | null;
  homeDepotId: number;
  status: UnitStatus;
  /** Bumped under the row lock by every change to the unit's holds. */
  bookingVersion: number;
  createdAt: Date;
  updatedAt: Date;
}

export const UnitEntity = new EntitySchema<UnitRow>({
  name: 'Unit',
  tableName: 'units',
  columns: {
    id: idColumn,
    modelId: refColumn('model_id'),
    serialNumber: { type: 'varchar', length: 60, name: 'serial_number' },
    udiDi: { type: 'char', length: 14, name: 'udi_di', nullable: true },
    homeDepotId: refColumn('home_depot_id'),
    status: { type: 'varchar', length: 16 },
    bookingVersion: { type: 'int', unsigned: true, name: 'booking_version', default: 0 },
    createdAt: instantColumn('created_at'),
    updatedAt: instantColumn('updated_at'),
  },
  indices: [
    { name: 'ix_units_home_depot', columns: ['homeDepotId'] },
    { name: 'ix_units_status_model', columns: ['status', 'modelId'] },
    { name: 'uq_units_model_serial', columns: ['modelId', 'serialNumber'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_units_home_depot',
      target: 'Site',
      columnNames: ['homeDepotId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_units_model',
      target: 'Model',
      columnNames: ['modelId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});
