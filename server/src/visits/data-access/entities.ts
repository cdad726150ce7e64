import { EntitySchema } from 'typeorm';
import type { VisitState } from '@evalon/contracts';
import { idColumn, instantColumn, refColumn } from '../../database/columns';
import { bigintAsNumber } from '../../database/columns';

const dateColumn = (name: string, nullable = false) => ({
  type: 'date' as const,
  name,
  nullable,
});

/** A row of `visits`. Dates are `YYYY-MM-DD` in the campus's zone (`siteTimeZone`). */
export interface VisitRow {
  id: number;
  reference: string;
  kind: 'proctoring' | 'in_service' | 'demonstration';
  state: VisitState;
  hospitalId: number;
  siteId: number;
  siteTimeZone: string;
  jurisdiction: string;
  modelId: number;
  loanId: number | null;
  visitFrom: string;
  visitTo: string;
  cases: number;
  language: string | null;
  note: string | null;
  requestedByUserId: number;
  proctorUserId: number | null;
  busyFrom: string | null;
  busyTo: string | null;
  travelDays: number | null;
  feeAmount: number | null;
  feeCurrency: string | null;
  inviteSequence: number;
  createdAt: Date;
  updatedAt: Date;
}

export const VisitEntity = new EntitySchema<VisitRow>({
  name: 'Visit',
  tableName: 'visits',
  columns: {
    id: idColumn,
    reference: { type: 'varchar', length: 24 },
    kind: { type: 'varchar', length: 16 },
    state: { type: 'varchar', length: 16 },
    hospitalId: refColumn('hospital_id'),
    siteId: refColumn('site_id'),
    siteTimeZone: { type: 'varchar', length: 64, name: 'site_time_zone' },
    jurisdiction: { type: 'varchar', length: 6 },
    modelId: refColumn('model_id'),
    loanId: refColumn('loan_id', true),
    visitFrom: dateColumn('visit_from'),
    visitTo: dateColumn('visit_to'),
    cases: { type: 'int', unsigned: true },
    language: { type: 'varchar', length: 35, nullable: true },
    note: { type: 'text', nullable: true },
    requestedByUserId: refColumn('requested_by_user_id'),
    proctorUserId: refColumn('proctor_user_id', true),
    busyFrom: dateColumn('busy_from', true),
    busyTo: dateColumn('busy_to', true),
    travelDays: { type: 'tinyint', unsigned: true, name: 'travel_days', nullable: true },
    feeAmount: {
      type: 'bigint',
      unsigned: true,
      name: 'fee_amount',
      nullable: true,
      transformer: bigintAsNumber,
    },
    feeCurrency: { type: 'char', length: 3, name: 'fee_currency', nullable: true },
    inviteSequence: { type: 'int', unsigned: true, name: 'invite_sequence' },
    createdAt: instantColumn('created_at'),
    updatedAt: instantColumn('updated_at'),
  },
});

/** A row of `visit_offers`: one candidate of a visit, in offer order. */
export interface VisitOfferRow {
  id: number;
  visitId: number;
  proctorUserId: number;
  position: number;
  state: 'queued' | 'offered' | 'accepted' | 'declined' | 'expired' | 'withdrawn' | 'skipped';
  score: number | null;
  offeredAt: Date | null;
  deadlineAt: Date | null;
  answeredAt: Date | null;
  reason: string | null;
}

export const VisitOfferEntity = new EntitySchema<VisitOfferRow>({
  name: 'VisitOffer',
  tableName: 'visit_offers',
  columns: {
    id: idColumn,
    visitId: refColumn('visit_id'),
    proctorUserId: refColumn('proctor_user_id'),
    position: { type: 'smallint', unsigned: true },
    state: { type: 'varchar', length: 16 },
    score: { type: 'decimal', precision: 5, scale: 1, nullable: true },
    offeredAt: instantColumn('offered_at', true),
    deadlineAt: instantColumn('deadline_at', true),
    answeredAt: instantColumn('answered_at', true),
    reason: { type: 'text', nullable: true },
  },
});

/** A row of `visit_events`: one thing that happened to a visit. */
export interface VisitEventRow {
  id: number;
  visitId: number;
  at: Date;
  actorUserId: number | null;
  kind: string;
  fromState: string | null;
  toState: string;
  proctorUserId: number | null;
  reason: string | null;
}

export const VisitEventEntity = new EntitySchema<VisitEventRow>({
  name: 'VisitEvent',
  tableName: 'visit_events',
  columns: {
    id: idColumn,
    visitId: refColumn('visit_id'),
    at: instantColumn('at'),
    actorUserId: refColumn('actor_user_id', true),
    kind: { type: 'varchar', length: 24 },
    fromState: { type: 'varchar', length: 16, name: 'from_state', nullable: true },
    toState: { type: 'varchar', length: 16, name: 'to_state' },
    proctorUserId: refColumn('proctor_user_id', true),
    reason: { type: 'text', nullable: true },
  },
});

/** A row of `visit_cases`: one supervised, de-identified case. */
export interface VisitCaseRow {
  id: number;
  visitId: number;
  caseNumber: number;
  traineeUserId: number;
  traineeRole: 'observed' | 'assisted' | 'performed_supervised';
  ratings: Record<string, number>;
  notes: string | null;
  recordedByUserId: number;
  createdAt: Date;
}

export const VisitCaseEntity = new EntitySchema<VisitCaseRow>({
  name: 'VisitCase',
  tableName: 'visit_cases',
  columns: {
    id: idColumn,
    visitId: refColumn('visit_id'),
    caseNumber: { type: 'smallint', unsigned: true, name: 'case_number' },
    traineeUserId: refColumn('trainee_user_id'),
    traineeRole: { type: 'varchar', length: 24, name: 'trainee_role' },
    ratings: { type: 'json' },
    notes: { type: 'text', nullable: true },
    recordedByUserId: refColumn('recorded_by_user_id'),
    createdAt: instantColumn('created_at'),
  },
});

/** A row of `visit_sign_offs`: the proctor's sign-off of one trainee. */
export interface VisitSignOffRow {
  id: number;
  visitId: number;
  traineeUserId: number;
  proctorUserId: number;
  proctoredCases: number;
  threshold: number;
  statement: string;
  signedAt: Date;
}

export const VisitSignOffEntity = new EntitySchema<VisitSignOffRow>({
  name: 'VisitSignOff',
  tableName: 'visit_sign_offs',
  columns: {
    id: idColumn,
    visitId: refColumn('visit_id'),
    traineeUserId: refColumn('trainee_user_id'),
    proctorUserId: refColumn('proctor_user_id'),
    proctoredCases: { type: 'int', unsigned: true, name: 'proctored_cases' },
    threshold: { type: 'int', unsigned: true },
    statement: { type: 'text' },
    signedAt: instantColumn('signed_at'),
  },
});
