import { EntitySchema } from 'typeorm';
import type { AvailabilitySettings, CredentialKind } from '@evalon/contracts';
import { decimalAsNumber, idColumn, instantColumn, refColumn } from '../../database/columns';
import { bigintAsNumber } from '../../database/columns';

/** A row of `proctor_profiles` (one per proctor, keyed by the user). */
export interface ProctorProfileRow {
  userId: number;
  organisationId: number;
  displayName: string;
  homeLatitude: number;
  homeLongitude: number;
  homeTimeZone: string;
  homeCountry: string;
  travelRadiusKm: number;
  languages: string[];
  dayRate: number;
  travelDayRate: number;
  currency: string;
  specialties: string[];
  bio: string | null;
  availability: AvailabilitySettings;
  lastOfferedAt: Date | null;
  createdAt: Date;
  updatedAt: Date;
}

export const ProctorProfileEntity = new EntitySchema<ProctorProfileRow>({
  name: 'ProctorProfile',
  tableName: 'proctor_profiles',
  columns: {
    userId: { type: 'int', unsigned: true, primary: true, name: 'user_id' },
    organisationId: refColumn('organisation_id'),
    displayName: { type: 'varchar', length: 120, name: 'display_name' },
    homeLatitude: {
      type: 'decimal',
      precision: 9,
      scale: 6,
      name: 'home_latitude',
      transformer: decimalAsNumber,
    },
    homeLongitude: {
      type: 'decimal',
      precision: 9,
      scale: 6,
      name: 'home_longitude',
      transformer: decimalAsNumber,
    },
    homeTimeZone: { type: 'varchar', length: 64, name: 'home_time_zone' },
    homeCountry: { type: 'char', length: 2, name: 'home_country' },
    travelRadiusKm: { type: 'int', unsigned: true, name: 'travel_radius_km' },
    languages: { type: 'json' },
    dayRate: { type: 'bigint', unsigned: true, name: 'day_rate', transformer: bigintAsNumber },
    travelDayRate: {
      type: 'bigint',
      unsigned: true,
      name: 'travel_day_rate',
      transformer: bigintAsNumber,
    },
    currency: { type: 'char', length: 3 },
    specialties: { type: 'json' },
    bio: { type: 'text', nullable: true },
    availability: { type: 'json' },
    lastOfferedAt: instantColumn('last_offered_at', true),
    createdAt: instantColumn('created_at'),
    updatedAt: instantColumn('updated_at'),
  },
  indices: [
    { name: 'ix_proctor_profiles_org', columns: ['organisationId'] },
    { name: 'ix_proctor_profiles_updated', columns: ['updatedAt'] },
  ],
  foreignKeys: [
    {
      name: 'fk_proctor_profiles_org',
      target: 'Organisation',
      columnNames: ['organisationId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_proctor_profiles_user',
      target: 'User',
      columnNames: ['userId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `proctor_experience`: supervised cases on one model. */
export interface ProctorExperienceRow {
  proctorUserId: number;
  modelId: number;
  declaredCases: number;
  recordedCases: number;
}

export const ProctorExperienceEntity = new EntitySchema<ProctorExperienceRow>({
  name: 'ProctorExperience',
  tableName: 'proctor_experience',
  columns: {
    proctorUserId: { type: 'int', unsigned: true, primary: true, name: 'proctor_user_id' },
    modelId: { type: 'int', unsigned: true, primary: true, name: 'model_id' },
    declaredCases: { type: 'int', unsigned: true, name: 'declared_cases', default: 0 },
    recordedCases: { type: 'int', unsigned: true, name: 'recorded_cases', default: 0 },
  },
  indices: [{ name: 'ix_proctor_experience_model', columns: ['modelId'] }],
  foreignKeys: [
    {
      name: 'fk_proctor_experience_model',
      target: 'Model',
      columnNames: ['modelId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_proctor_experience_proctor',
      target: 'ProctorProfile',
      columnNames: ['proctorUserId'],
      referencedColumnNames: ['userId'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `proctor_credentials`. Dates are calendar days of the issuing jurisdiction. */
export interface ProctorCredentialRow {
  id: number;
  proctorUserId: number;
  kind: CredentialKind;
  title: string;
  jurisdiction: string;
  validFrom: string;
  validTo: string;
  storageKey: string | null;
  fileName: string | null;
  sizeBytes: number | null;
  sha256: string | null;
  expiryWarnedAt: Date | null;
  createdAt: Date;
}

export const ProctorCredentialEntity = new EntitySchema<ProctorCredentialRow>({
  name: 'ProctorCredential',
  tableName: 'proctor_credentials',
  columns: {
    id: idColumn,
    proctorUserId: refColumn('proctor_user_id'),
    kind: { type: 'varchar', length: 16 },
    title: { type: 'varchar', length: 200 },
    jurisdiction: { type: 'varchar', length: 6 },
    validFrom: { type: 'date', name: 'valid_from' },
    validTo: { type: 'date', name: 'valid_to' },
    storageKey: { type: 'varchar', length: 64, name: 'storage_key', nullable: true },
    fileName: { type: 'varchar', length: 200, name: 'file_name', nullable: true },
    sizeBytes: { type: 'int', unsigned: true, name: 'size_bytes', nullable: true },
    sha256: { type: 'char', length: 64, nullable: true },
    expiryWarnedAt: instantColumn('expiry_warned_at', true),
    createdAt: instantColumn('created_at'),
  },
  indices: [
    { name: 'ix_proctor_credentials_proctor', columns: ['proctorUserId', 'validTo'] },
    { name: 'ix_proctor_credentials_valid_to', columns: ['validTo'] },
    { name: 'uq_proctor_credentials_storage_key', columns: ['storageKey'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_proctor_credentials_proctor',
      target: 'ProctorProfile',
      columnNames: ['proctorUserId'],
      referencedColumnNames: ['userId'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});
