import type { EntityManager } from 'typeorm';
import type { Organisation, Site } from '@evalon/contracts';
import { OrganisationEntity, SiteEntity, type OrganisationRow, type SiteRow } from './entities';

function toOrganisation(row: OrganisationRow): Organisation {
  return { id: row.id, name: row.name, kind: row.kind, country: row.country };
}

/** One organisation, or null; `lock` takes a row lock (serialises member changes per organisation). */
export async function findOrganisation(
  m: EntityManager,
  id: number,
  lock = false,
): Promise<Organisation | null> {
  const qb = m.createQueryBuilder(OrganisationEntity, 'o').where('o.id = :id', { id });
  if (lock) qb.setLock('pessimistic_write');
  const row = await qb.getOne();
  return row ? toOrganisation(row) : null;
}

/** Organisations by name; all of them, or those with the given ids. */
export async function listOrganisations(
  m: EntityManager,
  ids?: readonly number[],
): Promise<Organisation[]> {
  if (ids && ids.length === 0) return [];
  const qb = m.createQueryBuilder(OrganisationEntity, 'o').orderBy('o.name', 'ASC');
  if (ids) qb.where('o.id IN (:...ids)', { ids });
  return (await qb.getMany()).map(toOrganisation);
}

/** Inserts an organisation and returns its id. */
export async function insertOrganisation(
  m: EntityManager,
  organisation: Omit<OrganisationRow, 'id' | 'createdAt'>,
  now: Date,
): Promise<number> {
  const result = await m.insert(OrganisationEntity, { ...organisation, createdAt: now });
  return Number(result.identifiers[0]?.id);
}

/** Inserts a site and returns its id. */
export async function insertSite(
  m: EntityManager,
  site: Omit<SiteRow, 'id' | 'createdAt'>,
  now: Date,
): Promise<number> {
  const result = await m.insert(SiteEntity, { ...site, createdAt: now });
  return Number(result.identifiers[0]?.id);
}

/** Which sites to list: everything, or some organisations' sites plus every lender's depots. */
export type SiteScope = { all: true } | { organisationIds: readonly number[] };

/** Sites in scope with their organisation's name, by organisation then site name. */
export async function listSites(m: EntityManager, scope: SiteScope): Promise<Site[]> {
  const qb = m
    .createQueryBuilder(SiteEntity, 's')
    .innerJoin('Organisation', 'o', 'o.id = s.organisationId')
    .addSelect('o.name', 'organisationName')
    .orderBy('o.name', 'ASC')
    .addOrderBy('s.name', 'ASC');
  if (!('all' in scope)) {
    const ids = scope.organisationIds.length ? scope.organisationIds : [0];
    qb.where("(s.organisationId IN (:...ids) OR (o.kind = 'lender' AND s.kind = 'depot'))", {
      ids,
    });
  }
  const { entities, raw } = await qb.getRawAndEntities<{ organisationName: string }>();
  return entities.map((s, i) => ({
    id: s.id,
    organisationId: s.organisationId,
    organisationName: raw[i]?.organisationName,
    kind: s.kind,
    name: s.name,
    addressLine: s.addressLine,
    city: s.city,
    country: s.country,
    latitude: s.latitude,
    longitude: s.longitude,
    timeZone: s.timeZone,
    receivingHours: s.receivingHours,
    cutoffTime: s.cutoffTime,
  }));
}
