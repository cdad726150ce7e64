import type { DataSource, EntityManager } from 'typeorm';
import type { Logger } from 'pino';
import {
  availabilityHorizonDays,
  estimateCaution,
  maxUseWindowDays,
  type AlternativeItem,
  type AlternativesQuery,
  type AvailabilityItem,
  type AvailabilityQuery,
  type AvailabilityResponse,
} from '@evalon/contracts';
import { addCalendarDays, publicHolidays, toSiteDate, windowLengthDays } from '@evalon/scheduling';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import {
  findSiteWithOrganisation,
  type SiteWithOrganisation,
  findHoldsForUnits,
  type HoldInterval,
  worksForHospital,
  toSchedulingSettings,
  type LenderSettingsCache,
} from '../../catalog';
import {
  compatibleModelsOf,
  findCandidates,
  modelsBorrowedBefore,
  type CandidateUnit,
} from '../data-access/availability-repository';
import {
  compareItems,
  evaluateUnits,
  holdRange,
  planFor,
  type EvaluationContext,
  type LenderPlanSettings,
  type UnitEvaluation,
} from './engine';
import type { PlannerCache } from './planner-cache';
import type { SiteCache } from './site-cache';

/** What the availability use cases need. */
export interface AvailabilityDeps {
  dataSource: DataSource;
  logger: Logger;
  settingsCache: LenderSettingsCache;
  plans: PlannerCache;
  /** Sites for the search (booking reads them fresh); optional so callers may skip caching. */
  sites?: SiteCache;
  now: () => Date;
}

/** Most units one search answers with (narrow the search for more). */
export const maxSearchResults = 500;
/** Alternatives offered per blocked unit. */
export const alternativesPerUnit = 5;

/** How far ahead a loan may be booked, in days. */
export const maxBookingAheadDays = 730;

/** A campus of the caller's hospital, with the hospital. */
export interface Campus {
  site: SiteWithOrganisation;
  hospitalId: number;
}

/**
 * The hospital campus a search or a booking is for. It must be a campus of a hospital the
 * person works for; anything else (unknown id, a depot, another hospital's campus) is the same
 * 422 so that site ids of other organisations do not leak.
 */
export async function resolveCampus(
  m: EntityManager,
  auth: AuthContext,
  siteId: number,
  cache?: SiteCache,
): Promise<Campus> {
  const site = await (cache ? cache.get(m, siteId) : findSiteWithOrganisation(m, siteId));
  if (
    !site ||
    site.kind !== 'campus' ||
    site.organisationKind !== 'hospital' ||
    !worksForHospital(auth, site.organisationId)
  ) {
    throw AppError.field('invalid_site', 'siteId', 'Choose one of your hospital’s campuses.');
  }
  try {
    publicHolidays(site.country, new Date().getUTCFullYear());
  } catch {
    throw AppError.field(
      'unknown_holiday_calendar',
      'siteId',
      `We have no public-holiday calendar for this campus’s country (${site.country}).`,
    );
  }
  return { site, hospitalId: site.organisationId };
}

/**
 * Checks a use window against today at the campus: not in the past, at most
 * {@link maxUseWindowDays} long, at most {@link maxBookingAheadDays} ahead. Throws a 422 with
 * field messages.
 */
export function checkUseWindow(
  useFrom: string,
  useTo: string,
  site: { timeZone: string },
  now: Date,
): void {
  const today = toSiteDate(now, site.timeZone);
  const problems: Record<string, string[]> = {};
  if (useFrom < today) problems.useFrom = ['The first case day is in the past.'];
  else if (useFrom > addCalendarDays(today, maxBookingAheadDays)) {
    problems.useFrom = ['Loans can be booked at most two years ahead.'];
  }
  if (useTo >= useFrom && windowLengthDays(useFrom, useTo) > maxUseWindowDays) {
    problems.useTo = [`A loan covers at most ${maxUseWindowDays} days of cases.`];
  }
  if (Object.keys(problems).length) {
    throw new AppError(422, 'invalid_window', Object.values(problems)[0]![0]!, {
      fieldErrors: problems,
      formErrors: [],
    });
  }
}

/** Each lender's settings, through the cache, in the scheduling package's shape. */
async function settingsFor(
  deps: Pick<AvailabilityDeps, 'settingsCache'>,
  m: EntityManager,
  lenderIds: Iterable<number>,
): Promise<Map<number, LenderPlanSettings>> {
  const ids = [...new Set(lenderIds)];
  const loaded = await Promise.all(ids.map((id) => deps.settingsCache.get(m, id)));
  return new Map(
    ids.map((id, i) => [
      id,
      { settings: toSchedulingSettings(loaded[i]!.settings), version: loaded[i]!.version },
    ]),
  );
}

/** Groups holds by unit id. */
export function holdsByUnit(holds: readonly HoldInterval[]): Map<number, HoldInterval[]> {
  const map = new Map<number, HoldInterval[]>();
  for (const h of holds) {
    const list = map.get(h.unitId);
    if (list) list.push(h);
    else map.set(h.unitId, [h]);
  }
  return map;
}

/** The window and place an evaluation is for. */
export interface WindowRequest {
  campus: Campus;
  useFrom: string;
  useTo: string;
}

/**
 * Evaluates units for a window: settings (cached) and first-loan facts, then ONE query for all
 * their holds in the range that can matter, then everything in memory.
 */
export async function evaluateForWindow(
  deps: AvailabilityDeps,
  m: EntityManager,
  units: readonly CandidateUnit[],
  request: WindowRequest,
): Promise<UnitEvaluation[]> {
  if (units.length === 0) return [];
  // Candidates read for this hospital carry the first-loan fact; otherwise ask for it.
  const known = units.every((u) => u.borrowedBefore !== undefined);
  const [settingsByLender, borrowedBefore] = await Promise.all([
    settingsFor(
      deps,
      m,
      units.map((u) => u.lenderId),
    ),
    known
      ? new Set(units.filter((u) => u.borrowedBefore).map((u) => u.modelId))
      : modelsBorrowedBefore(m, request.campus.hospitalId, [
          ...new Set(units.map((u) => u.modelId)),
        ]),
  ]);
  const { site } = request.campus;
  const ctx: EvaluationContext = {
    site: {
      id: site.id,
      latitude: site.latitude,
      longitude: site.longitude,
      country: site.country,
      timeZone: site.timeZone,
    },
    hospitalId: request.campus.hospitalId,
    useFrom: request.useFrom,
    useTo: request.useTo,
    now: deps.now(),
    horizonDays: availabilityHorizonDays,
    settingsByLender,
    borrowedBefore,
    plans: deps.plans,
    local: new Map(),
  };
  const plannable: CandidateUnit[] = [];
  const plans = [];
  for (const unit of units) {
    try {
      plans.push(planFor(unit, ctx));
      plannable.push(unit);
    } catch (err) {
      // A depot with data the scheduler refuses (e.g. a country without a holiday calendar)
      // must not take the whole search down; the unit is left out and the fault logged.
      deps.logger.warn({ err, unitId: unit.unitId }, 'unit left out of availability');
    }
  }
  const range = holdRange(plans, ctx.horizonDays);
  const holds = await findHoldsForUnits(
    m,
    plannable.map((u) => u.unitId),
    range.from,
    range.to,
  );
  return evaluateUnits(plannable, holdsByUnit(holds), ctx);
}

/** `GET /api/availability`: every active unit of the matching models for the window. */
export async function searchAvailability(
  deps: AvailabilityDeps,
  auth: AuthContext,
  query: AvailabilityQuery,
): Promise<AvailabilityResponse> {
  const m = deps.dataSource.manager;
  const campus = await resolveCampus(m, auth, query.siteId, deps.sites);
  checkUseWindow(query.useFrom, query.useTo, campus.site, deps.now());
  const units = await findCandidates(m, {
    modelId: query.modelId,
    category: query.category,
    q: query.q,
    compatibleWith: query.compatibleWith,
    activeOnly: true,
    hospitalId: campus.hospitalId,
    limit: maxSearchResults + 1,
  });
  const truncated = units.length > maxSearchResults;
  const evaluations = await evaluateForWindow(deps, m, units.slice(0, maxSearchResults), {
    campus,
    useFrom: query.useFrom,
    useTo: query.useTo,
  });
  return {
    items: evaluations.map((e) => e.item).sort(compareItems),
    horizonDays: availabilityHorizonDays,
    truncated,
    caution: estimateCaution,
  };
}

/**
 * Units that could stand in for `blocked` units in the same window: other units of the same
 * model first, then units of compatible models; only units that fit, never any of
 * `excludeUnitIds`. At most {@link alternativesPerUnit} per blocked unit.
 */
export async function alternativesFor(
  deps: AvailabilityDeps,
  m: EntityManager,
  blocked: readonly CandidateUnit[],
  excludeUnitIds: readonly number[],
  request: WindowRequest,
): Promise<AlternativeItem[]> {
  if (blocked.length === 0) return [];
  const blockedModels = [...new Set(blocked.map((u) => u.modelId))];
  const compatible = await compatibleModelsOf(m, blockedModels);
  const modelIds = new Set(blockedModels);
  for (const set of compatible.values()) for (const id of set) modelIds.add(id);
  const candidates = await findCandidates(m, {
    modelIds: [...modelIds],
    excludeUnitIds,
    activeOnly: true,
    hospitalId: request.campus.hospitalId,
    limit: maxSearchResults,
  });
  const evaluations = await evaluateForWindow(deps, m, candidates, request);
  const fitting = evaluations
    .map((e) => e.item)
    .filter((i) => i.feasible)
    .sort(compareItems);
  const result: AlternativeItem[] = [];
  const offered = new Set<number>();
  for (const unit of blocked) {
    const compatibleIds = compatible.get(unit.modelId) ?? new Set<number>();
    const same = fitting.filter((i) => i.modelId === unit.modelId);
    const other = fitting.filter((i) => compatibleIds.has(i.modelId));
    const picks: AlternativeItem[] = [
      ...same.map((i) => ({ ...i, forUnitId: unit.unitId, relation: 'same_model' as const })),
      ...other.map((i) => ({
        ...i,
        forUnitId: unit.unitId,
        relation: 'compatible_model' as const,
      })),
    ]
      .filter((i) => !offered.has(i.unitId))
      .slice(0, alternativesPerUnit);
    for (const p of picks) offered.add(p.unitId);
    result.push(...picks);
  }
  return result;
}

/** `GET /api/availability/alternatives`: stand-ins for one unit in a window. */
export async function searchAlternatives(
  deps: AvailabilityDeps,
  auth: AuthContext,
  query: AlternativesQuery,
): Promise<AlternativeItem[]> {
  const m = deps.dataSource.manager;
  const campus = await resolveCampus(m, auth, query.siteId);
  checkUseWindow(query.useFrom, query.useTo, campus.site, deps.now());
  const [unit] = await findCandidates(m, {
    unitIds: [query.unitId],
    activeOnly: false,
    limit: 1,
  });
  if (!unit || unit.status === 'retired') {
    throw AppError.notFound('unit_not_found', 'There is no such unit.');
  }
  return alternativesFor(deps, m, [unit], [unit.unitId], {
    campus,
    useFrom: query.useFrom,
    useTo: query.useTo,
  });
}

/** Re-exported for the booking use case, which evaluates conflicts the same way. */
export type { AvailabilityItem };
