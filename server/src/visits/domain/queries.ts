import type { EntityManager } from 'typeorm';
import type { Visit, VisitDetail, VisitOffer, VisitState } from '@evalon/contracts';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import {
  findCampus,
  findCases,
  findClinicians,
  findOffers,
  findSignOffs,
  findVisitEvents,
  findVisitView,
  listVisitViews,
  type OfferView,
  type VisitView,
} from '../data-access/visit-repository';
import { isRequesterOf } from './scope';

const iso = (d: Date | null) => (d ? d.toISOString() : null);

function toOffer(o: OfferView): VisitOffer {
  return {
    id: o.id,
    proctorId: o.proctorUserId,
    proctorName: o.proctorName,
    position: o.position,
    state: o.state,
    score: o.score,
    offeredAt: iso(o.offeredAt),
    deadlineAt: iso(o.deadlineAt),
    answeredAt: iso(o.answeredAt),
    reason: o.reason,
  };
}

function toVisit(v: VisitView, current: OfferView | null): Visit {
  return {
    id: v.id,
    reference: v.reference,
    kind: v.kind,
    state: v.state,
    hospitalId: v.hospitalId,
    hospitalName: v.hospitalName,
    siteId: v.siteId,
    siteName: v.siteName,
    siteTimeZone: v.siteTimeZone,
    jurisdiction: v.jurisdiction,
    modelId: v.modelId,
    modelName: v.modelName,
    loanId: v.loanId,
    from: v.visitFrom,
    to: v.visitTo,
    cases: v.cases,
    language: v.language,
    note: v.note,
    proctorId: v.proctorUserId,
    proctorName: v.proctorName,
    busyFrom: v.busyFrom,
    busyTo: v.busyTo,
    travelDays: v.travelDays,
    feeEstimate:
      v.feeAmount !== null && v.feeCurrency
        ? { amount: v.feeAmount, currency: v.feeCurrency }
        : null,
    currentOffer: current ? toOffer(current) : null,
    createdAt: v.createdAt.toISOString(),
  };
}

/**
 * Whether the person may see the visit: the hospital's buyers and clinicians, the admin, and
 * proctors who were offered it (a queued candidate does not see it before the offer reaches them).
 */
export function canSeeVisit(
  auth: AuthContext,
  visit: { hospitalId: number },
  offers: readonly { proctorUserId: number; state: string }[],
): boolean {
  if (auth.isPlatformAdmin || isRequesterOf(auth, visit.hospitalId)) return true;
  return offers.some((o) => o.proctorUserId === auth.user.id && o.state !== 'queued');
}

/**
 * Refuses (404) a visit the person may not see: the scope check of the `/api/visits/:id/...`
 * routes that take a body, run before the body is validated. The use case checks again (and the
 * person's part in the visit) under its lock.
 */
export async function assertVisitVisible(
  m: EntityManager,
  auth: AuthContext,
  visitId: number,
): Promise<void> {
  const view = await findVisitView(m, visitId);
  const offers = view ? await findOffers(m, visitId) : [];
  if (!view || !canSeeVisit(auth, view, offers)) {
    throw AppError.notFound('visit_not_found', 'There is no such visit.');
  }
}

/** One visit with offers, events, cases and sign-offs; 404 when missing or not the person's. */
export async function getVisit(
  m: EntityManager,
  auth: AuthContext,
  visitId: number,
): Promise<VisitDetail> {
  const view = await findVisitView(m, visitId);
  const offers = view ? await findOffers(m, visitId) : [];
  if (!view || !canSeeVisit(auth, view, offers)) {
    throw AppError.notFound('visit_not_found', 'There is no such visit.');
  }
  const hospitalSide = auth.isPlatformAdmin || isRequesterOf(auth, view.hospitalId);
  const [events, cases, signOffs, campus, trainees] = await Promise.all([
    findVisitEvents(m, visitId),
    findCases(m, visitId),
    findSignOffs(m, visitId),
    findCampus(m, view.siteId),
    findClinicians(m, view.hospitalId),
  ]);
  const current = offers.find((o) => o.state === 'offered') ?? null;
  // A proctor sees their own offer only, not who else was lined up or why they declined.
  const visibleOffers = hospitalSide
    ? offers
    : offers.filter((o) => o.proctorUserId === auth.user.id);
  return {
    ...toVisit(
      view,
      current && (hospitalSide || current.proctorUserId === auth.user.id) ? current : null,
    ),
    offers: visibleOffers.map(toOffer),
    events: events
      .filter((e) => hospitalSide || e.proctorUserId === null || e.proctorUserId === auth.user.id)
      .map((e) => ({
        id: e.id,
        at: e.at.toISOString(),
        kind: e.kind,
        fromState: e.fromState,
        toState: e.toState,
        actorName: e.actorName,
        proctorName: e.proctorName,
        reason: e.reason,
      })),
    caseRecords: cases.map((c) => ({
      id: c.id,
      caseNumber: c.caseNumber,
      traineeUserId: c.traineeUserId,
      traineeName: c.traineeName,
      traineeRole: c.traineeRole,
      ratings: c.ratings,
      notes: c.notes,
      createdAt: c.createdAt.toISOString(),
    })),
    signOffs: signOffs.map((s) => ({
      id: s.id,
      traineeUserId: s.traineeUserId,
      traineeName: s.traineeName,
      proctorName: s.proctorName,
      proctoredCases: s.proctoredCases,
      threshold: s.threshold,
      statement: s.statement,
      signedAt: s.signedAt.toISOString(),
    })),
    signOffThreshold: campus?.signOffThreshold ?? 3,
    trainees,
  };
}

/** Visits the person may see, newest first: their hospitals' and the ones offered to them. */
export async function listVisits(
  m: EntityManager,
  auth: AuthContext,
  query: { state?: VisitState; role?: 'hospital' | 'proctor' },
): Promise<Visit[]> {
  const hospitalIds = [
    ...new Set(
      auth.user.memberships
        .filter((ms) => ms.role === 'buyer' || ms.role === 'clinician')
        .map((ms) => ms.organisationId),
    ),
  ];
  const isProctor = auth.user.memberships.some((ms) => ms.role === 'proctor');
  const views = await listVisitViews(
    m,
    {
      hospitalIds: query.role === 'proctor' ? [] : hospitalIds,
      proctorUserId: isProctor && query.role !== 'hospital' ? auth.user.id : null,
      all: auth.isPlatformAdmin && !query.role,
    },
    query.state,
  );
  const result: Visit[] = [];
  for (const v of views) {
    let current: OfferView | null = null;
    if (v.state === 'offered') {
      const offers = await findOffers(m, v.id);
      const live = offers.find((o) => o.state === 'offered') ?? null;
      const mine = live && live.proctorUserId === auth.user.id;
      current =
        live && (mine || isRequesterOf(auth, v.hospitalId) || auth.isPlatformAdmin) ? live : null;
    }
    result.push(toVisit(v, current));
  }
  return result;
}
