import type { EntityManager } from 'typeorm';
import type { CreateVisitRequest, VisitDetail } from '@evalon/contracts';
import { toSiteDate } from '@evalon/scheduling';
import { insertAuditEvent } from '../../audit';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { findProfile } from '../../proctors';
import {
  claimVisitsWithExpiredOffers,
  closeQueuedOffers,
  findCampus,
  findLoanForVisit,
  findModelSettings,
  findOffers,
  insertOffers,
  insertVisit,
  insertVisitEvent,
  requeuePassedOver,
  setOfferState,
  updateVisit,
} from '../data-access/visit-repository';
import { findVisit } from '../data-access/visit-repository';
import type { VisitRow } from '../data-access/entities';
import type { VisitDeps } from './deps';
import { matchVisit, type VisitAsk } from './matching';
import { canSeeVisit, getVisit } from './queries';
import { isRequesterOf } from './scope';
import { canDo, illegalMessage } from './state-machine';

/** Longest visit accepted, in days (a guard against typing errors; common practice is 1–3). */
export const maxVisitDays = 14;
/** Loan states in which a visit may be asked for from the loan's page. */
const visitableLoanStates = ['confirmed', 'shipped', 'delivered'];

function dayCount(from: string, to: string): number {
  return (
    Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000) + 1
  );
}

/** The ask of a stored visit, for matching again. */
export async function askOf(m: EntityManager, visit: VisitRow): Promise<VisitAsk> {
  const [campus, model] = await Promise.all([
    findCampus(m, visit.siteId),
    findModelSettings(m, visit.modelId),
  ]);
  if (!campus || !model) throw new Error(`visit ${visit.id} lost its campus or model`);
  return {
    campus,
    modelId: visit.modelId,
    minSupervisedCases: model.minSupervisedCases,
    from: visit.visitFrom,
    to: visit.visitTo,
    cases: visit.cases,
    language: visit.language,
  };
}

/**
 * Offers the visit to the next queued candidate who is still eligible (each is matched again:
 * a proctor may have accepted other work or let a licence lapse since the list was made);
 * candidates no longer eligible are skipped with the reasons. With nobody left the visit is
 * `unfilled` and the requester is told. Runs under the visit's row lock.
 */
export async function offerNext(
  m: EntityManager,
  deps: VisitDeps,
  visit: VisitRow,
  actorUserId: number | null,
  now: Date,
): Promise<void> {
  const ask = await askOf(m, visit);
  const offers = await findOffers(m, visit.id);
  for (const offer of offers.filter((o) => o.state === 'queued')) {
    const [match] = await matchVisit(m, ask, deps.settings, now, {
      userIds: [offer.proctorUserId],
    });
    if (!match?.eligible) {
      const reason = match ? match.exclusions.join(' ') : 'The proctor is no longer active.';
      await setOfferState(m, offer.id, 'skipped', { reason });
      await insertVisitEvent(
        m,
        {
          visitId: visit.id,
          actorUserId: null,
          kind: 'skipped',
          fromState: visit.state,
          toState: visit.state,
          proctorUserId: offer.proctorUserId,
          reason,
        },
        now,
      );
      continue;
    }
    const deadlineAt = new Date(now.getTime() + deps.settings.offerHours * 3_600_000);
    await setOfferState(m, offer.id, 'offered', { offeredAt: now, deadlineAt });
    if (visit.state !== 'offered') await updateVisit(m, visit.id, { state: 'offered' }, now);
    await insertVisitEvent(
      m,
      {
        visitId: visit.id,
        actorUserId,
        kind: 'offered',
        fromState: visit.state,
        toState: 'offered',
        proctorUserId: offer.proctorUserId,
        reason: null,
      },
      now,
    );
    await deps.notifyVisitEvent(m, {
      visitId: visit.id,
      event: 'offered',
      actorUserId,
      proctorUserId: offer.proctorUserId,
    });
    return;
  }
  await updateVisit(m, visit.id, { state: 'unfilled' }, now);
  await insertVisitEvent(
    m,
    {
      visitId: visit.id,
      actorUserId,
      kind: 'unfilled',
      fromState: visit.state,
      toState: 'unfilled',
      proctorUserId: null,
      reason: 'Every candidate declined, let the offer lapse or is no longer eligible.',
    },
    now,
  );
  await deps.notifyVisitEvent(m, { visitId: visit.id, event: 'unfilled', actorUserId });
}

/**
 * Picks the candidates of a visit in offer order: the requester's picks (each must exist and be
 * eligible now, else 422 naming the pick) or the top eligible ones by rank.
 */
async function pickCandidates(
  m: EntityManager,
  deps: VisitDeps,
  ask: VisitAsk,
  now: Date,
  proctorIds: readonly number[] | undefined,
  field: string,
): Promise<{ proctorUserId: number; score: number | null }[]> {
  if (proctorIds) {
    const duplicate = proctorIds.findIndex((p, i) => proctorIds.indexOf(p) !== i);
    if (duplicate >= 0) {
      throw AppError.field(
        'duplicate_proctor',
        `${field}.${duplicate}`,
        'This proctor is already in the list.',
      );
    }
    const matches = await matchVisit(m, ask, deps.settings, now, { userIds: proctorIds });
    const byId = new Map(matches.map((x) => [Number(x.proctorId), x]));
    return proctorIds.map((pid, i) => {
      const match = byId.get(pid);
      if (!match)
        throw AppError.field('unknown_proctor', `${field}.${i}`, 'There is no such proctor.');
      if (!match.eligible) {
        throw AppError.field(
          'proctor_not_eligible',
          `${field}.${i}`,
          `${match.name} cannot take this visit: ${match.exclusions.join(' ')}`,
        );
      }
      return { proctorUserId: pid, score: match.score };
    });
  }
  const matches = await matchVisit(m, ask, deps.settings, now);
  const eligible = matches.filter((x) => x.eligible).slice(0, deps.settings.autoCandidates);
  if (eligible.length === 0) {
    throw AppError.conflict(
      'no_eligible_proctor',
      'No proctor fits this visit (licence, availability, distance, language or experience). Try other days or another language.',
    );
  }
  return eligible.map((x) => ({ proctorUserId: Number(x.proctorId), score: x.score }));
}

/**
 * A hospital buyer or clinician asks for a visit: the campus, model and (optionally) the
 * confirmed loan are checked, candidates picked, and the visit, its candidate list, its events
 * and the first offer are written in one transaction. Bad input answers 4xx with nothing written.
 */
export async function requestVisit(
  deps: VisitDeps,
  auth: AuthContext,
  body: CreateVisitRequest,
): Promise<VisitDetail> {
  const now = deps.now();
  const visitId = await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const campus = await findCampus(m, body.siteId);
    if (!campus || campus.kind !== 'campus') {
      throw AppError.field('invalid_site', 'siteId', 'Choose a campus of your hospital.');
    }
    if (!isRequesterOf(auth, campus.organisationId)) {
      throw AppError.forbidden(
        'forbidden',
        'Only buyers and clinicians of the campus’s hospital can ask for a visit there.',
      );
    }
    const model = await findModelSettings(m, body.modelId);
    if (!model) throw AppError.field('unknown_model', 'modelId', 'There is no such model.');
    if (body.loanId !== undefined) {
      const loan = await findLoanForVisit(m, body.loanId);
      if (!loan || loan.hospitalId !== campus.organisationId) {
        throw AppError.field('unknown_loan', 'loanId', 'There is no such loan of your hospital.');
      }
      if (loan.siteId !== campus.id) {
        throw AppError.field('loan_elsewhere', 'loanId', 'The loan goes to another campus.');
      }
      if (!loan.modelIds.includes(model.id)) {
        throw AppError.field('loan_model', 'modelId', 'The loan has no unit of this model.');
      }
      if (!visitableLoanStates.includes(loan.state)) {
        throw AppError.field(
          'loan_not_confirmed',
          'loanId',
          `The loan is ${loan.state}; ask for a proctor once it is confirmed.`,
        );
      }
    }
    if (body.from < toSiteDate(now, campus.timeZone)) {
      throw AppError.field('invalid_window', 'from', 'The visit cannot start in the past.');
    }
    if (dayCount(body.from, body.to) > maxVisitDays) {
      throw AppError.field('invalid_window', 'to', `A visit lasts at most ${maxVisitDays} days.`);
    }
    const ask: VisitAsk = {
      campus,
      modelId: model.id,
      minSupervisedCases: model.minSupervisedCases,
      from: body.from,
      to: body.to,
      cases: body.cases,
      language: body.language ?? null,
    };
    const candidates = await pickCandidates(m, deps, ask, now, body.proctorIds, 'proctorIds');
    const { id } = await insertVisit(
      m,
      {
        kind: body.kind,
        hospitalId: campus.organisationId,
        siteId: campus.id,
        siteTimeZone: campus.timeZone,
        jurisdiction: campus.subdivision ?? campus.country,
        modelId: model.id,
        loanId: body.loanId ?? null,
        visitFrom: body.from,
        visitTo: body.to,
        cases: body.cases,
        language: body.language ?? null,
        note: body.note?.trim() || null,
        requestedByUserId: auth.user.id,
      },
      now,
    );
    await insertOffers(m, id, candidates);
    await insertVisitEvent(
      m,
      {
        visitId: id,
        actorUserId: auth.user.id,
        kind: 'requested',
        fromState: null,
        toState: 'requested',
        proctorUserId: null,
        reason: null,
      },
      now,
    );
    await offerNext(m, deps, (await findVisit(m, id, true))!, auth.user.id, now);
    return id;
  });
  return getVisit(deps.dataSource.manager, auth, visitId);
}

/**
 * Locks a visit for a step only its hospital's requesters take (widen, cancel): 404 when the
 * person may not see it, 403 when they are not one of its buyers or clinicians, 409 when its
 * state does not allow the step.
 */
async function lockRequesterVisit(
  m: EntityManager,
  auth: AuthContext,
  visitId: number,
  action: 'reopen' | 'cancel',
) {
  const visit = await findVisit(m, visitId, true);
  const offers = visit ? await findOffers(m, visitId) : [];
  if (!visit || !canSeeVisit(auth, visit, offers)) {
    throw AppError.notFound('visit_not_found', 'There is no such visit.');
  }
  if (!isRequesterOf(auth, visit.hospitalId)) {
    throw AppError.forbidden(
      'forbidden',
      action === 'cancel'
        ? 'Only the hospital’s buyers and clinicians can cancel a visit.'
        : 'Only the hospital’s buyers and clinicians can do this.',
    );
  }
  if (!canDo(visit.state, action)) {
    throw AppError.conflict('illegal_transition', illegalMessage(visit.state, action), {
      state: visit.state,
    });
  }
  return { visit, offers };
}

/** The requester widens the search of an unfilled visit with more candidates. */
export async function reopenVisit(
  deps: VisitDeps,
  auth: AuthContext,
  visitId: number,
  proctorIds: readonly number[] | undefined,
): Promise<VisitDetail> {
  const now = deps.now();
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const { visit, offers } = await lockRequesterVisit(m, auth, visitId, 'reopen');
    const listed = new Set(offers.map((o) => o.proctorUserId));
    const index = (proctorIds ?? []).findIndex((p) => listed.has(p));
    if (index >= 0) {
      throw AppError.field(
        'already_asked',
        `proctorIds.${index}`,
        'This proctor was already asked for this visit.',
      );
    }
    const ask = await askOf(m, visit);
    let candidates = await pickCandidates(m, deps, ask, now, proctorIds, 'proctorIds').catch(
      (error: unknown) => {
        if (error instanceof AppError && error.code === 'no_eligible_proctor') return [];
        throw error;
      },
    );
    candidates = candidates.filter((c) => !listed.has(c.proctorUserId));
    if (candidates.length === 0) {
      throw AppError.conflict(
        'no_eligible_proctor',
        'Nobody else fits this visit. Try other days.',
      );
    }
    await insertOffers(m, visit.id, candidates, offers.length + 1);
    await offerNext(m, deps, visit, auth.user.id, now);
  });
  return getVisit(deps.dataSource.manager, auth, visitId);
}

/** Locks the proctor (first) and the visit (second) and finds the proctor's live offer. */
async function lockForAnswer(m: EntityManager, auth: AuthContext, visitId: number, now: Date) {
  // Lock order everywhere a proctor answers: the proctor's profile row, then the visit row.
  const profile = await findProfile(m, auth.user.id, true);
  const visit = await findVisit(m, visitId, true);
  const offers = visit ? await findOffers(m, visitId) : [];
  if (!visit || !canSeeVisit(auth, visit, offers)) {
    throw AppError.notFound('visit_not_found', 'There is no such visit.');
  }
  const mine = offers.find((o) => o.proctorUserId === auth.user.id && o.state !== 'queued');
  if (!profile || !mine) {
    throw AppError.forbidden('not_offered', 'This visit was not offered to you.');
  }
  if (mine.state !== 'offered') {
    throw AppError.conflict('offer_closed', `Your offer for this visit is ${mine.state}.`, {
      state: visit.state,
      offerState: mine.state,
    });
  }
  if (mine.deadlineAt && mine.deadlineAt.getTime() <= now.getTime()) {
    throw AppError.conflict('offer_expired', 'The deadline to answer this offer has passed.');
  }
  return { visit, offer: mine };
}

/**
 * The offered proctor accepts. Under the proctor's row lock every hard constraint is checked
 * again with fresh data (licence, availability, other accepted visits with their travel days,
 * distance, language, experience): two hospitals' overlapping offers cannot both be accepted.
 * 409 with the reasons when the proctor no longer fits.
 */
export async function acceptOffer(
  deps: VisitDeps,
  auth: AuthContext,
  visitId: number,
): Promise<VisitDetail> {
  const now = deps.now();
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const { visit, offer } = await lockForAnswer(m, auth, visitId, now);
    if (!canDo(visit.state, 'accept')) {
      throw AppError.conflict('illegal_transition', illegalMessage(visit.state, 'accept'));
    }
    const ask = await askOf(m, visit);
    const [match] = await matchVisit(m, ask, deps.settings, now, {
      userIds: [auth.user.id],
      excludeVisitId: visit.id,
    });
    if (!match?.eligible) {
      throw AppError.conflict(
        'no_longer_eligible',
        `You can no longer take this visit: ${match?.exclusions.join(' ') ?? 'no profile.'}`,
        { exclusions: match?.exclusions ?? [] },
      );
    }
    await setOfferState(m, offer.id, 'accepted', { answeredAt: now });
    await closeQueuedOffers(m, visit.id, 'skipped');
    // After a withdrawal the REQUEST must supersede the CANCEL already sent (RFC 5545 §3.8.7.4).
    const inviteSequence = visit.inviteSequence === 0 ? 0 : visit.inviteSequence + 1;
    await updateVisit(
      m,
      visit.id,
      {
        state: 'accepted',
        inviteSequence,
        proctorUserId: auth.user.id,
        busyFrom: match.footprint.from,
        busyTo: match.footprint.to,
        travelDays: match.travelDays,
        feeAmount: match.feeEstimate.amount,
        feeCurrency: match.feeEstimate.currency,
      },
      now,
    );
    await insertVisitEvent(
      m,
      {
        visitId: visit.id,
        actorUserId: auth.user.id,
        kind: 'accepted',
        fromState: visit.state,
        toState: 'accepted',
        proctorUserId: auth.user.id,
        reason: null,
      },
      now,
    );
    await deps.notifyVisitEvent(m, {
      visitId: visit.id,
      event: 'accepted',
      actorUserId: auth.user.id,
      proctorUserId: auth.user.id,
      inviteSequence,
    });
  });
  return getVisit(deps.dataSource.manager, auth, visitId);
}

/** The offered proctor declines with a reason; the next candidate is offered at once. */
export async function declineOffer(
  deps: VisitDeps,
  auth: AuthContext,
  visitId: number,
  reason: string,
): Promise<VisitDetail> {
  const now = deps.now();
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const { visit, offer } = await lockForAnswer(m, auth, visitId, now);
    if (!canDo(visit.state, 'decline')) {
      throw AppError.conflict('illegal_transition', illegalMessage(visit.state, 'decline'));
    }
    await setOfferState(m, offer.id, 'declined', { answeredAt: now, reason });
    await insertVisitEvent(
      m,
      {
        visitId: visit.id,
        actorUserId: auth.user.id,
        kind: 'declined',
        fromState: visit.state,
        toState: visit.state,
        proctorUserId: auth.user.id,
        reason,
      },
      now,
    );
    await deps.notifyVisitEvent(m, {
      visitId: visit.id,
      event: 'declined',
      actorUserId: auth.user.id,
      proctorUserId: auth.user.id,
      reason,
    });
    await offerNext(m, deps, visit, null, now);
  });
  return getVisit(deps.dataSource.manager, auth, visitId);
}

/**
 * One pass of the offer-deadline job: each visit whose live offer's deadline has passed is
 * claimed with `FOR UPDATE SKIP LOCKED` (one visit per transaction, so runners in several
 * processes share the work and never advance one visit twice), its offer marked expired and
 * the next candidate offered. Returns how many offers expired.
 */
export async function runOfferDeadlines(deps: VisitDeps, limit = 100): Promise<number> {
  let expired = 0;
  for (let i = 0; i < limit; i++) {
    const now = deps.now();
    const done = await deps.dataSource.transaction('READ COMMITTED', async (m) => {
      const [visitId] = await claimVisitsWithExpiredOffers(m, now, 1);
      if (visitId === undefined) return false;
      const visit = (await findVisit(m, visitId))!;
      const live = (await findOffers(m, visitId)).find((o) => o.state === 'offered');
      if (!live) return true;
      await setOfferState(m, live.id, 'expired', { answeredAt: now });
      await insertVisitEvent(
        m,
        {
          visitId,
          actorUserId: null,
          kind: 'expired',
          fromState: visit.state,
          toState: visit.state,
          proctorUserId: live.proctorUserId,
          reason: 'No answer before the deadline.',
        },
        now,
      );
      await deps.notifyVisitEvent(m, {
        visitId,
        event: 'expired',
        actorUserId: null,
        proctorUserId: live.proctorUserId,
      });
      await offerNext(m, deps, visit, null, now);
      return true;
    });
    if (!done) break;
    expired++;
  }
  return expired;
}

/** A running offer-deadline job. */
export interface OfferDeadlineJob {
  stop(): Promise<void>;
}

/** Runs {@link runOfferDeadlines} every `intervalMs` until stopped. */
export function startOfferDeadlineJob(deps: VisitDeps, intervalMs = 60_000): OfferDeadlineJob {
  let running: Promise<unknown> = Promise.resolve();
  const timer = setInterval(() => {
    running = runOfferDeadlines(deps).catch((error: unknown) =>
      deps.logger.error({ err: error }, 'offer deadline job failed'),
    );
  }, intervalMs);
  timer.unref();
  return {
    async stop() {
      clearInterval(timer);
      await running;
    },
  };
}

/**
 * The hospital cancels a visit (requested, offered, accepted or unfilled) with a reason: the live
 * offer is withdrawn, and an accepted visit's proctor gets a calendar CANCEL.
 */
export async function cancelVisit(
  deps: VisitDeps,
  auth: AuthContext,
  visitId: number,
  reason: string,
): Promise<VisitDetail> {
  const now = deps.now();
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const { visit, offers } = await lockRequesterVisit(m, auth, visitId, 'cancel');
    const live = offers.find((o) => o.state === 'offered');
    const inviteSequence = visit.inviteSequence + 1;
    await closeQueuedOffers(m, visit.id, 'withdrawn');
    await updateVisit(
      m,
      visit.id,
      { state: 'cancelled', ...(visit.state === 'accepted' ? { inviteSequence } : {}) },
      now,
    );
    await insertVisitEvent(
      m,
      {
        visitId: visit.id,
        actorUserId: auth.user.id,
        kind: 'cancelled',
        fromState: visit.state,
        toState: 'cancelled',
        proctorUserId: null,
        reason,
      },
      now,
    );
    const proctorUserId = visit.proctorUserId ?? live?.proctorUserId;
    await deps.notifyVisitEvent(m, {
      visitId: visit.id,
      event: 'cancelled',
      actorUserId: auth.user.id,
      reason,
      wasAccepted: visit.state === 'accepted',
      inviteSequence,
      ...(proctorUserId ? { proctorUserId } : {}),
    });
  });
  return getVisit(deps.dataSource.manager, auth, visitId);
}

/**
 * The accepted proctor withdraws before the visit's first day (in the campus's zone) with a
 * reason: their offer ends as `withdrawn`, the visit's days leave their calendar (a CANCEL goes
 * to them), the requester is told, and the candidates the acceptance passed over are offered in
 * turn, as after a decline (or the visit is `unfilled`). From the first visit day on it is
 * refused with 409: by then the hospital plans around the proctor and must cancel or talk to them.
 */
export async function withdrawFromVisit(
  deps: VisitDeps,
  auth: AuthContext,
  visitId: number,
  reason: string,
): Promise<VisitDetail> {
  const now = deps.now();
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    // Same lock order as answering an offer: the proctor's profile row, then the visit row.
    await findProfile(m, auth.user.id, true);
    const visit = await findVisit(m, visitId, true);
    const offers = visit ? await findOffers(m, visitId) : [];
    if (!visit || !canSeeVisit(auth, visit, offers)) {
      throw AppError.notFound('visit_not_found', 'There is no such visit.');
    }
    const mine = offers.find((o) => o.proctorUserId === auth.user.id && o.state === 'accepted');
    if (visit.proctorUserId !== auth.user.id || !mine) {
      throw AppError.forbidden('forbidden', 'Only the visit’s proctor can withdraw from it.');
    }
    if (!canDo(visit.state, 'withdraw')) {
      throw AppError.conflict('illegal_transition', illegalMessage(visit.state, 'withdraw'), {
        state: visit.state,
      });
    }
    const today = toSiteDate(now, visit.siteTimeZone);
    if (today >= visit.visitFrom) {
      throw AppError.conflict(
        'visit_started',
        `The visit started on ${visit.visitFrom} (${visit.siteTimeZone}); you can no longer withdraw. Ask the hospital to cancel it if you cannot continue.`,
        { visitFrom: visit.visitFrom, today },
      );
    }
    const inviteSequence = visit.inviteSequence + 1;
    await setOfferState(m, mine.id, 'withdrawn', { answeredAt: now, reason });
    // Told while the visit still carries the proctor's days, so the CANCEL covers the travel days.
    await deps.notifyVisitEvent(m, {
      visitId: visit.id,
      event: 'withdrawn',
      actorUserId: auth.user.id,
      proctorUserId: auth.user.id,
      reason,
      inviteSequence,
    });
    await updateVisit(
      m,
      visit.id,
      {
        state: 'offered',
        proctorUserId: null,
        busyFrom: null,
        busyTo: null,
        travelDays: null,
        feeAmount: null,
        feeCurrency: null,
        inviteSequence,
      },
      now,
    );
    await insertVisitEvent(
      m,
      {
        visitId: visit.id,
        actorUserId: auth.user.id,
        kind: 'withdrawn',
        fromState: 'accepted',
        toState: 'offered',
        proctorUserId: auth.user.id,
        reason,
      },
      now,
    );
    await insertAuditEvent(m, {
      actorUserId: auth.user.id,
      organisationId: visit.hospitalId,
      action: 'visit.proctor_withdrew',
      subject: `visit:${visit.id}`,
      detail: { reason, visitFrom: visit.visitFrom, visitTo: visit.visitTo },
      at: now,
    });
    await requeuePassedOver(m, visit.id);
    const fresh = (await findVisit(m, visit.id, true))!;
    await offerNext(m, deps, fresh, null, now);
  });
  return getVisit(deps.dataSource.manager, auth, visitId);
}
