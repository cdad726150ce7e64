import type { EntityManager } from 'typeorm';
import type { TrainingProgress, TrainingRecord, TrainingVisit } from '@evalon/contracts';
import type { AuthContext } from '../../identity';
import {
  findCampus,
  findCases,
  findSignOffs,
  listTraineeVisitViews,
} from '../data-access/visit-repository';

/**
 * The signed-in clinician's training record: the visits on which they were a trainee with their
 * own cases (role and ratings) and sign-off, and per hospital and model the cases performed
 * under supervision against that hospital's sign-off threshold. Always the caller's own record:
 * other trainees' cases on the same visit are left out.
 */
export async function trainingRecordOf(
  m: EntityManager,
  auth: AuthContext,
): Promise<TrainingRecord> {
  const me = auth.user.id;
  const views = await listTraineeVisitViews(m, me);
  const visits: TrainingVisit[] = [];
  const progress = new Map<string, TrainingProgress>();
  const thresholds = new Map<number, number>();
  for (const v of views) {
    const [cases, signOffs] = await Promise.all([findCases(m, v.id), findSignOffs(m, v.id)]);
    const mine = cases.filter((c) => c.traineeUserId === me);
    const signOff = signOffs.find((s) => s.traineeUserId === me) ?? null;
    visits.push({
      visitId: v.id,
      reference: v.reference,
      state: v.state,
      hospitalName: v.hospitalName,
      siteName: v.siteName,
      siteTimeZone: v.siteTimeZone,
      modelId: v.modelId,
      modelName: v.modelName,
      from: v.visitFrom,
      to: v.visitTo,
      proctorName: v.proctorName,
      cases: mine.map((c) => ({
        caseNumber: c.caseNumber,
        traineeRole: c.traineeRole,
        ratings: c.ratings,
        recordedAt: c.createdAt.toISOString(),
      })),
      signOff: signOff && {
        id: signOff.id,
        signedAt: signOff.signedAt.toISOString(),
        proctoredCases: signOff.proctoredCases,
        threshold: signOff.threshold,
        pdfUrl: `/api/visits/${v.id}/sign-offs/${signOff.id}/pdf`,
      },
    });
    // The threshold is the hospital's setting, read through the campus the visit is at.
    if (!thresholds.has(v.hospitalId)) {
      thresholds.set(v.hospitalId, (await findCampus(m, v.siteId))?.signOffThreshold ?? 3);
    }
    const key = `${v.hospitalId}:${v.modelId}`;
    const entry = progress.get(key) ?? {
      hospitalId: v.hospitalId,
      hospitalName: v.hospitalName,
      modelId: v.modelId,
      modelName: v.modelName,
      supervisedCases: 0,
      threshold: thresholds.get(v.hospitalId)!,
      signedOff: false,
    };
    entry.supervisedCases += mine.filter((c) => c.traineeRole === 'performed_supervised').length;
    entry.signedOff ||= signOff !== null;
    progress.set(key, entry);
  }
  return {
    trainee: { userId: me, name: auth.user.name },
    progress: [...progress.values()].sort(
      (a, b) =>
        a.hospitalName.localeCompare(b.hospitalName) || a.modelName.localeCompare(b.modelName),
    ),
    visits,
  };
}
