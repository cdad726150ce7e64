import type { EntityManager } from 'typeorm';
import type { Model, ModelInput, ModelPage, ModelQuery, Photo } from '@evalon/contracts';
import { DepositError, depositForModel } from '@evalon/deposits';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import {
  findModel,
  findModelsByIds,
  insertModel,
  countModels,
  listModelSummaries,
  loadModelParts,
  modelNameTaken,
  replaceCompatibility,
  replacePackingList,
  updateModel,
  type ModelSummary,
} from '../data-access/model-repository';
import { findOrganisationKind } from '../../organisations';
import type { PhotoRow } from '../data-access/entities';
import type { CatalogDeps } from './deps';
import { isFleetManagerOf, organisationsWithRole } from './scope';

/** The URL that serves a photo to signed-in people. */
export function photoUrl(id: number): string {
  return `/api/photos/${id}`;
}

/** A photo row as the API shows it. */
export function toPhoto(row: PhotoRow): Photo {
  return {
    id: row.id,
    modelId: row.modelId,
    contentType: row.contentType,
    sizeBytes: row.sizeBytes,
    url: photoUrl(row.id),
  };
}

/** The deposit one unit of a model needs, through `@evalon/deposits`. */
export function unitDeposit(model: {
  listValue: number;
  currency: string;
  depositPercentBps: number;
  depositMin: number;
  depositMax: number;
}): { amount: number; currency: string } {
  return {
    amount: depositForModel(model.listValue, {
      percentBps: model.depositPercentBps,
      min: model.depositMin,
      max: model.depositMax,
      currency: model.currency,
    }),
    currency: model.currency,
  };
}

async function toModels(
  m: EntityManager,
  auth: AuthContext,
  summaries: ModelSummary[],
): Promise<Model[]> {
  const parts = await loadModelParts(
    m,
    summaries.map((s) => s.id),
  );
  return summaries.map((s) => {
    const photos = (parts.photos.get(s.id) ?? []).map(toPhoto);
    const compatible = parts.compatible.get(s.id) ?? [];
    return {
      id: s.id,
      lenderId: s.lenderId,
      lenderName: s.lenderName,
      name: s.name,
      category: s.category,
      description: s.description,
      listValue: s.listValue,
      currency: s.currency,
      depositRule: {
        percentBps: s.depositPercentBps,
        min: s.depositMin,
        max: s.depositMax,
        currency: s.currency,
      },
      depositPerUnit: unitDeposit(s),
      packingList: parts.packing.get(s.id) ?? [],
      compatibleModelIds: compatible.map((c) => c.id),
      compatibleModels: compatible,
      photoIds: photos.map((p) => p.id),
      photos,
      unitCount: s.unitCount,
      activeUnitCount: s.activeUnitCount,
      editable: isFleetManagerOf(auth, s.lenderId),
    };
  });
}

/**
 * Models for the catalogue. Every signed-in person sees every lender's models: hospitals shop
 * across lenders, and a lender may compare with others' listings; only the owning lender's
 * fleet managers edit (`editable`).
 */
export async function listModels(
  deps: CatalogDeps,
  auth: AuthContext,
  query: ModelQuery,
): Promise<ModelPage> {
  const m = deps.dataSource.manager;
  const filter = {
    category: query.category,
    q: query.q,
    compatibleWith: query.compatibleWith,
    lenderId: query.lenderId,
  };
  const [summaries, counts] = await Promise.all([
    listModelSummaries(m, { ...filter, page: query }),
    countModels(m, filter),
  ]);
  return {
    items: await toModels(m, auth, summaries),
    total: counts.models,
    page: query.page,
    size: query.size,
    unitTotal: counts.units,
  };
}

/** One model; 404 when there is none. */
export async function getModel(deps: CatalogDeps, auth: AuthContext, id: number): Promise<Model> {
  const m = deps.dataSource.manager;
  const [summary] = await listModelSummaries(m, { ids: [id] });
  if (!summary) throw AppError.notFound('model_not_found', 'There is no such model.');
  return (await toModels(m, auth, [summary]))[0]!;
}

/** Which lender a new model belongs to: the one given, or the person's only fleet-manager lender. */
function lenderForNewModel(auth: AuthContext, requested: number | undefined): number {
  const managed = organisationsWithRole(auth, ['fleet_manager']);
  if (requested !== undefined) {
    if (!managed.includes(requested)) {
      throw AppError.forbidden('forbidden', 'Only fleet managers of that lender can list models.');
    }
    return requested;
  }
  if (managed.length === 1) return managed[0]!;
  throw AppError.field(
    'lender_required',
    'lenderId',
    'You manage the fleet of several lenders: choose which one lists this model.',
  );
}

/** Checks the rule through @evalon/deposits so a rule it would refuse never reaches the table. */
function checkDepositRule(input: ModelInput): void {
  try {
    depositForModel(input.listValue, input.depositRule);
  } catch (error) {
    if (error instanceof DepositError) {
      throw AppError.field('invalid_deposit_rule', 'depositRule', error.message);
    }
    throw error;
  }
}

/** Compatible models must exist and belong to the same lender (a lender edits only its own). */
async function checkCompatibility(
  m: EntityManager,
  lenderId: number,
  modelId: number | null,
  ids: readonly number[],
): Promise<void> {
  if (modelId !== null && ids.includes(modelId)) {
    throw AppError.field(
      'invalid_compatibility',
      'compatibleModelIds',
      'A model cannot be listed as compatible with itself.',
    );
  }
  const found = await findModelsByIds(m, ids);
  const known = new Set(found.filter((f) => f.lenderId === lenderId).map((f) => f.id));
  const unknown = ids.filter((id) => !known.has(id));
  if (unknown.length) {
    throw AppError.field(
      'invalid_compatibility',
      'compatibleModelIds',
      `These models are not in your catalogue: ${unknown.join(', ')}.`,
    );
  }
}

function modelFields(input: ModelInput) {
  return {
    name: input.name,
    category: input.category,
    description: input.description,
    listValue: input.listValue,
    currency: input.currency,
    depositPercentBps: input.depositRule.percentBps,
    depositMin: input.depositRule.min,
    depositMax: input.depositRule.max,
  };
}

/** Lists a new model (fleet manager of the lender). */
export async function createModel(
  deps: CatalogDeps,
  auth: AuthContext,
  input: ModelInput,
): Promise<Model> {
  const lenderId = lenderForNewModel(auth, input.lenderId);
  checkDepositRule(input);
  const id = await deps.dataSource.transaction(async (m) => {
    const lender = await findOrganisationKind(m, lenderId);
    if (!lender || lender.kind !== 'lender') {
      throw AppError.field('not_a_lender', 'lenderId', 'Models are listed by lenders.');
    }
    if (await modelNameTaken(m, lenderId, input.name)) {
      throw AppError.conflict(
        'model_name_taken',
        `You already list a model named “${input.name}”.`,
      );
    }
    await checkCompatibility(m, lenderId, null, input.compatibleModelIds);
    const modelId = await insertModel(m, { lenderId, ...modelFields(input) }, deps.now());
    await replacePackingList(m, modelId, input.packingList);
    await replaceCompatibility(m, modelId, input.compatibleModelIds);
    return modelId;
  });
  return getModel(deps, auth, id);
}

/**
 * Loads a model for a change by its lender's fleet manager: 404 when it does not exist, 403
 * when the person may see it but not change it.
 */
export async function modelForChange(
  m: EntityManager,
  auth: AuthContext,
  modelId: number,
  lock = true,
) {
  const model = await findModel(m, modelId, lock);
  if (!model) throw AppError.notFound('model_not_found', 'There is no such model.');
  if (!isFleetManagerOf(auth, model.lenderId)) {
    throw AppError.forbidden(
      'forbidden',
      'Only fleet managers of the lender that lists this model can change it.',
    );
  }
  return model;
}

/** Replaces a model's fields, packing list and compatibility (fleet manager of its lender). */
export async function changeModel(
  deps: CatalogDeps,
  auth: AuthContext,
  modelId: number,
  input: ModelInput,
): Promise<Model> {
  checkDepositRule(input);
  await deps.dataSource.transaction(async (m) => {
    const model = await modelForChange(m, auth, modelId);
    if (input.lenderId !== undefined && input.lenderId !== model.lenderId) {
      throw AppError.field('lender_fixed', 'lenderId', 'A model cannot move to another lender.');
    }
    if (await modelNameTaken(m, model.lenderId, input.name, modelId)) {
      throw AppError.conflict(
        'model_name_taken',
        `You already list a model named “${input.name}”.`,
      );
    }
    await checkCompatibility(m, model.lenderId, modelId, input.compatibleModelIds);
    await updateModel(m, modelId, modelFields(input), deps.now());
    await replacePackingList(m, modelId, input.packingList);
    await replaceCompatibility(m, modelId, input.compatibleModelIds);
  });
  return getModel(deps, auth, modelId);
}

/**
 * The scope check of the routes that change a model (`PUT /api/models/:id`, its photos): 404 for
 * an unknown model, 403 for another lender's, before the body or upload is read. The use case
 * checks again under its lock.
 */
export async function assertModelChangeable(
  deps: CatalogDeps,
  auth: AuthContext,
  modelId: number,
): Promise<void> {
  await modelForChange(deps.dataSource.manager, auth, modelId, false);
}
