import { EntitySchema } from 'typeorm';
import type { OrganisationKind } from '@evalon/contracts';
import { decimalAsNumber, idColumn, instantColumn, refColumn } from '../../database/columns';

/** A row of `organisations`. */
export interface OrganisationRow {
  id: number;
  name: string;
  kind: OrganisationKind;
  /** ISO 3166-1 alpha-2. */
  country: string;
  /**
   * Cases performed under supervision before a proctor may sign a trainee off (hospitals; the
   * column default, 3, when an insert leaves it out).
   */
  signOffThreshold?: number;
  createdAt: Date;
}

export const OrganisationEntity = new EntitySchema<OrganisationRow>({
  name: 'Organisation',
  tableName: 'organisations',
  columns: {
    id: idColumn,
    name: { type: 'varchar', length: 200 },
    kind: { type: 'varchar', length: 32 },
    country: { type: 'char', length: 2 },
    signOffThreshold: { type: 'tinyint', unsigned: true, name: 'sign_off_threshold', default: 3 },
    createdAt: instantColumn('created_at'),
  },
  indices: [{ name: 'uq_organisations_name', columns: ['name'], unique: true }],
});

/** A row of `sites`: a hospital campus or a lender depot. */
export interface SiteRow {
  id: number;
  organisationId: number;
  kind: 'campus' | 'depot';
  name: string;
  addressLine: string;
  city: string;
  postalCode: string | null;
  region: string | null;
  country: string;
  /** ISO 3166-2 subdivision (`US-IL`, `DE-BY`): the jurisdiction of visits to the site. */
  subdivision?: string | null;
  latitude: number;
  longitude: number;
  /** IANA zone, e.g. `America/Chicago`. */
  timeZone: string;
  /** Free text shown to the other side, e.g. `Mon–Fri 07:00–15:30`. */
  receivingHours: string | null;
  /** Depot shipping cut-off `HH:MM` in the site's zone; null for campuses. */
  cutoffTime: string | null;
  createdAt: Date;
}

export const SiteEntity = new EntitySchema<SiteRow>({
  name: 'Site',
  tableName: 'sites',
  columns: {
    id: idColumn,
    organisationId: refColumn('organisation_id'),
    kind: { type: 'varchar', length: 16 },
    name: { type: 'varchar', length: 200 },
    addressLine: { type: 'varchar', length: 300, name: 'address_line' },
    city: { type: 'varchar', length: 120 },
    postalCode: { type: 'varchar', length: 20, name: 'postal_code', nullable: true },
    region: { type: 'varchar', length: 120, nullable: true },
    country: { type: 'char', length: 2 },
    subdivision: { type: 'varchar', length: 6, nullable: true },
    latitude: { type: 'decimal', precision: 9, scale: 6, transformer: decimalAsNumber },
    longitude: { type: 'decimal', precision: 9, scale: 6, transformer: decimalAsNumber },
    timeZone: { type: 'varchar', length: 64, name: 'time_zone' },
    receivingHours: { type: 'varchar', length: 200, name: 'receiving_hours', nullable: true },
    cutoffTime: { type: 'char', length: 5, name: 'cutoff_time', nullable: true },
    createdAt: instantColumn('created_at'),
  },
  indices: [
    { name: 'ix_sites_kind', columns: ['kind'] },
    { name: 'ix_sites_organisation', columns: ['organisationId'] },
  ],
  foreignKeys: [
    {
      name: 'fk_sites_organisation',
      target: 'Organisation',
      columnNames: ['organisationId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});
