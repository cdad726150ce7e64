import { EntitySchema, type EntitySchemaColumnOptions } from 'typeorm';
import type { CaseOutcome, ComplicationGrade } from '@evalon/evidence';
import type { Decision, DecisionReason } from '@evalon/contracts';
import { decimalAsNumber, idColumn, instantColumn, refColumn } from '../../database/columns';

/** Minutes to a tenth, millimetres to a tenth: DECIMAL read back as numbers. */
const tenths = (name: string, precision: number, nullable = false): EntitySchemaColumnOptions => ({
  type: 'decimal',
  precision,
  scale: 1,
  name,
  nullable,
  transformer: decimalAsNumber,
});

const restrict = { onDelete: 'RESTRICT', onUpdate: 'RESTRICT' } as const;

/** A row of `evaluation_cases`: one de-identified case of a loan's evaluation. */
export interface EvaluationCaseRow {
  id: number;
  loanId: number;
  caseNumber: number;
  evaluationDay: number;
  procedure: string;
  unitIds: number[];
  clinicianUserId: number;
  setupMinutes: number;
  operativeMinutes: number;
  energyMinutes: number | null;
  targetLengthMm: number | null;
  targetWidthMm: number | null;
  targetHeightMm: number | null;
  outcome: CaseOutcome | null;
  complicationGrade: ComplicationGrade | null;
  visitId: number | null;
  deviceIssues: string | null;
  note: string | null;
  recordedByUserId: number;
  createdAt: Date;
  updatedAt: Date;
}

export const EvaluationCaseEntity = new EntitySchema<EvaluationCaseRow>({
  name: 'EvaluationCase',
  tableName: 'evaluation_cases',
  columns: {
    id: idColumn,
    loanId: refColumn('loan_id'),
    caseNumber: { type: 'smallint', unsigned: true, name: 'case_number' },
    evaluationDay: { type: 'smallint', unsigned: true, name: 'evaluation_day' },
    procedure: { type: 'varchar', length: 40, name: 'procedure_family' },
    unitIds: { type: 'json', name: 'unit_ids' },
    clinicianUserId: refColumn('clinician_user_id'),
    setupMinutes: tenths('setup_minutes', 6),
    operativeMinutes: tenths('operative_minutes', 6),
    energyMinutes: tenths('energy_minutes', 6, true),
    targetLengthMm: tenths('target_length_mm', 5, true),
    targetWidthMm: tenths('target_width_mm', 5, true),
    targetHeightMm: tenths('target_height_mm', 5, true),
    outcome: { type: 'varchar', length: 24, nullable: true },
    complicationGrade: { type: 'varchar', length: 4, name: 'complication_grade', nullable: true },
    visitId: refColumn('visit_id', true),
    deviceIssues: { type: 'text', name: 'device_issues', nullable: true },
    note: { type: 'text', nullable: true },
    recordedByUserId: refColumn('recorded_by_user_id'),
    createdAt: instantColumn('created_at'),
    updatedAt: instantColumn('updated_at'),
  },
  indices: [
    { name: 'uq_evaluation_cases_number', columns: ['loanId', 'caseNumber'], unique: true },
    { name: 'ix_evaluation_cases_clinician', columns: ['clinicianUserId'] },
    { name: 'ix_evaluation_cases_visit', columns: ['visitId'] },
    { name: 'ix_evaluation_cases_recorded_by', columns: ['recordedByUserId'] },
  ],
  foreignKeys: [
    {
      name: 'fk_evaluation_cases_loan',
      target: 'Loan',
      columnNames: ['loanId'],
      referencedColumnNames: ['id'],
      ...restrict,
    },
    {
      name: 'fk_evaluation_cases_clinician',
      target: 'User',
      columnNames: ['clinicianUserId'],
      referencedColumnNames: ['id'],
      ...restrict,
    },
    {
      name: 'fk_evaluation_cases_visit',
      target: 'Visit',
      columnNames: ['visitId'],
      referencedColumnNames: ['id'],
      ...restrict,
    },
    {
      name: 'fk_evaluation_cases_recorded_by',
      target: 'User',
      columnNames: ['recordedByUserId'],
      referencedColumnNames: ['id'],
      ...restrict,
    },
  ],
});

/** A row of `evaluation_feedback`: one clinician's survey on one loan. */
export interface EvaluationFeedbackRow {
  id: number;
  loanId: number;
  clinicianUserId: number;
  ratings: Record<string, number>;
  comment: string | null;
  createdAt: Date;
  updatedAt: Date;
}

export const EvaluationFeedbackEntity = new EntitySchema<EvaluationFeedbackRow>({
  name: 'EvaluationFeedback',
  tableName: 'evaluation_feedback',
  columns: {
    id: idColumn,
    loanId: refColumn('loan_id'),
    clinicianUserId: refColumn('clinician_user_id'),
    ratings: { type: 'json' },
    comment: { type: 'text', nullable: true },
    createdAt: instantColumn('created_at'),
    updatedAt: instantColumn('updated_at'),
  },
  indices: [
    {
      name: 'uq_evaluation_feedback_clinician',
      columns: ['loanId', 'clinicianUserId'],
      unique: true,
    },
    { name: 'ix_evaluation_feedback_clinician', columns: ['clinicianUserId'] },
  ],
  foreignKeys: [
    {
      name: 'fk_evaluation_feedback_loan',
      target: 'Loan',
      columnNames: ['loanId'],
      referencedColumnNames: ['id'],
      ...restrict,
    },
    {
      name: 'fk_evaluation_feedback_clinician',
      target: 'User',
      columnNames: ['clinicianUserId'],
      referencedColumnNames: ['id'],
      ...restrict,
    },
  ],
});

/** A row of `evaluation_decisions`: the hospital's decision on a loan's platform. */
export interface EvaluationDecisionRow {
  loanId: number;
  decision: Decision;
  reasons: DecisionReason[];
  note: string | null;
  decidedByUserId: number;
  decidedAt: Date;
}

export const EvaluationDecisionEntity = new EntitySchema<EvaluationDecisionRow>({
  name: 'EvaluationDecision',
  tableName: 'evaluation_decisions',
  columns: {
    loanId: { type: 'int', unsigned: true, name: 'loan_id', primary: true },
    decision: { type: 'varchar', length: 8 },
    reasons: { type: 'json' },
    note: { type: 'text', nullable: true },
    decidedByUserId: refColumn('decided_by_user_id'),
    decidedAt: instantColumn('decided_at'),
  },
  indices: [{ name: 'ix_evaluation_decisions_decided_by', columns: ['decidedByUserId'] }],
  foreignKeys: [
    {
      name: 'fk_evaluation_decisions_loan',
      target: 'Loan',
      columnNames: ['loanId'],
      referencedColumnNames: ['id'],
      ...restrict,
    },
    {
      name: 'fk_evaluation_decisions_decided_by',
      target: 'User',
      columnNames: ['decidedByUserId'],
      referencedColumnNames: ['id'],
      ...restrict,
    },
  ],
});

/** The hospital's consent to share the loan's evaluation report with the lender. */
export interface EvaluationSharingRow {
  loanId: number;
  /** Whether the lender's people may read the report, its PDF and the de-identified cases. */
  sharedWithLender: boolean;
  changedByUserId: number;
  changedAt: Date;
}

export const EvaluationSharingEntity = new EntitySchema<EvaluationSharingRow>({
  name: 'EvaluationSharing',
  tableName: 'evaluation_sharing',
  columns: {
    loanId: { type: 'int', unsigned: true, name: 'loan_id', primary: true },
    sharedWithLender: { type: 'boolean', width: 1, name: 'shared_with_lender' },
    changedByUserId: refColumn('changed_by_user_id'),
    changedAt: instantColumn('changed_at'),
  },
  indices: [{ name: 'ix_evaluation_sharing_changed_by', columns: ['changedByUserId'] }],
  foreignKeys: [
    {
      name: 'fk_evaluation_sharing_loan',
      target: 'Loan',
      columnNames: ['loanId'],
      referencedColumnNames: ['id'],
      ...restrict,
    },
    {
      name: 'fk_evaluation_sharing_changed_by',
      target: 'User',
      columnNames: ['changedByUserId'],
      referencedColumnNames: ['id'],
      ...restrict,
    },
  ],
});

export const evidenceEntities = [
  EvaluationCaseEntity,
  EvaluationFeedbackEntity,
  EvaluationDecisionEntity,
  EvaluationSharingEntity,
];
