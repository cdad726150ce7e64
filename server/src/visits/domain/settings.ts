import type { HospitalVisitSettings, LenderVisitSettings } from '@evalon/contracts';
import { insertAuditEvent } from '../../audit';
import { AppError } from '../../errors';
import { managesOrganisation, type AuthContext } from '../../identity';
import {
  findLenderModelMinimums,
  findOrganisationThreshold,
  lockModel,
  setModelMinimum,
  setSignOffThreshold,
} from '../data-access/visit-repository';
import type { VisitDeps } from './deps';

/** 404 for an organisation that is not of `kind`; 403 unless the person manages it. */
async function checkManager(
  deps: VisitDeps,
  auth: AuthContext,
  organisationId: number,
  kind: 'lender' | 'hospital',
) {
  const org = await findOrganisationThreshold(deps.dataSource.manager, organisationId);
  if (!org || org.kind !== kind) {
    throw AppError.notFound('organisation_not_found', `There is no such ${kind}.`);
  }
  if (!managesOrganisation(auth, organisationId)) {
    throw AppError.forbidden(
      'forbidden',
      kind === 'lender'
        ? 'Only the lender’s fleet managers can change its visit settings.'
        : 'Only the hospital’s buyers can change its sign-off threshold.',
    );
  }
  return org;
}

/** Scope check before a body is read: 404 for an unknown model, 403 for another lender's. */
export async function checkModelManager(
  deps: VisitDeps,
  auth: AuthContext,
  modelId: number,
): Promise<void> {
  const [row]: { lenderId: number }[] = await deps.dataSource.manager.query(
    'SELECT lender_id AS lenderId FROM models WHERE id = ?',
    [modelId],
  );
  if (!row) throw AppError.notFound('model_not_found', 'There is no such model.');
  if (!managesOrganisation(auth, Number(row.lenderId))) {
    throw AppError.forbidden(
      'forbidden',
      'Only the lender’s fleet managers can change its visit settings.',
    );
  }
}

/** Scope check before a body is read: 404 unless a hospital, 403 unless its buyer. */
export async function checkHospitalManager(
  deps: VisitDeps,
  auth: AuthContext,
  hospitalId: number,
): Promise<void> {
  await checkManager(deps, auth, hospitalId, 'hospital');
}

/** The lender's models with their minimum supervised cases (own or the lender's default). */
export async function lenderSettings(
  deps: VisitDeps,
  auth: AuthContext,
  lenderId: number,
): Promise<LenderVisitSettings> {
  await checkManager(deps, auth, lenderId, 'lender');
  const { lenderDefault, models } = await findLenderModelMinimums(
    deps.dataSource.manager,
    lenderId,
  );
  return {
    lenderId,
    lenderDefault,
    models: models.map((x) => ({
      modelId: x.modelId,
      name: x.name,
      minSupervisedCases: x.own,
      effective: x.own ?? lenderDefault,
    })),
  };
}

/**
 * A lender's fleet manager sets a model's minimum supervised cases (null: back to the lender's
 * default). Matching reads it for every new candidate list and every offer; audited.
 */
export async function setModelMinimumSupervisedCases(
  deps: VisitDeps,
  auth: AuthContext,
  modelId: number,
  value: number | null,
): Promise<LenderVisitSettings> {
  const now = deps.now();
  const lenderId = await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const model = await lockModel(m, modelId);
    if (!model) throw AppError.notFound('model_not_found', 'There is no such model.');
    if (!managesOrganisation(auth, model.lenderId)) {
      throw AppError.forbidden(
        'forbidden',
        'Only the lender’s fleet managers can change its visit settings.',
      );
    }
    const before = (await findLenderModelMinimums(m, model.lenderId)).models.find(
      (x) => x.modelId === modelId,
    )?.own;
    await setModelMinimum(m, modelId, value, auth.user.id, now);
    await insertAuditEvent(m, {
      actorUserId: auth.user.id,
      organisationId: model.lenderId,
      action: 'visit_settings.min_supervised_cases',
      subject: `model:${modelId}`,
      detail: { modelName: model.name, from: before ?? null, to: value },
      at: now,
    });
    return model.lenderId;
  });
  return lenderSettings(deps, auth, lenderId);
}

/** The hospital's sign-off threshold. */
export async function hospitalSettings(
  deps: VisitDeps,
  auth: AuthContext,
  hospitalId: number,
): Promise<HospitalVisitSettings> {
  const org = await checkManager(deps, auth, hospitalId, 'hospital');
  return { hospitalId, name: org.name, signOffThreshold: org.signOffThreshold };
}

/**
 * A hospital's buyer sets the sign-off threshold: cases performed under supervision before a
 * proctor may sign a trainee off. Sign-offs already given keep the threshold they were given
 * under (stored on each); audited.
 */
export async function setHospitalSignOffThreshold(
  deps: VisitDeps,
  auth: AuthContext,
  hospitalId: number,
  value: number,
): Promise<HospitalVisitSettings> {
  await checkManager(deps, auth, hospitalId, 'hospital');
  const now = deps.now();
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const org = (await findOrganisationThreshold(m, hospitalId, true))!;
    await setSignOffThreshold(m, hospitalId, value);
    await insertAuditEvent(m, {
      actorUserId: auth.user.id,
      organisationId: hospitalId,
      action: 'visit_settings.sign_off_threshold',
      subject: `organisation:${hospitalId}`,
      detail: { from: org.signOffThreshold, to: value },
      at: now,
    });
  });
  return hospitalSettings(deps, auth, hospitalId);
}
