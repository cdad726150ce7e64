import type { EntityManager } from 'typeorm';
import { likePattern } from '../../database/sql';
import type {
  Depot,
  DepotInput,
  ModelCategory,
  ModelSortField,
  PackingItem,
  PageQuery,
  ShippingSettings,
  UnitSortField,
  UnitStatus,
} from '@evalon/contracts';
import { pageSql } from '../../database/paging';
import { SiteEntity } from '../../organisations';
import {
  LenderSettingsEntity,
  ModelEntity,
  PackingItemEntity,
  PhotoEntity,
  UnitEntity,
  type ModelRow,
  type PhotoRow,
  type UnitRow,
} from './entities';

/** mysql2 may return a JSON column as text or as parsed JSON. */
function json<T>(value: unknown): T {
  return (typeof value === 'string' ? JSON.parse(value) : value) as T;
}

// ---------------------------------------------------------------------------------------------
// Organisations and depots
// ---------------------------------------------------------------------------------------------

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

// ---------------------------------------------------------------------------------------------
// Shipping settings
// ---------------------------------------------------------------------------------------------

/** A lender's saved settings, or null when it uses the defaults. */
export async function findLenderSettings(
  m: EntityManager,
  lenderId: number,
): Promise<{ settings: ShippingSettings; updatedAt: Date } | null> {
  const row = await m.findOne(LenderSettingsEntity, { where: { organisationId: lenderId } });
  if (!row) return null;
  return {
    settings: {
      distanceBands: json<ShippingSettings['distanceBands']>(row.distanceBands),
      customsDays: row.customsDays,
      leadDays: row.leadDays,
      firstLoanLeadDays: row.firstLoanLeadDays,
      decontaminationDays: row.decontaminationDays,
      turnaroundDays: row.turnaroundDays,
    },
    updatedAt: row.updatedAt,
  };
}

/** Saves a lender's settings (insert or replace). */
export async function saveLenderSettings(
  m: EntityManager,
  lenderId: number,
  settings: ShippingSettings,
  userId: number | null,
  now: Date,
): Promise<void> {
  await m.query(
    `INSERT INTO lender_settings (organisation_id, distance_bands, customs_days, lead_days,
        first_loan_lead_days, decontamination_days, turnaround_days, updated_at, updated_by_user_id)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)
     ON DUPLICATE KEY UPDATE distance_bands = VALUES(distance_bands),
        customs_days = VALUES(customs_days), lead_days = VALUES(lead_days),
        first_loan_lead_days = VALUES(first_loan_lead_days),
        decontamination_days = VALUES(decontamination_days),
        turnaround_days = VALUES(turnaround_days), updated_at = VALUES(updated_at),
        updated_by_user_id = VALUES(updated_by_user_id)`,
    [
      lenderId,
      JSON.stringify(settings.distanceBands),
      settings.customsDays,
      settings.leadDays,
      settings.firstLoanLeadDays,
      settings.decontaminationDays,
      settings.turnaroundDays,
      now,
      userId,
    ],
  );
}

// ---------------------------------------------------------------------------------------------
// Models
// ---------------------------------------------------------------------------------------------

/** A model row with its lender's name and unit counts. */
export interface ModelSummary extends ModelRow {
  lenderName: string;
  unitCount: number;
  activeUnitCount: number;
}

/** Filter of {@link listModelSummaries}. */
export interface ModelFilter {
  ids?: readonly number[];
  category?: ModelCategory;
  q?: string;
  compatibleWith?: number;
  lenderId?: number;
}

interface ModelSqlRow {
  id: number;
  lender_id: number;
  lender_name: string;
  name: string;
  category: ModelCategory;
  description: string;
  list_value: string;
  currency: string;
  deposit_percent_bps: number;
  deposit_min: string;
  deposit_max: string;
  created_at: Date;
  updated_at: Date;
  unit_count: string | number;
  active_unit_count: string | number;
}

/** SQL for each sortable column of the model list. */
const modelSortColumns: Record<ModelSortField, string> = {
  lender: 'CONCAT(o.name, CHAR(0), m.name)',
  name: 'm.name',
  category: 'm.category',
  listValue: 'm.list_value',
  // Per-unit deposit as @evalon/deposits computes it (percent of list value, clamped), for the
  // order only; the half-up rounding there can only tie neighbours, not swap them.
  deposit:
    'LEAST(GREATEST(m.list_value * m.deposit_percent_bps / 10000, m.deposit_min), m.deposit_max)',
  units: 'unit_count',
};

/** WHERE clause and parameters of a model filter; null when nothing can match. */
function modelWhere(filter: ModelFilter): { sql: string; params: unknown[] } | null {
  const where: string[] = [];
  const params: unknown[] = [];
  if (filter.ids) {
    if (filter.ids.length === 0) return null;
    where.push(`m.id IN (${filter.ids.map(() => '?').join(', ')})`);
    params.push(...filter.ids);
  }
  if (filter.category) {
    where.push('m.category = ?');
    params.push(filter.category);
  }
  if (filter.lenderId) {
    where.push('m.lender_id = ?');
    params.push(filter.lenderId);
  }
  if (filter.q) {
    where.push('(m.name LIKE ? OR m.description LIKE ?)');
    params.push(likePattern(filter.q), likePattern(filter.q));
  }
  if (filter.compatibleWith) {
    where.push('m.id IN (SELECT compatible_model_id FROM model_compatibility WHERE model_id = ?)');
    params.push(filter.compatibleWith);
  }
  return { sql: where.length ? `WHERE ${where.join(' AND ')}` : '', params };
}

const unitCounts = `(SELECT COUNT(*) FROM units u WHERE u.model_id = m.id AND u.status <> 'retired') AS unit_count,
            (SELECT COUNT(*) FROM units u WHERE u.model_id = m.id AND u.status = 'active') AS active_unit_count`;

/** How many models match the filter, and how many units (not retired) they have together. */
export async function countModels(
  m: EntityManager,
  filter: ModelFilter,
): Promise<{ models: number; units: number }> {
  const where = modelWhere(filter);
  if (!where) return { models: 0, units: 0 };
  const [row]: { models: string | number; units: string | number | null }[] = await m.query(
    `SELECT COUNT(*) AS models, SUM(c.unit_count) AS units
       FROM (SELECT ${unitCounts}
               FROM models m JOIN organisations o ON o.id = m.lender_id ${where.sql}) c`,
    where.params,
  );
  return { models: Number(row?.models ?? 0), units: Number(row?.units ?? 0) };
}

/**
 * Models matching the filter: one page in its order, or (without `page`) by lender name then
 * model name, at most 500.
 */
export async function listModelSummaries(
  m: EntityManager,
  filter: ModelFilter & { page?: PageQuery },
): Promise<ModelSummary[]> {
  const where = modelWhere(filter);
  if (!where) return [];
  const order = filter.page
    ? pageSql(filter.page, modelSortColumns, 'm.id')
    : { sql: 'ORDER BY o.name, m.name, m.id LIMIT 500', params: [] };
  const rows: ModelSqlRow[] = await m.query(
    `SELECT m.*, o.name AS lender_name,
            ${unitCounts}
       FROM models m JOIN organisations o ON o.id = m.lender_id
      ${where.sql}
      ${order.sql}`,
    [...where.params, ...order.params],
  );
  return rows.map((r) => ({
    id: Number(r.id),
    lenderId: Number(r.lender_id),
    lenderName: r.lender_name,
    name: r.name,
    category: r.category,
    description: r.description,
    listValue: Number(r.list_value),
    currency: r.currency,
    depositPercentBps: Number(r.deposit_percent_bps),
    depositMin: Number(r.deposit_min),
    depositMax: Number(r.deposit_max),
    createdAt: r.created_at,
    updatedAt: r.updated_at,
    unitCount: Number(r.unit_count),
    activeUnitCount: Number(r.active_unit_count),
  }));
}

/** One model row, or null; `lock` takes a row lock (serialises edits of one model). */
export async function findModel(
  m: EntityManager,
  id: number,
  lock = false,
): Promise<ModelRow | null> {
  const qb = m.createQueryBuilder(ModelEntity, 'm').where('m.id = :id', { id });
  if (lock) qb.setLock('pessimistic_write');
  return (await qb.getOne()) ?? null;
}

/** Models by id (for checking compatibility lists). */
export async function findModelsByIds(
  m: EntityManager,
  ids: readonly number[],
): Promise<ModelRow[]> {
  if (ids.length === 0) return [];
  return m
    .createQueryBuilder(ModelEntity, 'm')
    .where('m.id IN (:...ids)', { ids: [...ids] })
    .getMany();
}

/** Whether the lender already has a model of this name (other than `exceptId`). */
export async function modelNameTaken(
  m: EntityManager,
  lenderId: number,
  name: string,
  exceptId?: number,
): Promise<boolean> {
  const rows: unknown[] = await m.query(
    'SELECT id FROM models WHERE lender_id = ? AND name = ? AND id <> ? LIMIT 1',
    [lenderId, name, exceptId ?? 0],
  );
  return rows.length > 0;
}

/** The model fields a write sets. */
export type ModelWrite = Omit<ModelRow, 'id' | 'createdAt' | 'updatedAt'>;

/** Inserts a model and returns its id. */
export async function insertModel(m: EntityManager, model: ModelWrite, now: Date): Promise<number> {
  const result = await m.insert(ModelEntity, { ...model, createdAt: now, updatedAt: now });
  return Number(result.identifiers[0]?.id);
}

/** Overwrites a model's fields. */
export async function updateModel(
  m: EntityManager,
  id: number,
  model: Omit<ModelWrite, 'lenderId'>,
  now: Date,
): Promise<void> {
  await m.update(ModelEntity, { id }, { ...model, updatedAt: now });
}

/** Replaces a model's packing list, keeping the order given. */
export async function replacePackingList(
  m: EntityManager,
  modelId: number,
  items: readonly PackingItem[],
): Promise<void> {
  await m.delete(PackingItemEntity, { modelId });
  if (items.length === 0) return;
  await m.insert(
    PackingItemEntity,
    items.map((item, position) => ({
      modelId,
      position,
      name: item.name,
      gtin: item.gtin,
      quantity: item.quantity,
      serialised: item.serialised,
    })),
  );
}

/**
 * Replaces a model's compatibility list, in both directions: X being compatible with Y means Y is
 * compatible with X, so removing Y from X also removes X from Y.
 */
export async function replaceCompatibility(
  m: EntityManager,
  modelId: number,
  compatibleIds: readonly number[],
): Promise<void> {
  await m.query('DELETE FROM model_compatibility WHERE model_id = ? OR compatible_model_id = ?', [
    modelId,
    modelId,
  ]);
  if (compatibleIds.length === 0) return;
  // IGNORE: an edit of the other model running at the same time may have written a pair already.
  await m.query(
    `INSERT IGNORE INTO model_compatibility (model_id, compatible_model_id) VALUES ${compatibleIds
      .map(() => '(?, ?), (?, ?)')
      .join(', ')}`,
    compatibleIds.flatMap((other) => [modelId, other, other, modelId]),
  );
}

/** Packing items, compatibility and photos of some models, keyed by model id. */
export interface ModelParts {
  packing: Map<number, PackingItem[]>;
  compatible: Map<number, { id: number; name: string; category: ModelCategory }[]>;
  photos: Map<number, PhotoRow[]>;
}

/** Loads the parts of several models in three queries. */
export async function loadModelParts(
  m: EntityManager,
  modelIds: readonly number[],
): Promise<ModelParts> {
  const parts: ModelParts = { packing: new Map(), compatible: new Map(), photos: new Map() };
  if (modelIds.length === 0) return parts;
  const ids = [...modelIds];
  const [items, compat, photos] = await Promise.all([
    m
      .createQueryBuilder(PackingItemEntity, 'p')
      .where('p.modelId IN (:...ids)', { ids })
      .orderBy('p.modelId')
      .addOrderBy('p.position')
      .getMany(),
    m.query(
      `SELECT c.model_id, o.id, o.name, o.category
         FROM model_compatibility c JOIN models o ON o.id = c.compatible_model_id
        WHERE c.model_id IN (${ids.map(() => '?').join(', ')})
        ORDER BY o.name`,
      ids,
    ) as Promise<{ model_id: number; id: number; name: string; category: ModelCategory }[]>,
    m
      .createQueryBuilder(PhotoEntity, 'ph')
      .where('ph.modelId IN (:...ids)', { ids })
      .orderBy('ph.id')
      .getMany(),
  ]);
  for (const item of items) {
    const list = parts.packing.get(item.modelId) ?? [];
    list.push({
      id: item.id,
      name: item.name,
      gtin: item.gtin,
      quantity: item.quantity,
      serialised: Boolean(item.serialised),
    });
    parts.packing.set(item.modelId, list);
  }
  for (const c of compat) {
    const key = Number(c.model_id);
    const list = parts.compatible.get(key) ?? [];
    list.push({ id: Number(c.id), name: c.name, category: c.category });
    parts.compatible.set(key, list);
  }
  for (const ph of photos) {
    const list = parts.photos.get(ph.modelId) ?? [];
    list.push(ph);
    parts.photos.set(ph.modelId, list);
  }
  return parts;
}

// ---------------------------------------------------------------------------------------------
// Photos
// ---------------------------------------------------------------------------------------------

/** Inserts a photo row and returns its id. */
export async function insertPhoto(m: EntityManager, photo: Omit<PhotoRow, 'id'>): Promise<number> {
  const result = await m.insert(PhotoEntity, photo);
  return Number(result.identifiers[0]?.id);
}

/** One photo with its model's lender, or null. */
export async function findPhoto(
  m: EntityManager,
  id: number,
): Promise<(PhotoRow & { lenderId: number }) | null> {
  const rows: {
    id: number;
    model_id: number;
    storage_key: string;
    content_type: PhotoRow['contentType'];
    size_bytes: number;
    created_at: Date;
    created_by_user_id: number | null;
    lender_id: number;
  }[] = await m.query(
    `SELECT ph.*, m.lender_id FROM model_photos ph JOIN models m ON m.id = ph.model_id
      WHERE ph.id = ?`,
    [id],
  );
  const r = rows[0];
  if (!r) return null;
  return {
    id: Number(r.id),
    modelId: Number(r.model_id),
    storageKey: r.storage_key,
    contentType: r.content_type,
    sizeBytes: Number(r.size_bytes),
    createdAt: r.created_at,
    createdByUserId: r.created_by_user_id === null ? null : Number(r.created_by_user_id),
    lenderId: Number(r.lender_id),
  };
}

/** How many photos a model has. */
export async function countPhotos(m: EntityManager, modelId: number): Promise<number> {
  return m.count(PhotoEntity, { where: { modelId } });
}

/** Deletes a photo row. */
export async function deletePhoto(m: EntityManager, id: number): Promise<void> {
  await m.delete(PhotoEntity, { id });
}

// ---------------------------------------------------------------------------------------------
// Units
// ---------------------------------------------------------------------------------------------

/** A unit with its model's and depot's names. */
export interface UnitDetails extends UnitRow {
  modelName: string;
  category: ModelCategory;
  lenderId: number;
  homeDepotName: string;
  homeDepotTimeZone: string;
}

/** Filter of {@link listUnits}. */
export interface UnitFilter {
  ids?: readonly number[];
  modelId?: number;
  lenderId?: number;
  status?: UnitStatus;
  /** Only units based at this depot. */
  depotId?: number;
  /** Serial number, UDI-DI or model name contains this. */
  q?: string;
  /** Statuses to leave out (e.g. retired units for people outside the lender). */
  excludeStatuses?: readonly UnitStatus[];
  /** Retired units show only to these lenders' people; absent = to everyone. */
  retiredVisibleTo?: readonly number[];
}

interface UnitSqlRow {
  id: number;
  model_id: number;
  serial_number: string;
  udi_di: string | null;
  home_depot_id: number;
  status: UnitStatus;
  booking_version: number;
  created_at: Date;
  updated_at: Date;
  model_name: string;
  category: ModelCategory;
  lender_id: number;
  depot_name: string;
  depot_time_zone: string;
}

/** SQL for each sortable column of the unit list. */
const unitSortColumns: Record<UnitSortField, string> = {
  model: 'CONCAT(m.name, CHAR(0), u.serial_number)',
  serial: 'u.serial_number',
  depot: 'd.name',
  status: "FIELD(u.status, 'active', 'maintenance', 'retired')",
  // First day of the current or next hold. The server's date stands in for the depot's: at most
  // a day apart, and only for the order (the list shows each unit's hold from its own calendar).
  next: `(SELECT MIN(h.start_date) FROM holds h
           WHERE h.unit_id = u.id AND h.end_date >= UTC_DATE())`,
};

/** WHERE clause and parameters of a unit filter; null when nothing can match. */
function unitWhere(filter: UnitFilter): { sql: string; params: unknown[] } | null {
  const where: string[] = [];
  const params: unknown[] = [];
  if (filter.ids) {
    if (filter.ids.length === 0) return null;
    where.push(`u.id IN (${filter.ids.map(() => '?').join(', ')})`);
    params.push(...filter.ids);
  }
  if (filter.modelId) {
    where.push('u.model_id = ?');
    params.push(filter.modelId);
  }
  if (filter.lenderId) {
    where.push('m.lender_id = ?');
    params.push(filter.lenderId);
  }
  if (filter.depotId) {
    where.push('u.home_depot_id = ?');
    params.push(filter.depotId);
  }
  if (filter.status) {
    where.push('u.status = ?');
    params.push(filter.status);
  }
  if (filter.excludeStatuses?.length) {
    where.push(`u.status NOT IN (${filter.excludeStatuses.map(() => '?').join(', ')})`);
    params.push(...filter.excludeStatuses);
  }
  if (filter.retiredVisibleTo) {
    const lenders = filter.retiredVisibleTo;
    where.push(
      lenders.length
        ? `(u.status <> 'retired' OR m.lender_id IN (${lenders.map(() => '?').join(', ')}))`
        : "u.status <> 'retired'",
    );
    params.push(...lenders);
  }
  if (filter.q) {
    const p = likePattern(filter.q);
    where.push('(u.serial_number LIKE ? OR u.udi_di LIKE ? OR m.name LIKE ?)');
    params.push(p, p, p);
  }
  return { sql: where.length ? `WHERE ${where.join(' AND ')}` : '', params };
}

const unitFrom =
  'FROM units u JOIN models m ON m.id = u.model_id JOIN sites d ON d.id = u.home_depot_id';

/** How many units match the filter, per status (statuses without units are left out). */
export async function countUnitsByStatus(
  m: EntityManager,
  filter: UnitFilter,
): Promise<{ status: UnitStatus; count: number }[]> {
  const where = unitWhere(filter);
  if (!where) return [];
  const rows: { status: UnitStatus; count: string | number }[] = await m.query(
    `SELECT u.status AS status, COUNT(*) AS count ${unitFrom} ${where.sql} GROUP BY u.status`,
    where.params,
  );
  return rows.map((r) => ({ status: r.status, count: Number(r.count) }));
}

/**
 * Units matching the filter: one page in its order, or (without `page`) by model name then
 * serial number, at most 2000.
 */
export async function listUnits(
  m: EntityManager,
  filter: UnitFilter & { page?: PageQuery },
): Promise<UnitDetails[]> {
  const where = unitWhere(filter);
  if (!where) return [];
  const order = filter.page
    ? pageSql(filter.page, unitSortColumns, 'u.id', ['next'])
    : { sql: 'ORDER BY m.name, u.serial_number, u.id LIMIT 2000', params: [] };
  const rows: UnitSqlRow[] = await m.query(
    `SELECT u.*, m.name AS model_name, m.category, m.lender_id, d.name AS depot_name,
            d.time_zone AS depot_time_zone
       ${unitFrom}
      ${where.sql}
      ${order.sql}`,
    [...where.params, ...order.params],
  );
  return rows.map((r) => ({
    id: Number(r.id),
    modelId: Number(r.model_id),
    serialNumber: r.serial_number,
    udiDi: r.udi_di,
    homeDepotId: Number(r.home_depot_id),
    status: r.status,
    bookingVersion: Number(r.booking_version),
    createdAt: r.created_at,
    updatedAt: r.updated_at,
    modelName: r.model_name,
    category: r.category,
    lenderId: Number(r.lender_id),
    homeDepotName: r.depot_name,
    homeDepotTimeZone: r.depot_time_zone,
  }));
}

/**
 * Locks units' rows (`SELECT ... FOR UPDATE`) in ascending id order, the one order every
 * writer of holds uses, so two transactions never wait on each other in a circle.
 */
export async function lockUnits(m: EntityManager, ids: readonly number[]): Promise<UnitRow[]> {
  if (ids.length === 0) return [];
  return m
    .createQueryBuilder(UnitEntity, 'u')
    .where('u.id IN (:...ids)', { ids: [...ids].sort((a, b) => a - b) })
    .orderBy('u.id', 'ASC')
    .setLock('pessimistic_write')
    .getMany();
}

/** Whether the model already has a unit with this serial number (other than `exceptId`). */
export async function serialTaken(
  m: EntityManager,
  modelId: number,
  serialNumber: string,
  exceptId?: number,
): Promise<boolean> {
  const rows: unknown[] = await m.query(
    'SELECT id FROM units WHERE model_id = ? AND serial_number = ? AND id <> ? LIMIT 1',
    [modelId, serialNumber, exceptId ?? 0],
  );
  return rows.length > 0;
}

/** Inserts a unit and returns its id. */
export async function insertUnit(
  m: EntityManager,
  unit: Pick<UnitRow, 'modelId' | 'serialNumber' | 'udiDi' | 'homeDepotId' | 'status'>,
  now: Date,
): Promise<number> {
  const result = await m.insert(UnitEntity, {
    ...unit,
    bookingVersion: 0,
    createdAt: now,
    updatedAt: now,
  });
  return Number(result.identifiers[0]?.id);
}

/** Overwrites a unit's editable fields. */
export async function updateUnit(
  m: EntityManager,
  id: number,
  unit: Pick<UnitRow, 'serialNumber' | 'udiDi' | 'homeDepotId' | 'status'>,
  now: Date,
): Promise<void> {
  await m.update(UnitEntity, { id }, { ...unit, updatedAt: now });
}

/**
 * Moves a locked unit's booking version from `from` to `from + 1`. Returns false when the row
 * no longer holds `from`, which would mean someone wrote holds without taking the lock.
 */
export async function bumpBookingVersion(
  m: EntityManager,
  unitId: number,
  from: number,
): Promise<boolean> {
  const result: { affectedRows?: number } = await m.query(
    'UPDATE units SET booking_version = booking_version + 1 WHERE id = ? AND booking_version = ?',
    [unitId, from],
  );
  return result.affectedRows === 1;
}
