import type { EntityManager } from 'typeorm';
import type { VisitState } from '@evalon/contracts';
import type {
  VisitCaseRow,
  VisitEventRow,
  VisitOfferRow,
  VisitRow,
  VisitSignOffRow,
} from './entities';

const day = (column: string, alias: string) => `DATE_FORMAT(${column}, '%Y-%m-%d') AS ${alias}`;
const json = <T>(value: unknown): T => (typeof value === 'string' ? JSON.parse(value) : value) as T;
const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

const visitColumns = `v.id, v.reference, v.kind, v.state, v.hospital_id AS hospitalId,
  v.site_id AS siteId, v.site_time_zone AS siteTimeZone, v.jurisdiction, v.model_id AS modelId,
  v.loan_id AS loanId, ${day('v.visit_from', 'visitFrom')}, ${day('v.visit_to', 'visitTo')},
  v.cases, v.language, v.note, v.requested_by_user_id AS requestedByUserId,
  v.proctor_user_id AS proctorUserId, ${day('v.busy_from', 'busyFrom')},
  ${day('v.busy_to', 'busyTo')}, v.travel_days AS travelDays, v.fee_amount AS feeAmount,
  v.fee_currency AS feeCurrency, v.invite_sequence AS inviteSequence, v.created_at AS createdAt,
  v.updated_at AS updatedAt`;

function toVisit(r: Record<string, unknown>): VisitRow {
  return {
    id: Number(r.id),
    reference: String(r.reference),
    kind: r.kind as VisitRow['kind'],
    state: r.state as VisitState,
    hospitalId: Number(r.hospitalId),
    siteId: Number(r.siteId),
    siteTimeZone: String(r.siteTimeZone),
    jurisdiction: String(r.jurisdiction),
    modelId: Number(r.modelId),
    loanId: num(r.loanId),
    visitFrom: String(r.visitFrom),
    visitTo: String(r.visitTo),
    cases: Number(r.cases),
    language: (r.language as string | null) ?? null,
    note: (r.note as string | null) ?? null,
    requestedByUserId: Number(r.requestedByUserId),
    proctorUserId: num(r.proctorUserId),
    busyFrom: (r.busyFrom as string | null) ?? null,
    busyTo: (r.busyTo as string | null) ?? null,
    travelDays: num(r.travelDays),
    feeAmount: num(r.feeAmount),
    feeCurrency: (r.feeCurrency as string | null) ?? null,
    inviteSequence: Number(r.inviteSequence),
    createdAt: r.createdAt as Date,
    updatedAt: r.updatedAt as Date,
  };
}

/** A visit with the names a screen shows. */
export interface VisitView extends VisitRow {
  hospitalName: string;
  siteName: string;
  modelName: string;
  proctorName: string | null;
}

const viewJoins = `JOIN organisations h ON h.id = v.hospital_id JOIN sites s ON s.id = v.site_id
  JOIN models mo ON mo.id = v.model_id LEFT JOIN proctor_profiles pp ON pp.user_id = v.proctor_user_id`;
const viewColumns = `${visitColumns}, h.name AS hospitalName, s.name AS siteName,
  mo.name AS modelName, pp.display_name AS proctorName`;

function toView(r: Record<string, unknown>): VisitView {
  return {
    ...toVisit(r),
    hospitalName: String(r.hospitalName),
    siteName: String(r.siteName),
    modelName: String(r.modelName),
    proctorName: (r.proctorName as string | null) ?? null,
  };
}

/** A new visit's fields. */
export type NewVisit = Pick<
  VisitRow,
  | 'kind'
  | 'hospitalId'
  | 'siteId'
  | 'siteTimeZone'
  | 'jurisdiction'
  | 'modelId'
  | 'loanId'
  | 'visitFrom'
  | 'visitTo'
  | 'cases'
  | 'language'
  | 'note'
  | 'requestedByUserId'
>;

/** Inserts a visit in state `requested`, numbered `PV-<year>-<number>` from its sequence. */
export async function insertVisit(
  m: EntityManager,
  v: NewVisit,
  now: Date,
): Promise<{ id: number; reference: string }> {
  const rows: { id: number; reference: string }[] = await m.query(
    `INSERT INTO visits (reference, kind, state, hospital_id, site_id, site_time_zone, jurisdiction,
        model_id, loan_id, visit_from, visit_to, cases, language, note, requested_by_user_id,
        created_at, updated_at)
     SELECT CONCAT('PV-', ?, '-', IF(seq.n < 1000000, LPAD(seq.n, 6, '0'), seq.n)), ?, 'requested',
            ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?
       FROM (SELECT NEXTVAL(visit_reference_seq) AS n) seq
     RETURNING id, reference`,
    [
      now.getUTCFullYear(),
      v.kind,
      v.hospitalId,
      v.siteId,
      v.siteTimeZone,
      v.jurisdiction,
      v.modelId,
      v.loanId,
      v.visitFrom,
      v.visitTo,
      v.cases,
      v.language,
      v.note,
      v.requestedByUserId,
      now,
      now,
    ],
  );
  return { id: Number(rows[0]!.id), reference: rows[0]!.reference };
}

/** Reads a visit; `lock` takes its row lock. */
export async function findVisit(
  m: EntityManager,
  id: number,
  lock = false,
): Promise<VisitRow | null> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT ${visitColumns} FROM visits v WHERE v.id = ?${lock ? ' FOR UPDATE' : ''}`,
    [id],
  );
  return rows[0] ? toVisit(rows[0]) : null;
}

/** A visit with names, or null. */
export async function findVisitView(m: EntityManager, id: number): Promise<VisitView | null> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT ${viewColumns} FROM visits v ${viewJoins} WHERE v.id = ?`,
    [id],
  );
  return rows[0] ? toView(rows[0]) : null;
}

/** Who sees which visits: hospitals' own, proctors' offered or accepted ones, or all. */
export interface VisitScope {
  hospitalIds: readonly number[];
  /** A proctor's user id: visits where they hold or held an offer. */
  proctorUserId: number | null;
  all: boolean;
}

/** Visits in scope, newest first (at most 500). */
export async function listVisitViews(
  m: EntityManager,
  scope: VisitScope,
  state?: VisitState,
): Promise<VisitView[]> {
  const where: string[] = [];
  const params: unknown[] = [];
  if (!scope.all) {
    const parts: string[] = [];
    if (scope.hospitalIds.length) {
      parts.push('v.hospital_id IN (?)');
      params.push(scope.hospitalIds);
    }
    if (scope.proctorUserId !== null) {
      parts.push(
        `v.id IN (SELECT o.visit_id FROM visit_offers o WHERE o.proctor_user_id = ? AND o.state <> 'queued')`,
      );
      params.push(scope.proctorUserId);
    }
    where.push(parts.length ? `(${parts.join(' OR ')})` : '0 = 1');
  }
  if (state) {
    where.push('v.state = ?');
    params.push(state);
  }
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT ${viewColumns} FROM visits v ${viewJoins}
      ${where.length ? `WHERE ${where.join(' AND ')}` : ''} ORDER BY v.id DESC LIMIT 500`,
    params,
  );
  return rows.map(toView);
}

/** Visits on which the person is a trainee (has a case or a sign-off), newest first. */
export async function listTraineeVisitViews(
  m: EntityManager,
  traineeUserId: number,
): Promise<VisitView[]> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT ${viewColumns} FROM visits v ${viewJoins}
      WHERE v.id IN (SELECT c.visit_id FROM visit_cases c WHERE c.trainee_user_id = ?)
         OR v.id IN (SELECT so.visit_id FROM visit_sign_offs so WHERE so.trainee_user_id = ?)
      ORDER BY v.visit_from DESC, v.id DESC LIMIT 200`,
    [traineeUserId, traineeUserId],
  );
  return rows.map(toView);
}

/** Sets fields of a visit. */
export async function updateVisit(
  m: EntityManager,
  id: number,
  fields: Partial<
    Pick<
      VisitRow,
      | 'state'
      | 'proctorUserId'
      | 'busyFrom'
      | 'busyTo'
      | 'travelDays'
      | 'feeAmount'
      | 'feeCurrency'
      | 'inviteSequence'
    >
  >,
  now: Date,
): Promise<void> {
  const columns: Record<string, string> = {
    state: 'state',
    proctorUserId: 'proctor_user_id',
    busyFrom: 'busy_from',
    busyTo: 'busy_to',
    travelDays: 'travel_days',
    feeAmount: 'fee_amount',
    feeCurrency: 'fee_currency',
    inviteSequence: 'invite_sequence',
  };
  const sets: string[] = [];
  const params: unknown[] = [];
  for (const [key, value] of Object.entries(fields)) {
    sets.push(`${columns[key]} = ?`);
    params.push(value);
  }
  await m.query(`UPDATE visits SET ${sets.join(', ')}, updated_at = ? WHERE id = ?`, [
    ...params,
    now,
    id,
  ]);
}

/** Writes the candidate list of a visit in order (all `queued`). */
export async function insertOffers(
  m: EntityManager,
  visitId: number,
  candidates: readonly { proctorUserId: number; score: number | null }[],
  firstPosition = 1,
): Promise<void> {
  if (candidates.length === 0) return;
  await m.query(
    `INSERT INTO visit_offers (visit_id, proctor_user_id, position, state, score)
     VALUES ${candidates.map(() => "(?, ?, ?, 'queued', ?)").join(', ')}`,
    candidates.flatMap((c, i) => [visitId, c.proctorUserId, firstPosition + i, c.score]),
  );
}

/** An offer with the proctor's name. */
export interface OfferView extends VisitOfferRow {
  proctorName: string;
}

/** A visit's offers in position order. */
export async function findOffers(m: EntityManager, visitId: number): Promise<OfferView[]> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT o.id, o.visit_id AS visitId, o.proctor_user_id AS proctorUserId, o.position, o.state,
            o.score, o.offered_at AS offeredAt, o.deadline_at AS deadlineAt,
            o.answered_at AS answeredAt, o.reason, pp.display_name AS proctorName
       FROM visit_offers o JOIN proctor_profiles pp ON pp.user_id = o.proctor_user_id
      WHERE o.visit_id = ? ORDER BY o.position`,
    [visitId],
  );
  return rows.map((r) => ({
    id: Number(r.id),
    visitId: Number(r.visitId),
    proctorUserId: Number(r.proctorUserId),
    position: Number(r.position),
    state: r.state as VisitOfferRow['state'],
    score: num(r.score),
    offeredAt: (r.offeredAt as Date | null) ?? null,
    deadlineAt: (r.deadlineAt as Date | null) ?? null,
    answeredAt: (r.answeredAt as Date | null) ?? null,
    reason: (r.reason as string | null) ?? null,
    proctorName: String(r.proctorName),
  }));
}

/** Changes an offer's state with its timestamps and reason. */
export async function setOfferState(
  m: EntityManager,
  offerId: number,
  state: VisitOfferRow['state'],
  fields: { offeredAt?: Date; deadlineAt?: Date; answeredAt?: Date; reason?: string | null } = {},
): Promise<void> {
  await m.query(
    `UPDATE visit_offers SET state = ?, offered_at = COALESCE(?, offered_at),
        deadline_at = COALESCE(?, deadline_at), answered_at = COALESCE(?, answered_at),
        reason = COALESCE(?, reason)
      WHERE id = ?`,
    [
      state,
      fields.offeredAt ?? null,
      fields.deadlineAt ?? null,
      fields.answeredAt ?? null,
      fields.reason ?? null,
      offerId,
    ],
  );
}

/** Marks every still-queued offer of a visit (after an accept or a cancel). */
export async function closeQueuedOffers(
  m: EntityManager,
  visitId: number,
  state: 'skipped' | 'withdrawn',
): Promise<void> {
  await m.query(
    `UPDATE visit_offers SET state = ? WHERE visit_id = ? AND state IN ('queued', 'offered')`,
    [state, visitId],
  );
}

/**
 * Puts back in the queue the candidates an acceptance passed over (closed as `skipped` without a
 * reason and never offered), so a withdrawal offers the visit to the next of them.
 */
export async function requeuePassedOver(m: EntityManager, visitId: number): Promise<number> {
  const result: { affectedRows?: number } = await m.query(
    `UPDATE visit_offers SET state = 'queued'
      WHERE visit_id = ? AND state = 'skipped' AND reason IS NULL AND offered_at IS NULL`,
    [visitId],
  );
  return Number(result.affectedRows ?? 0);
}

/** When each proctor was last offered a visit (the ranking spreads the work). */
export async function lastOfferedAt(
  m: EntityManager,
  proctorUserIds: readonly number[] | null,
): Promise<Map<number, Date>> {
  if (proctorUserIds && proctorUserIds.length === 0) return new Map();
  const rows: { p: number; at: Date }[] = await m.query(
    `SELECT proctor_user_id AS p, MAX(offered_at) AS at FROM visit_offers
      WHERE offered_at IS NOT NULL ${proctorUserIds ? 'AND proctor_user_id IN (?)' : ''}
      GROUP BY proctor_user_id`,
    proctorUserIds ? [proctorUserIds] : [],
  );
  return new Map(rows.map((r) => [Number(r.p), r.at]));
}

/**
 * Visits whose live offer's deadline has passed, locked with SKIP LOCKED: a visit another job
 * runner (or an accept/decline) holds is left for later, so no two runners advance one visit.
 */
export async function claimVisitsWithExpiredOffers(
  m: EntityManager,
  now: Date,
  limit: number,
): Promise<number[]> {
  const rows: { id: number }[] = await m.query(
    `SELECT v.id FROM visits v
      WHERE v.state = 'offered' AND v.id IN (
        SELECT o.visit_id FROM visit_offers o WHERE o.state = 'offered' AND o.deadline_at <= ?)
      ORDER BY v.id LIMIT ? FOR UPDATE SKIP LOCKED`,
    [now, limit],
  );
  return rows.map((r) => Number(r.id));
}

/** A new event of a visit. */
export type NewVisitEvent = Omit<VisitEventRow, 'id' | 'at'>;

export async function insertVisitEvent(
  m: EntityManager,
  e: NewVisitEvent,
  now: Date,
): Promise<void> {
  await m.query(
    `INSERT INTO visit_events (visit_id, at, actor_user_id, kind, from_state, to_state,
        proctor_user_id, reason) VALUES (?, ?, ?, ?, ?, ?, ?, ?)`,
    [e.visitId, now, e.actorUserId, e.kind, e.fromState, e.toState, e.proctorUserId, e.reason],
  );
}

/** A visit's events with names, oldest first. */
export async function findVisitEvents(
  m: EntityManager,
  visitId: number,
): Promise<(VisitEventRow & { actorName: string | null; proctorName: string | null })[]> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT e.id, e.visit_id AS visitId, e.at, e.actor_user_id AS actorUserId, e.kind,
            e.from_state AS fromState, e.to_state AS toState, e.proctor_user_id AS proctorUserId,
            e.reason, u.name AS actorName, pp.display_name AS proctorName
       FROM visit_events e LEFT JOIN users u ON u.id = e.actor_user_id
       LEFT JOIN proctor_profiles pp ON pp.user_id = e.proctor_user_id
      WHERE e.visit_id = ? ORDER BY e.id`,
    [visitId],
  );
  return rows.map((r) => ({
    id: Number(r.id),
    visitId: Number(r.visitId),
    at: r.at as Date,
    actorUserId: num(r.actorUserId),
    kind: String(r.kind),
    fromState: (r.fromState as string | null) ?? null,
    toState: String(r.toState),
    proctorUserId: num(r.proctorUserId),
    reason: (r.reason as string | null) ?? null,
    actorName: (r.actorName as string | null) ?? null,
    proctorName: (r.proctorName as string | null) ?? null,
  }));
}

/** A new case record. */
export type NewVisitCase = Omit<VisitCaseRow, 'id' | 'createdAt'>;

export async function insertCase(m: EntityManager, c: NewVisitCase, now: Date): Promise<number> {
  const result: { insertId: number } = await m.query(
    `INSERT INTO visit_cases (visit_id, case_number, trainee_user_id, trainee_role, ratings, notes,
        recorded_by_user_id, created_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)`,
    [
      c.visitId,
      c.caseNumber,
      c.traineeUserId,
      c.traineeRole,
      JSON.stringify(c.ratings),
      c.notes,
      c.recordedByUserId,
      now,
    ],
  );
  return Number(result.insertId);
}

/** A visit's case records with the trainee's name, by case number. */
export async function findCases(
  m: EntityManager,
  visitId: number,
): Promise<(VisitCaseRow & { traineeName: string })[]> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT c.id, c.visit_id AS visitId, c.case_number AS caseNumber,
            c.trainee_user_id AS traineeUserId, c.trainee_role AS traineeRole, c.ratings, c.notes,
            c.recorded_by_user_id AS recordedByUserId, c.created_at AS createdAt,
            u.name AS traineeName
       FROM visit_cases c JOIN users u ON u.id = c.trainee_user_id
      WHERE c.visit_id = ? ORDER BY c.case_number`,
    [visitId],
  );
  return rows.map((r) => ({
    id: Number(r.id),
    visitId: Number(r.visitId),
    caseNumber: Number(r.caseNumber),
    traineeUserId: Number(r.traineeUserId),
    traineeRole: r.traineeRole as VisitCaseRow['traineeRole'],
    ratings: json<Record<string, number>>(r.ratings),
    notes: (r.notes as string | null) ?? null,
    recordedByUserId: Number(r.recordedByUserId),
    createdAt: r.createdAt as Date,
    traineeName: String(r.traineeName),
  }));
}

/**
 * Cases a trainee performed under supervision on a model at a hospital, across all its visits
 * (the count a sign-off compares with the hospital's threshold).
 */
export async function countProctoredCases(
  m: EntityManager,
  hospitalId: number,
  modelId: number,
  traineeUserId: number,
): Promise<number> {
  const rows: { n: number }[] = await m.query(
    `SELECT COUNT(*) AS n FROM visit_cases c JOIN visits v ON v.id = c.visit_id
      WHERE v.hospital_id = ? AND v.model_id = ? AND c.trainee_user_id = ?
        AND c.trainee_role = 'performed_supervised'`,
    [hospitalId, modelId, traineeUserId],
  );
  return Number(rows[0]?.n ?? 0);
}

/** A new sign-off. */
export type NewSignOff = Omit<VisitSignOffRow, 'id'>;

export async function insertSignOff(m: EntityManager, s: NewSignOff): Promise<number> {
  const result: { insertId: number } = await m.query(
    `INSERT INTO visit_sign_offs (visit_id, trainee_user_id, proctor_user_id, proctored_cases,
        threshold, statement, signed_at) VALUES (?, ?, ?, ?, ?, ?, ?)`,
    [
      s.visitId,
      s.traineeUserId,
      s.proctorUserId,
      s.proctoredCases,
      s.threshold,
      s.statement,
      s.signedAt,
    ],
  );
  return Number(result.insertId);
}

/** A visit's sign-offs with names. */
export async function findSignOffs(
  m: EntityManager,
  visitId: number,
): Promise<(VisitSignOffRow & { traineeName: string; proctorName: string })[]> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT so.id, so.visit_id AS visitId, so.trainee_user_id AS traineeUserId,
            so.proctor_user_id AS proctorUserId, so.proctored_cases AS proctoredCases,
            so.threshold, so.statement, so.signed_at AS signedAt, u.name AS traineeName,
            COALESCE(pp.display_name, pu.name) AS proctorName
       FROM visit_sign_offs so JOIN users u ON u.id = so.trainee_user_id
       JOIN users pu ON pu.id = so.proctor_user_id
       LEFT JOIN proctor_profiles pp ON pp.user_id = so.proctor_user_id
      WHERE so.visit_id = ? ORDER BY so.id`,
    [visitId],
  );
  return rows.map((r) => ({
    id: Number(r.id),
    visitId: Number(r.visitId),
    traineeUserId: Number(r.traineeUserId),
    proctorUserId: Number(r.proctorUserId),
    proctoredCases: Number(r.proctoredCases),
    threshold: Number(r.threshold),
    statement: String(r.statement),
    signedAt: r.signedAt as Date,
    traineeName: String(r.traineeName),
    proctorName: String(r.proctorName),
  }));
}

/** Clinicians of a hospital (possible trainees). */
export async function findClinicians(
  m: EntityManager,
  hospitalId: number,
): Promise<{ userId: number; name: string }[]> {
  const rows: { userId: number; name: string }[] = await m.query(
    `SELECT DISTINCT u.id AS userId, u.name FROM memberships ms JOIN users u ON u.id = ms.user_id
      WHERE ms.organisation_id = ? AND ms.role = 'clinician' AND u.active = 1 ORDER BY u.name`,
    [hospitalId],
  );
  return rows.map((r) => ({ userId: Number(r.userId), name: String(r.name) }));
}

/** The campus a visit goes to, with what the matching needs. */
export interface CampusRow {
  id: number;
  organisationId: number;
  kind: string;
  name: string;
  country: string;
  subdivision: string | null;
  latitude: number;
  longitude: number;
  timeZone: string;
  signOffThreshold: number;
}

export async function findCampus(m: EntityManager, siteId: number): Promise<CampusRow | null> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT s.id, s.organisation_id AS organisationId, s.kind, s.name, s.country, s.subdivision,
            s.latitude, s.longitude, s.time_zone AS timeZone, o.sign_off_threshold AS threshold
       FROM sites s JOIN organisations o ON o.id = s.organisation_id
      WHERE s.id = ? AND o.kind = 'hospital'`,
    [siteId],
  );
  const r = rows[0];
  if (!r) return null;
  return {
    id: Number(r.id),
    organisationId: Number(r.organisationId),
    kind: String(r.kind),
    name: String(r.name),
    country: String(r.country),
    subdivision: (r.subdivision as string | null) ?? null,
    latitude: Number(r.latitude),
    longitude: Number(r.longitude),
    timeZone: String(r.timeZone),
    signOffThreshold: Number(r.threshold),
  };
}

/**
 * A model with the minimum supervised cases for its proctors: the lender's per-model setting,
 * else the lender's default, else 20.
 */
export async function findModelSettings(
  m: EntityManager,
  modelId: number,
): Promise<{ id: number; name: string; lenderId: number; minSupervisedCases: number } | null> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT mo.id, mo.name, mo.lender_id AS lenderId,
            COALESCE(vms.min_supervised_cases, ls.min_supervised_cases, 20) AS minCases
       FROM models mo LEFT JOIN lender_settings ls ON ls.organisation_id = mo.lender_id
       LEFT JOIN visit_model_settings vms ON vms.model_id = mo.id
      WHERE mo.id = ?`,
    [modelId],
  );
  const r = rows[0];
  if (!r) return null;
  return {
    id: Number(r.id),
    name: String(r.name),
    lenderId: Number(r.lenderId),
    minSupervisedCases: Number(r.minCases),
  };
}

/** A loan's hospital, campus, state, case days and models (to prefill and check a visit). */
export async function findLoanForVisit(
  m: EntityManager,
  loanId: number,
): Promise<{
  hospitalId: number;
  siteId: number;
  state: string;
  useFrom: string;
  useTo: string;
  modelIds: number[];
} | null> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT l.hospital_id AS hospitalId, l.site_id AS siteId, l.state,
            ${day('l.use_from', 'useFrom')}, ${day('l.use_to', 'useTo')},
            GROUP_CONCAT(DISTINCT lu.model_id) AS models
       FROM loans l LEFT JOIN loan_units lu ON lu.loan_id = l.id WHERE l.id = ? GROUP BY l.id`,
    [loanId],
  );
  const r = rows[0];
  if (!r) return null;
  return {
    hospitalId: Number(r.hospitalId),
    siteId: Number(r.siteId),
    state: String(r.state),
    useFrom: String(r.useFrom),
    useTo: String(r.useTo),
    modelIds: String(r.models ?? '')
      .split(',')
      .filter(Boolean)
      .map(Number),
  };
}

/**
 * A version of everything the candidate search reads: it changes whenever a profile, its
 * availability or experience, a credential, a visit, an offer or a person changes.
 */
export async function candidateDataVersion(m: EntityManager): Promise<string> {
  const [row]: Record<string, unknown>[] = await m.query(
    `SELECT (SELECT MAX(updated_at) FROM proctor_profiles) AS profiles,
            (SELECT COUNT(*) FROM proctor_profiles) AS proctors,
            (SELECT MAX(id) FROM proctor_credentials) AS credentials,
            (SELECT MAX(updated_at) FROM visits) AS visits,
            (SELECT MAX(offered_at) FROM visit_offers) AS offers,
            (SELECT MAX(updated_at) FROM users) AS users`,
  );
  return JSON.stringify(row);
}

/** A lender's models with their own minimum (null: the lender's default applies). */
export async function findLenderModelMinimums(
  m: EntityManager,
  lenderId: number,
): Promise<{
  lenderDefault: number;
  models: { modelId: number; name: string; own: number | null }[];
}> {
  const [def]: Record<string, unknown>[] = await m.query(
    'SELECT min_supervised_cases AS n FROM lender_settings WHERE organisation_id = ?',
    [lenderId],
  );
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT mo.id, mo.name, vms.min_supervised_cases AS own
       FROM models mo LEFT JOIN visit_model_settings vms ON vms.model_id = mo.id
      WHERE mo.lender_id = ? ORDER BY mo.name, mo.id`,
    [lenderId],
  );
  return {
    lenderDefault: def ? Number(def.n) : 20,
    models: rows.map((r) => ({ modelId: Number(r.id), name: String(r.name), own: num(r.own) })),
  };
}

/** Sets (or, with null, removes) a model's own minimum supervised cases. */
export async function setModelMinimum(
  m: EntityManager,
  modelId: number,
  value: number | null,
  userId: number,
  now: Date,
): Promise<void> {
  if (value === null) {
    await m.query('DELETE FROM visit_model_settings WHERE model_id = ?', [modelId]);
    return;
  }
  await m.query(
    `INSERT INTO visit_model_settings (model_id, min_supervised_cases, updated_by_user_id, updated_at)
     VALUES (?, ?, ?, ?)
     ON DUPLICATE KEY UPDATE min_supervised_cases = VALUES(min_supervised_cases),
       updated_by_user_id = VALUES(updated_by_user_id), updated_at = VALUES(updated_at)`,
    [modelId, value, userId, now],
  );
}

/** An organisation's kind, name and sign-off threshold (locked when `lock`). */
export async function findOrganisationThreshold(
  m: EntityManager,
  organisationId: number,
  lock = false,
): Promise<{ id: number; name: string; kind: string; signOffThreshold: number } | null> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT id, name, kind, sign_off_threshold AS threshold FROM organisations WHERE id = ?
      ${lock ? 'FOR UPDATE' : ''}`,
    [organisationId],
  );
  const r = rows[0];
  return r
    ? {
        id: Number(r.id),
        name: String(r.name),
        kind: String(r.kind),
        signOffThreshold: Number(r.threshold),
      }
    : null;
}

/** Sets a hospital's sign-off threshold. */
export async function setSignOffThreshold(
  m: EntityManager,
  organisationId: number,
  value: number,
): Promise<void> {
  await m.query('UPDATE organisations SET sign_off_threshold = ? WHERE id = ?', [
    value,
    organisationId,
  ]);
}

/** A model's lender, locked for a settings change. */
export async function lockModel(
  m: EntityManager,
  modelId: number,
): Promise<{ id: number; name: string; lenderId: number } | null> {
  const rows: Record<string, unknown>[] = await m.query(
    'SELECT id, name, lender_id AS lenderId FROM models WHERE id = ? FOR UPDATE',
    [modelId],
  );
  const r = rows[0];
  return r ? { id: Number(r.id), name: String(r.name), lenderId: Number(r.lenderId) } : null;
}
