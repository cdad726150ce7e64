/* The `models`, `packing_items` and `model_compatibility` tables. */
import type { EntityManager } from 'typeorm';
import type { ModelCategory, ModelSortField, PackingItem, PageQuery } from '@evalon/contracts';
import { likePattern } from '../../database/sql';
import { pageSql } from '../../database/paging';
import {
  ModelEntity,
  PackingItemEntity,
  PhotoEntity,
  type ModelRow,
  type PhotoRow,
} from './entities';

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
