import type { EntityManager } from 'typeorm';
import type { ModelCategory, UnitStatus } from '@evalon/contracts';
import { likePattern } from '../../database/sql';

/** A unit with its model and base depot: everything a footprint and a deposit need. */
export interface CandidateUnit {
  unitId: number;
  serialNumber: string;
  status: UnitStatus;
  modelId: number;
  modelName: string;
  category: ModelCategory;
  lenderId: number;
  lenderName: string;
  listValue: number;
  currency: string;
  depositPercentBps: number;
  depositMin: number;
  depositMax: number;
  /**
   * Whether the hospital of the search has borrowed this model before (see
   * {@link priorLoanStates}); undefined when the query was not asked for a hospital.
   */
  borrowedBefore?: boolean;
  depot: {
    id: number;
    name: string;
    latitude: number;
    longitude: number;
    country: string;
    timeZone: string;
    cutoffTime: string;
  };
}

/** Which units to consider. */
export interface CandidateFilter {
  unitIds?: readonly number[];
  modelIds?: readonly number[];
  modelId?: number;
  category?: ModelCategory;
  q?: string;
  compatibleWith?: number;
  /** Leave these units out. */
  excludeUnitIds?: readonly number[];
  /** Only units whose status is active (the default for searches). */
  activeOnly: boolean;
  /** Also answer whether this hospital has borrowed each unit's model before. */
  hospitalId?: number;
  limit: number;
}

interface CandidateSqlRow {
  unit_id: number;
  serial_number: string;
  status: UnitStatus;
  model_id: number;
  model_name: string;
  category: ModelCategory;
  lender_id: number;
  lender_name: string;
  list_value: string;
  currency: string;
  deposit_percent_bps: number;
  deposit_min: string;
  deposit_max: string;
  depot_id: number;
  depot_name: string;
  latitude: string;
  longitude: string;
  country: string;
  time_zone: string;
  cutoff_time: string | null;
  borrowed_before?: number | string | null;
}

const placeholders = (n: number) => Array.from({ length: n }, () => '?').join(', ');

/** The one query for units, their models, lenders and depots. */
export async function findCandidates(
  m: EntityManager,
  filter: CandidateFilter,
): Promise<CandidateUnit[]> {
  const where: string[] = [];
  const params: unknown[] = [];
  if (filter.activeOnly) where.push("u.status = 'active'");
  if (filter.unitIds) {
    if (filter.unitIds.length === 0) return [];
    where.push(`u.id IN (${placeholders(filter.unitIds.length)})`);
    params.push(...filter.unitIds);
  }
  if (filter.modelIds) {
    if (filter.modelIds.length === 0) return [];
    where.push(`u.model_id IN (${placeholders(filter.modelIds.length)})`);
    params.push(...filter.modelIds);
  }
  if (filter.modelId) {
    where.push('u.model_id = ?');
    params.push(filter.modelId);
  }
  if (filter.category) {
    where.push('m.category = ?');
    params.push(filter.category);
  }
  if (filter.q) {
    where.push('(m.name LIKE ? OR m.description LIKE ? OR u.serial_number LIKE ?)');
    const pattern = likePattern(filter.q);
    params.push(pattern, pattern, pattern);
  }
  if (filter.compatibleWith) {
    where.push(
      'u.model_id IN (SELECT compatible_model_id FROM model_compatibility WHERE model_id = ?)',
    );
    params.push(filter.compatibleWith);
  }
  if (filter.excludeUnitIds?.length) {
    where.push(`u.id NOT IN (${placeholders(filter.excludeUnitIds.length)})`);
    params.push(...filter.excludeUnitIds);
  }
  // The first-loan fact rides along as a correlated subquery (MariaDB caches its result per
  // model), saving the search a round trip.
  const borrowed =
    filter.hospitalId === undefined
      ? ''
      : `, EXISTS (SELECT 1 FROM loan_units lu JOIN loans l ON l.id = lu.loan_id
                    WHERE lu.hospital_id = ? AND lu.model_id = u.model_id
                      AND l.state IN (${placeholders(priorLoanStates.length)})) AS borrowed_before`;
  const selectParams =
    filter.hospitalId === undefined ? [] : [filter.hospitalId, ...priorLoanStates];
  params.push(filter.limit);
  const rows: CandidateSqlRow[] = await m.query(
    `SELECT u.id AS unit_id, u.serial_number, u.status, u.model_id, m.name AS model_name,
            m.category, m.lender_id, o.name AS lender_name, m.list_value, m.currency,
            m.deposit_percent_bps, m.deposit_min, m.deposit_max, d.id AS depot_id,
            d.name AS depot_name, d.latitude, d.longitude, d.country, d.time_zone, d.cutoff_time
            ${borrowed}
       FROM units u
       JOIN models m ON m.id = u.model_id
       JOIN organisations o ON o.id = m.lender_id
       JOIN sites d ON d.id = u.home_depot_id
      ${where.length ? `WHERE ${where.join(' AND ')}` : ''}
      ORDER BY m.name, u.serial_number, u.id
      LIMIT ?`,
    [...selectParams, ...params],
  );
  return rows.map((r) => ({
    unitId: Number(r.unit_id),
    serialNumber: r.serial_number,
    status: r.status,
    modelId: Number(r.model_id),
    modelName: r.model_name,
    category: r.category,
    lenderId: Number(r.lender_id),
    lenderName: r.lender_name,
    listValue: Number(r.list_value),
    currency: r.currency,
    depositPercentBps: Number(r.deposit_percent_bps),
    depositMin: Number(r.deposit_min),
    depositMax: Number(r.deposit_max),
    ...(r.borrowed_before === undefined ? {} : { borrowedBefore: Number(r.borrowed_before) === 1 }),
    depot: {
      id: Number(r.depot_id),
      name: r.depot_name,
      latitude: Number(r.latitude),
      longitude: Number(r.longitude),
      country: r.country,
      timeZone: r.time_zone,
      // Depots always have a cut-off (the depot form requires one); a missing one from older
      // data is read as the end of the working afternoon.
      cutoffTime: r.cutoff_time ?? '15:00',
    },
  }));
}

/**
 * Loan states that count as "this hospital has had this model before": every loan that was not
 * turned down or dropped. A loan still waiting for approval counts too, so a hospital that books
 * the same model twice in a row does not get the longer first-loan lead time twice.
 */
export const priorLoanStates = [
  'requested',
  'approved',
  'confirmed',
  'shipped',
  'delivered',
  'returning',
  'returned',
  'closed',
] as const;

/** Of `modelIds`, those the hospital has borrowed before (see {@link priorLoanStates}). */
export async function modelsBorrowedBefore(
  m: EntityManager,
  hospitalId: number,
  modelIds: readonly number[],
): Promise<Set<number>> {
  if (modelIds.length === 0) return new Set();
  const rows: { model_id: number }[] = await m.query(
    `SELECT DISTINCT lu.model_id
       FROM loan_units lu JOIN loans l ON l.id = lu.loan_id
      WHERE lu.hospital_id = ? AND lu.model_id IN (${placeholders(modelIds.length)})
        AND l.state IN (${placeholders(priorLoanStates.length)})`,
    [hospitalId, ...modelIds, ...priorLoanStates],
  );
  return new Set(rows.map((r) => Number(r.model_id)));
}

/** Models compatible with each of `modelIds` (compatibility is stored in both directions). */
export async function compatibleModelsOf(
  m: EntityManager,
  modelIds: readonly number[],
): Promise<Map<number, Set<number>>> {
  const result = new Map<number, Set<number>>();
  if (modelIds.length === 0) return result;
  const rows: { model_id: number; compatible_model_id: number }[] = await m.query(
    `SELECT model_id, compatible_model_id FROM model_compatibility
      WHERE model_id IN (${placeholders(modelIds.length)})`,
    [...modelIds],
  );
  for (const r of rows) {
    const key = Number(r.model_id);
    const set = result.get(key) ?? new Set<number>();
    set.add(Number(r.compatible_model_id));
    result.set(key, set);
  }
  return result;
}
