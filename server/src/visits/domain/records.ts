import type { EntityManager } from 'typeorm';
import { competencyLabels, type CaseRecordInput, type VisitDetail } from '@evalon/contracts';
import { toSiteDate } from '@evalon/scheduling';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { addRecordedCases } from '../../proctors';
import {
  countProctoredCases,
  findCampus,
  findCases,
  findClinicians,
  findOffers,
  findSignOffs,
  findVisit,
  findVisitView,
  insertCase,
  insertSignOff,
  insertVisitEvent,
  updateVisit,
} from '../data-access/visit-repository';
import type { VisitRow } from '../data-access/entities';
import type { VisitDeps } from './deps';
import { renderSignOffPdf } from './pdf';
import { canSeeVisit, getVisit } from './queries';
import { canDo, illegalMessage, type VisitAction } from './state-machine';

/** Locks a visit for its proctor: 404 when unseen, 403 for others, 409 when the state forbids. */
async function lockAsProctor(
  m: EntityManager,
  auth: AuthContext,
  visitId: number,
  action: VisitAction,
): Promise<VisitRow> {
  const visit = await findVisit(m, visitId, true);
  const offers = visit ? await findOffers(m, visitId) : [];
  if (!visit || !canSeeVisit(auth, visit, offers)) {
    throw AppError.notFound('visit_not_found', 'There is no such visit.');
  }
  if (visit.proctorUserId !== auth.user.id) {
    throw AppError.forbidden('forbidden', 'Only the visit’s proctor can do this.');
  }
  if (visit.state === 'cancelled') {
    throw AppError.conflict(
      'visit_cancelled',
      'The hospital cancelled this visit; nothing more can be recorded on it.',
      { state: visit.state },
    );
  }
  if (!canDo(visit.state, action)) {
    throw AppError.conflict('illegal_transition', illegalMessage(visit.state, action), {
      state: visit.state,
    });
  }
  return visit;
}

/** The trainee must be a clinician of the visit's hospital. */
async function checkTrainee(m: EntityManager, visit: VisitRow, traineeUserId: number) {
  const clinicians = await findClinicians(m, visit.hospitalId);
  const trainee = clinicians.find((c) => c.userId === traineeUserId);
  if (!trainee) {
    throw AppError.field(
      'unknown_trainee',
      'traineeUserId',
      'Choose a clinician of the hospital as the trainee.',
    );
  }
  return trainee;
}

/**
 * The proctor records one supervised case (de-identified: the contract refuses notes with
 * obvious patient identifiers). Case numbers are unique per visit (409 when taken).
 */
export async function recordCase(
  deps: VisitDeps,
  auth: AuthContext,
  visitId: number,
  input: CaseRecordInput,
): Promise<VisitDetail> {
  const now = deps.now();
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const visit = await lockAsProctor(m, auth, visitId, 'record_case');
    // Cases happen on the visit's days: none before the first day (the campus's calendar).
    const today = toSiteDate(now, visit.siteTimeZone);
    if (today < visit.visitFrom) {
      throw AppError.field(
        'before_visit',
        'caseNumber',
        `Cases can be recorded from ${visit.visitFrom}, the visit’s first day (${visit.siteTimeZone}).`,
      );
    }
    await checkTrainee(m, visit, input.traineeUserId);
    if (input.caseNumber > visit.cases) {
      throw AppError.field(
        'invalid_case_number',
        'caseNumber',
        `This visit was planned for ${visit.cases} case(s).`,
      );
    }
    const existing = await findCases(m, visitId);
    if (existing.some((c) => c.caseNumber === input.caseNumber)) {
      throw AppError.conflict(
        'case_number_taken',
        `Case ${input.caseNumber} of this visit is already recorded.`,
      );
    }
    await insertCase(
      m,
      {
        visitId,
        caseNumber: input.caseNumber,
        traineeUserId: input.traineeUserId,
        traineeRole: input.traineeRole,
        ratings: input.ratings,
        notes: input.notes?.trim() || null,
        recordedByUserId: auth.user.id,
      },
      now,
    );
    await insertVisitEvent(
      m,
      {
        visitId,
        actorUserId: auth.user.id,
        kind: 'case_recorded',
        fromState: visit.state,
        toState: visit.state,
        proctorUserId: null,
        reason: `Case ${input.caseNumber}`,
      },
      now,
    );
  });
  return getVisit(deps.dataSource.manager, auth, visitId);
}

/** Moves an accepted visit to completed and adds its cases to the proctor's experience. */
async function complete(m: EntityManager, visit: VisitRow, actorUserId: number, now: Date) {
  const cases = await findCases(m, visit.id);
  if (cases.length > 0)
    await addRecordedCases(m, visit.proctorUserId!, visit.modelId, cases.length);
  await updateVisit(m, visit.id, { state: 'completed' }, now);
  await insertVisitEvent(
    m,
    {
      visitId: visit.id,
      actorUserId,
      kind: 'completed',
      fromState: visit.state,
      toState: 'completed',
      proctorUserId: null,
      reason: `${cases.length} case(s) recorded`,
    },
    now,
  );
  visit.state = 'completed';
}

/** The proctor marks the visit done; its recorded cases count towards their experience. */
export async function completeVisit(
  deps: VisitDeps,
  auth: AuthContext,
  visitId: number,
): Promise<VisitDetail> {
  const now = deps.now();
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const visit = await lockAsProctor(m, auth, visitId, 'complete');
    await complete(m, visit, auth.user.id, now);
  });
  return getVisit(deps.dataSource.manager, auth, visitId);
}

/** The statement the proctor signs. */
export function signOffStatement(proctorName: string, traineeName: string, cases: number): string {
  return (
    `I, ${proctorName}, supervised ${traineeName} in ${cases} case(s) performed under ` +
    'supervision on this platform and consider the proctored cases complete. Privileging ' +
    'remains the hospital’s decision.'
  );
}

/**
 * The proctor signs a trainee off once the trainee's cases performed under supervision on this
 * model at this hospital reach the hospital's threshold (409 with the count otherwise). An
 * accepted visit is completed first. The one-page PDF record goes to the hospital through the
 * notifications (outbox) in the same transaction.
 */
export async function signOffTrainee(
  deps: VisitDeps,
  auth: AuthContext,
  visitId: number,
  traineeUserId: number,
): Promise<VisitDetail> {
  const now = deps.now();
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const visit = await lockAsProctor(m, auth, visitId, 'sign_off');
    const trainee = await checkTrainee(m, visit, traineeUserId);
    const campus = (await findCampus(m, visit.siteId))!;
    if ((await findSignOffs(m, visitId)).some((s) => s.traineeUserId === traineeUserId)) {
      throw AppError.conflict('already_signed_off', `${trainee.name} is already signed off.`);
    }
    const count = await countProctoredCases(m, visit.hospitalId, visit.modelId, traineeUserId);
    if (count < campus.signOffThreshold) {
      throw AppError.conflict(
        'threshold_not_reached',
        `${trainee.name} has ${count} of ${campus.signOffThreshold} cases performed under supervision.`,
        { proctoredCases: count, threshold: campus.signOffThreshold },
      );
    }
    if (visit.state === 'accepted') await complete(m, visit, auth.user.id, now);
    const view = (await findVisitView(m, visitId))!;
    const statement = signOffStatement(view.proctorName ?? auth.user.name, trainee.name, count);
    // The database keeps milliseconds: sign with the instant as it will be read back.
    const signedAt = new Date(Math.floor(now.getTime()));
    await insertSignOff(m, {
      visitId,
      traineeUserId,
      proctorUserId: auth.user.id,
      proctoredCases: count,
      threshold: campus.signOffThreshold,
      statement,
      signedAt,
    });
    if (visit.state !== 'signed_off') await updateVisit(m, visitId, { state: 'signed_off' }, now);
    await insertVisitEvent(
      m,
      {
        visitId,
        actorUserId: auth.user.id,
        kind: 'signed_off',
        fromState: visit.state,
        toState: 'signed_off',
        proctorUserId: null,
        reason: trainee.name,
      },
      now,
    );
    const pdf = await signOffPdf(m, visitId, traineeUserId);
    await deps.notifyVisitEvent(m, {
      visitId,
      event: 'signed_off',
      actorUserId: auth.user.id,
      signOff: { traineeUserId, pdf: pdf.data, fileName: pdf.fileName },
    });
  });
  return getVisit(deps.dataSource.manager, auth, visitId);
}

/** Builds the PDF of one trainee's sign-off on a visit from what is stored. */
async function signOffPdf(
  m: EntityManager,
  visitId: number,
  traineeUserId: number,
): Promise<{ fileName: string; data: Buffer }> {
  const view = (await findVisitView(m, visitId))!;
  const signOff = (await findSignOffs(m, visitId)).find((s) => s.traineeUserId === traineeUserId);
  if (!signOff) throw AppError.notFound('sign_off_not_found', 'There is no such sign-off.');
  const cases = (await findCases(m, visitId)).filter((c) => c.traineeUserId === traineeUserId);
  const data = await renderSignOffPdf({
    visitReference: view.reference,
    hospitalName: view.hospitalName,
    siteName: view.siteName,
    modelName: view.modelName,
    visitFrom: view.visitFrom,
    visitTo: view.visitTo,
    proctorName: signOff.proctorName,
    traineeName: signOff.traineeName,
    proctoredCases: signOff.proctoredCases,
    threshold: signOff.threshold,
    signedAt: signOff.signedAt,
    statement: signOff.statement,
    cases,
    competencyLabels,
  });
  return { fileName: `sign-off-${view.reference}-${signOff.id}.pdf`, data };
}

/** The PDF of a sign-off, for anyone who may see the visit. */
export async function readSignOffPdf(
  deps: VisitDeps,
  auth: AuthContext,
  visitId: number,
  signOffId: number,
): Promise<{ fileName: string; data: Buffer }> {
  const m = deps.dataSource.manager;
  const detail = await getVisit(m, auth, visitId);
  const signOff = detail.signOffs.find((s) => s.id === signOffId);
  if (!signOff) throw AppError.notFound('sign_off_not_found', 'There is no such sign-off.');
  return signOffPdf(m, visitId, signOff.traineeUserId);
}
