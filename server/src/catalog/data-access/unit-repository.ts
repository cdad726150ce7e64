/* The `units` table: the lender's serial-numbered units. */
import type { EntityManager } from 'typeorm';
import type { ModelCategory, PageQuery, UnitSortField, UnitStatus } from '@evalon/contracts';
import { likePattern } from '../../database/sql';
import { pageSql } from '../../database/paging';
import { UnitEntity, type UnitRow } from './entities';

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
