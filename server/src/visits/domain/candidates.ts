import type { Candidate } from '@evalon/contracts';
import { AppError } from '../../http/errors';
import type { AuthContext } from '../../identity/domain/auth-context';
import { findCampus, findModelSettings } from '../data-access/visit-repository';
import type { VisitDeps } from './deps';
import { matchVisit } from './matching';
import { isRequesterOf } from './scope';

/**
 * Every proctor for a visit request, ranked by the matching package: the eligible first by
 * score with the reasons, then the others with why they are excluded.
 */
export async function listCandidates(
  deps: VisitDeps,
  auth: AuthContext,
  query: { siteId: number; modelId: number; from: string; to: string; language?: string },
): Promise<Candidate[]> {
  const m = deps.dataSource.manager;
  const [campus, model] = await Promise.all([
    findCampus(m, query.siteId),
    findModelSettings(m, query.modelId),
  ]);
  if (!campus || campus.kind !== 'campus') {
    throw AppError.notFound('site_not_found', 'There is no such campus.');
  }
  if (!auth.isPlatformAdmin && !isRequesterOf(auth, campus.organisationId)) {
    throw AppError.forbidden(
      'forbidden',
      'Only the campus’s hospital can look for proctors there.',
    );
  }
  if (!model) throw AppError.notFound('model_not_found', 'There is no such model.');
  const matches = await matchVisit(
    m,
    {
      campus,
      modelId: model.id,
      minSupervisedCases: model.minSupervisedCases,
      from: query.from,
      to: query.to,
      cases: 1,
      language: query.language ?? null,
    },
    deps.settings,
    deps.now(),
  );
  return matches.map((x) => ({
    proctorId: Number(x.proctorId),
    name: x.name,
    eligible: x.eligible,
    score: x.score,
    reasons: x.reasons,
    exclusions: x.exclusions,
    distanceKm: x.distanceKm,
    travelDays: x.travelDays,
    feeEstimate: x.feeEstimate,
  }));
}
