/*
 * Depots: a lender's sites, with the organisation's kind. The catalogue's depot use cases reach
 * these through the organisations front door.
 */
import type { EntityManager } from 'typeorm';
import type { Depot, DepotInput } from '@evalon/contracts';
import { SiteEntity } from './entities';

/** An organisation's kind and name, or null. */
export async function findOrganisationKind(
  m: EntityManager,
  id: number,
): Promise<{ id: number; name: string; kind: string; country: string } | null> {
  const rows: { id: number; name: string; kind: string; country: string }[] = await m.query(
    'SELECT id, name, kind, country FROM organisations WHERE id = ?',
    [id],
  );
  return rows[0] ? { ...rows[0], id: Number(rows[0].id) } : null;
}

interface SiteSqlRow {
  id: number;
  organisation_id: number;
  kind: 'campus' | 'depot';
  name: string;
  address_line: string;
  city: string;
  postal_code: string | null;
  region: string | null;
  country: string;
  latitude: string;
  longitude: string;
  time_zone: string;
  receiving_hours: string | null;
  cutoff_time: string | null;
}

function toDepot(r: SiteSqlRow): Depot {
  return {
    id: Number(r.id),
    organisationId: Number(r.organisation_id),
    kind: 'depot',
    name: r.name,
    addressLine: r.address_line,
    city: r.city,
    postalCode: r.postal_code,
    region: r.region,
    country: r.country,
    latitude: Number(r.latitude),
    longitude: Number(r.longitude),
    timeZone: r.time_zone,
    receivingHours: r.receiving_hours,
    cutoffTime: r.cutoff_time ?? '15:00',
  };
}

/** A lender's depots by name. */
export async function listDepots(m: EntityManager, lenderId: number): Promise<Depot[]> {
  const rows: SiteSqlRow[] = await m.query(
    "SELECT * FROM sites WHERE organisation_id = ? AND kind = 'depot' ORDER BY name, id",
    [lenderId],
  );
  return rows.map(toDepot);
}

/** One depot of a lender, or null (also null for a campus or another lender's depot). */
export async function findDepot(
  m: EntityManager,
  lenderId: number,
  siteId: number,
): Promise<Depot | null> {
  const rows: SiteSqlRow[] = await m.query(
    "SELECT * FROM sites WHERE id = ? AND organisation_id = ? AND kind = 'depot'",
    [siteId, lenderId],
  );
  return rows[0] ? toDepot(rows[0]) : null;
}

/** Inserts a depot and returns its id. */
export async function insertDepot(
  m: EntityManager,
  lenderId: number,
  input: DepotInput,
  now: Date,
): Promise<number> {
  const result = await m.insert(SiteEntity, {
    organisationId: lenderId,
    kind: 'depot',
    ...input,
    createdAt: now,
  });
  return Number(result.identifiers[0]?.id);
}

/** Overwrites a depot's fields. */
export async function updateDepot(
  m: EntityManager,
  siteId: number,
  input: DepotInput,
): Promise<void> {
  await m.update(SiteEntity, { id: siteId }, { ...input });
}

/** A site with its organisation, as the availability search and booking need it. */
export interface SiteWithOrganisation {
  id: number;
  organisationId: number;
  organisationName: string;
  organisationKind: string;
  kind: 'campus' | 'depot';
  name: string;
  country: string;
  latitude: number;
  longitude: number;
  timeZone: string;
}

/** One site with its organisation, or null. */
export async function findSiteWithOrganisation(
  m: EntityManager,
  siteId: number,
): Promise<SiteWithOrganisation | null> {
  const rows: (SiteSqlRow & { organisation_name: string; organisation_kind: string })[] =
    await m.query(
      `SELECT s.*, o.name AS organisation_name, o.kind AS organisation_kind
         FROM sites s JOIN organisations o ON o.id = s.organisation_id WHERE s.id = ?`,
      [siteId],
    );
  const r = rows[0];
  if (!r) return null;
  return {
    id: Number(r.id),
    organisationId: Number(r.organisation_id),
    organisationName: r.organisation_name,
    organisationKind: r.organisation_kind,
    kind: r.kind,
    name: r.name,
    country: r.country,
    latitude: Number(r.latitude),
    longitude: Number(r.longitude),
    timeZone: r.time_zone,
  };
}
