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
    inviteSequence: { type: 'int', unsigned: true, name: 'invite_sequence', default: 0 },
    createdAt: instantColumn('created_at'),
    updatedAt: instantColumn('updated_at'),
  },
  indices: [
    { name: 'ix_visits_hospital_state', columns: ['hospitalId', 'state'] },
    { name: 'ix_visits_loan', columns: ['loanId'] },
    {
      name: 'ix_visits_proctor_busy',
      columns: ['proctorUserId', 'state', 'busyFrom', 'busyTo'],
    },
    { name: 'ix_visits_updated', columns: ['updatedAt'] },
    { name: 'uq_visits_reference', columns: ['reference'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_visits_hospital',
      target: 'Organisation',
      columnNames: ['hospitalId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_visits_loan',
      target: 'Loan',
      columnNames: ['loanId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_visits_model',
      target: 'Model',
      columnNames: ['modelId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_visits_proctor',
      target: 'ProctorProfile',
      columnNames: ['proctorUserId'],
      referencedColumnNames: ['userId'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_visits_requested_by',
      target: 'User',
      columnNames: ['requestedByUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_visits_site',
      target: 'Site',
      columnNames: ['siteId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** `visit_offers.live_visit_id`, as the proctoring migration declares it. */
const LIVE_OFFER_EXPRESSION = "IF(state = 'offered', visit_id, NULL)";

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
  /**
   * `visit_id` while the offer is live, NULL otherwise (computed by the database). Its unique key
   * is the second guard, behind the visit lock, that a visit never has two live offers. Never
   * written, and not selected: the code reads `state`.
   */
  liveVisitId?: number | null;
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
    // The expression is compared as text with the row the proctoring migration put in
    // `typeorm_metadata` (TypeORM reads it from there, not from information_schema): keep the two
    // identical. STORED is TypeORM's name for MariaDB's PERSISTENT.
    liveVisitId: {
      type: 'int',
      unsigned: true,
      name: 'live_visit_id',
      nullable: true,
      generatedType: 'STORED',
      asExpression: LIVE_OFFER_EXPRESSION,
      insert: false,
      update: false,
      select: false,
    },
  },
  indices: [
    { name: 'ix_visit_offers_deadline', columns: ['state', 'deadlineAt'] },
    { name: 'ix_visit_offers_offered', columns: ['offeredAt'] },
    { name: 'ix_visit_offers_proctor_offered', columns: ['proctorUserId', 'offeredAt'] },
    { name: 'ix_visit_offers_proctor_state', columns: ['proctorUserId', 'state'] },
    { name: 'uq_visit_offers_live', columns: ['liveVisitId'], unique: true },
    { name: 'uq_visit_offers_proctor', columns: ['visitId', 'proctorUserId'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_visit_offers_proctor',
      target: 'ProctorProfile',
      columnNames: ['proctorUserId'],
      referencedColumnNames: ['userId'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_visit_offers_visit',
      target: 'Visit',
      columnNames: ['visitId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
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
  indices: [{ name: 'ix_visit_events_visit', columns: ['visitId', 'id'] }],
  foreignKeys: [
    {
      name: 'fk_visit_events_actor',
      target: 'User',
      columnNames: ['actorUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_visit_events_visit',
      target: 'Visit',
      columnNames: ['visitId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
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
  indices: [
    { name: 'ix_visit_cases_trainee', columns: ['traineeUserId'] },
    { name: 'uq_visit_cases_number', columns: ['visitId', 'caseNumber'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_visit_cases_recorded_by',
      target: 'User',
      columnNames: ['recordedByUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_visit_cases_trainee',
      target: 'User',
      columnNames: ['traineeUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_visit_cases_visit',
      target: 'Visit',
      columnNames: ['visitId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
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
  indices: [
    { name: 'uq_visit_sign_offs_trainee', columns: ['visitId', 'traineeUserId'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_visit_sign_offs_proctor',
      target: 'User',
      columnNames: ['proctorUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_visit_sign_offs_trainee',
      target: 'User',
      columnNames: ['traineeUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_visit_sign_offs_visit',
      target: 'Visit',
      columnNames: ['visitId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `visit_model_settings`: a lender's per-model minimum supervised cases. */
export interface VisitModelSettingRow {
  modelId: number;
  minSupervisedCases: number;
  updatedByUserId: number | null;
  updatedAt: Date;
}

export const VisitModelSettingEntity = new EntitySchema<VisitModelSettingRow>({
  name: 'VisitModelSetting',
  tableName: 'visit_model_settings',
  columns: {
    modelId: { type: 'int', unsigned: true, primary: true, name: 'model_id' },
    minSupervisedCases: { type: 'smallint', unsigned: true, name: 'min_supervised_cases' },
    updatedByUserId: refColumn('updated_by_user_id', true),
    updatedAt: instantColumn('updated_at'),
  },
  indices: [{ name: 'ix_visit_model_settings_user', columns: ['updatedByUserId'] }],
  foreignKeys: [
    {
      name: 'fk_visit_model_settings_model',
      target: 'Model',
      columnNames: ['modelId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_visit_model_settings_user',
      target: 'User',
      columnNames: ['updatedByUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});
