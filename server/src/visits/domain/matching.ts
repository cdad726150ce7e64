import type { EntityManager } from 'typeorm';
import { addCalendarDays } from '@evalon/scheduling';
import {
  matchProctors,
  type Proctor,
  type ProctorMatch,
  type VisitRequest,
} from '@evalon/matching';
import {
  findBusyRanges,
  findCredentials,
  findExperience,
  findProfiles,
  type ProctorProfileRow,
} from '../../proctors';
import { lastOfferedAt } from '../data-access/visit-repository';
import type { CampusRow } from '../data-access/visit-repository';
import type { VisitSettings } from './deps';

/** What a visit asks for, in the server's terms. */
export interface VisitAsk {
  campus: CampusRow;
  modelId: number;
  minSupervisedCases: number;
  from: string;
  to: string;
  cases: number;
  language?: string | null;
}

/**
 * Loads proctors (all, or the given ones) into the matching package's shape: profile,
 * experience (declared + recorded), credentials, availability, accepted visits (busy days
 * including travel, optionally leaving one visit out) and when each was last offered work.
 */
export async function loadCandidates(
  m: EntityManager,
  userIds: readonly number[] | null,
  excludeVisitId?: number,
  within?: { from: string; to: string },
): Promise<Proctor[]> {
  const profiles: ProctorProfileRow[] = await findProfiles(m, userIds ?? undefined);
  const ids = profiles.map((p) => p.userId);
  if (ids.length === 0) return [];
  const [experience, credentials, busy, offered] = await Promise.all([
    findExperience(m, ids),
    findCredentials(m, ids),
    findBusyRanges(m, userIds ? ids : null, excludeVisitId, within),
    lastOfferedAt(m, userIds ? ids : null),
  ]);
  const byProctor = <T extends { proctorUserId: number }>(rows: T[]) => {
    const map = new Map<number, T[]>();
    for (const r of rows) map.set(r.proctorUserId, [...(map.get(r.proctorUserId) ?? []), r]);
    return map;
  };
  const exp = byProctor(experience);
  const creds = byProctor(credentials);
  const busyOf = byProctor(busy);
  return profiles.map((p): Proctor => ({
    id: String(p.userId),
    name: p.displayName,
    home: {
      lat: p.homeLatitude,
      lng: p.homeLongitude,
      zone: p.homeTimeZone,
      country: p.homeCountry,
    },
    travelRadiusKm: p.travelRadiusKm,
    languages: p.languages,
    dayRate: { amount: p.dayRate, currency: p.currency },
    travelDayRate: { amount: p.travelDayRate, currency: p.currency },
    experience: Object.fromEntries(
      (exp.get(p.userId) ?? []).map((e) => [String(e.modelId), e.declared + e.recorded]),
    ),
    credentials: (creds.get(p.userId) ?? []).map((c) => ({
      kind: c.kind,
      jurisdiction: c.jurisdiction,
      validFrom: c.validFrom,
      validTo: c.validTo,
    })),
    availability: p.availability,
    acceptedVisits: (busyOf.get(p.userId) ?? []).map((b) => ({
      from: b.from,
      to: b.to,
      visitId: String(b.visitId),
    })),
    lastOfferedAt: offered.get(p.userId)?.toISOString() ?? null,
  }));
}

/** The matching package's request for a visit. */
export function visitRequest(ask: VisitAsk): VisitRequest {
  return {
    site: {
      lat: ask.campus.latitude,
      lng: ask.campus.longitude,
      zone: ask.campus.timeZone,
      country: ask.campus.country,
      ...(ask.campus.subdivision ? { subdivision: ask.campus.subdivision } : {}),
    },
    modelId: String(ask.modelId),
    visit: { from: ask.from, to: ask.to },
    cases: ask.cases,
    ...(ask.language ? { language: ask.language } : {}),
  };
}

/** Every proctor (or the given ones) matched and ranked by the matching package. */
export async function matchVisit(
  m: EntityManager,
  ask: VisitAsk,
  settings: VisitSettings,
  now: Date,
  options: { userIds?: readonly number[]; excludeVisitId?: number } = {},
): Promise<ProctorMatch[]> {
  // Only accepted visits near the request can overlap its footprint (at most one travel day
  // either side): a week either side is ample and keeps the read small.
  const within = { from: addCalendarDays(ask.from, -7), to: addCalendarDays(ask.to, 7) };
  const proctors = await loadCandidates(m, options.userIds ?? null, options.excludeVisitId, within);
  return matchProctors(visitRequest(ask), proctors, now, {
    minSupervisedCases: ask.minSupervisedCases,
    travelDayThresholdKm: settings.travelDayThresholdKm,
  });
}
