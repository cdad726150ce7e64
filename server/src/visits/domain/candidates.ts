import type { Candidate } from '@evalon/contracts';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import {
  candidateDataVersion,
  findCampus,
  findModelSettings,
  type CampusRow,
} from '../data-access/visit-repository';
import type { VisitDeps } from './deps';
import { matchVisit } from './matching';
import { isRequesterOf } from './scope';

/** How long a ranked list may be served again for the same search and the same data. */
const cacheTtlMs = 60_000;
const cacheSize = 200;
/**
 * A ranked list and its JSON answer, computed once per key: concurrent first searches wait for
 * the same computation instead of each ranking a thousand proctors, and repeats are served
 * the serialised answer (about 0.5 MB for 1,000 proctors) without serialising it again.
 */
interface Ranked {
  items: Candidate[];
  json: string;
}
const cache = new Map<string, { at: number; ranked: Promise<Ranked> }>();

/** {@link listCandidates} as the route answers it: `{"items": [...]}` serialised once per list. */
export async function candidatesJson(
  deps: VisitDeps,
  auth: AuthContext,
  query: { siteId: number; modelId: number; from: string; to: string; language?: string },
): Promise<string> {
  return (await rankCandidates(deps, auth, query)).json;
}

/**
 * Every proctor for a visit request, ranked by the matching package: the eligible first by
 * score with the reasons, then the others with why they are excluded.
 */
export async function listCandidates(
  deps: VisitDeps,
  auth: AuthContext,
  query: { siteId: number; modelId: number; from: string; to: string; language?: string },
): Promise<Candidate[]> {
  return (await rankCandidates(deps, auth, query)).items;
}

async function rankCandidates(
  deps: VisitDeps,
  auth: AuthContext,
  query: { siteId: number; modelId: number; from: string; to: string; language?: string },
): Promise<Ranked> {
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
  // The ranking of a thousand proctors takes the matching package a large fraction of a second
  // (recurrence rules are read for each). The same search is served again for a minute as long
  // as nothing it reads has changed: the key holds a version of every table it reads (profiles,
  // credentials, visits, offers), so a change is seen on the next search. Accepting an offer
  // never uses this list: it matches again under the proctor's lock.
  const now = deps.now();
  const key = JSON.stringify([
    query,
    model.minSupervisedCases,
    deps.settings.travelDayThresholdKm,
    now.toISOString().slice(0, 10),
    await candidateDataVersion(m),
  ]);
  const hit = cache.get(key);
  if (hit && now.getTime() - hit.at < cacheTtlMs) return hit.ranked;
  const ranked = rank(deps, campus, model, query);
  if (cache.size >= cacheSize) cache.delete(cache.keys().next().value!);
  cache.set(key, { at: now.getTime(), ranked });
  // A failed ranking is not kept: the next search tries again.
  ranked.catch(() => {
    if (cache.get(key)?.ranked === ranked) cache.delete(key);
  });
  return ranked;
}

async function rank(
  deps: VisitDeps,
  campus: CampusRow,
  model: { id: number; minSupervisedCases: number },
  query: { from: string; to: string; language?: string },
): Promise<Ranked> {
  const matches = await matchVisit(
    deps.dataSource.manager,
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
  const items: Candidate[] = matches.map((x) => ({
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
  return { items, json: JSON.stringify({ items }) };
}
