import { EntitySchema } from 'typeorm';
import type { DepositStrategyName, LoanState } from '@evalon/contracts';
import {
  bigintAsNumber,
  dateColumn,
  idColumn,
  instantColumn,
  refColumn,
} from '../../database/columns';

/** A row of `loans`. Dates are `YYYY-MM-DD` in the hospital site's zone (`siteTimeZone`). */
export interface LoanRow {
  id: number;
  /** `EV-<year>-<number>`, the number from `loan_reference_seq` (6 digits or more). */
  reference: string;
  state: LoanState;
  hospitalId: number;
  siteId: number;
  siteTimeZone: string;
  lenderId: number;
  useFrom: string;
  useTo: string;
  shipBy: string;
  deliverBy: string;
  returnShipBy: string;
  backAtDepot: string;
  readyAgain: string;
  depositAmount: number;
  depositCurrency: string;
  /** The deadline to secure the deposit, stored at approval (null before, or for old rows). */
  depositDueAt: Date | null;
  /** How the deposit was secured, once it was. */
  depositStrategy: DepositStrategyName | null;
  purchaseOrderNumber: string | null;
  confirmedAt: Date | null;
  note: string | null;
  requestedByUserId: number;
  createdAt: Date;
  updatedAt: Date;
}

export const LoanEntity = new EntitySchema<LoanRow>({
  name: 'Loan',
  tableName: 'loans',
  columns: {
    id: idColumn,
    reference: { type: 'varchar', length: 24 },
    state: { type: 'varchar', length: 16 },
    hospitalId: refColumn('hospital_id'),
    siteId: refColumn('site_id'),
    siteTimeZone: { type: 'varchar', length: 64, name: 'site_time_zone' },
    lenderId: refColumn('lender_id'),
    useFrom: dateColumn('use_from'),
    useTo: dateColumn('use_to'),
    shipBy: dateColumn('ship_by'),
    deliverBy: dateColumn('deliver_by'),
    returnShipBy: dateColumn('return_ship_by'),
    backAtDepot: dateColumn('back_at_depot'),
    readyAgain: dateColumn('ready_again'),
    depositAmount: {
      type: 'bigint',
      unsigned: true,
      name: 'deposit_amount',
      transformer: bigintAsNumber,
    },
    depositCurrency: { type: 'char', length: 3, name: 'deposit_currency' },
    depositDueAt: instantColumn('deposit_due_at', true),
    depositStrategy: { type: 'varchar', length: 32, name: 'deposit_strategy', nullable: true },
    purchaseOrderNumber: {
      type: 'varchar',
      length: 64,
      name: 'purchase_order_number',
      nullable: true,
    },
    confirmedAt: instantColumn('confirmed_at', true),
    note: { type: 'text', nullable: true },
    requestedByUserId: refColumn('requested_by_user_id'),
    createdAt: instantColumn('created_at'),
    updatedAt: instantColumn('updated_at'),
  },
  indices: [
    { name: 'ix_loans_hospital_state', columns: ['hospitalId', 'state'] },
    { name: 'ix_loans_lender_state', columns: ['lenderId', 'state'] },
    { name: 'ix_loans_state', columns: ['state'] },
    { name: 'ix_loans_state_deposit_due', columns: ['state', 'depositDueAt'] },
    { name: 'uq_loans_reference', columns: ['reference'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_loans_hospital',
      target: 'Organisation',
      columnNames: ['hospitalId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_loans_lender',
      target: 'Organisation',
      columnNames: ['lenderId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_loans_requested_by',
      target: 'User',
      columnNames: ['requestedByUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_loans_site',
      target: 'Site',
      columnNames: ['siteId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `loan_units`: one unit of a loan with its own milestones (depot dates in its zone). */
export interface LoanUnitRow {
  loanId: number;
  unitId: number;
  hospitalId: number;
  modelId: number;
  depotId: number;
  depotTimeZone: string;
  shipBy: string;
  deliverBy: string;
  useFrom: string;
  useTo: string;
  returnShipBy: string;
  backAtDepot: string;
  readyAgain: string;
  depositAmount: number;
}

export const LoanUnitEntity = new EntitySchema<LoanUnitRow>({
  name: 'LoanUnit',
  tableName: 'loan_units',
  columns: {
    loanId: { type: 'int', unsigned: true, primary: true, name: 'loan_id' },
    unitId: { type: 'int', unsigned: true, primary: true, name: 'unit_id' },
    hospitalId: refColumn('hospital_id'),
    modelId: refColumn('model_id'),
    depotId: refColumn('depot_id'),
    depotTimeZone: { type: 'varchar', length: 64, name: 'depot_time_zone' },
    shipBy: dateColumn('ship_by'),
    deliverBy: dateColumn('deliver_by'),
    useFrom: dateColumn('use_from'),
    useTo: dateColumn('use_to'),
    returnShipBy: dateColumn('return_ship_by'),
    backAtDepot: dateColumn('back_at_depot'),
    readyAgain: dateColumn('ready_again'),
    depositAmount: {
      type: 'bigint',
      unsigned: true,
      name: 'deposit_amount',
      transformer: bigintAsNumber,
    },
  },
  indices: [
    { name: 'ix_loan_units_hospital_model', columns: ['hospitalId', 'modelId'] },
    { name: 'ix_loan_units_unit', columns: ['unitId'] },
  ],
  foreignKeys: [
    {
      name: 'fk_loan_units_depot',
      target: 'Site',
      columnNames: ['depotId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_loan_units_loan',
      target: 'Loan',
      columnNames: ['loanId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_loan_units_model',
      target: 'Model',
      columnNames: ['modelId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_loan_units_unit',
      target: 'Unit',
      columnNames: ['unitId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `holds`: a blocked interval of a unit, both ends included, depot calendar. */
export interface HoldRow {
  id: number;
  unitId: number;
  kind: 'loan' | 'maintenance';
  startDate: string;
  endDate: string;
  loanId: number | null;
  /** The loan's hospital (copied so the availability search needs no join); null otherwise. */
  hospitalId: number | null;
  reason: string | null;
  /** The unit's booking_version after the write that made this hold (unique per unit). */
  sequence: number;
  createdAt: Date;
  createdByUserId: number | null;
}

export const HoldEntity = new EntitySchema<HoldRow>({
  name: 'Hold',
  tableName: 'holds',
  columns: {
    id: idColumn,
    unitId: refColumn('unit_id'),
    kind: { type: 'varchar', length: 16 },
    startDate: dateColumn('start_date'),
    endDate: dateColumn('end_date'),
    loanId: refColumn('loan_id', true),
    hospitalId: refColumn('hospital_id', true),
    reason: { type: 'varchar', length: 300, nullable: true },
    sequence: { type: 'int', unsigned: true },
    createdAt: instantColumn('created_at'),
    createdByUserId: refColumn('created_by_user_id', true),
  },
  indices: [
    { name: 'ix_holds_loan', columns: ['loanId'] },
    { name: 'ix_holds_unit_end', columns: ['unitId', 'endDate', 'startDate'] },
    { name: 'uq_holds_unit_sequence', columns: ['unitId', 'sequence'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_holds_hospital',
      target: 'Organisation',
      columnNames: ['hospitalId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_holds_loan',
      target: 'Loan',
      columnNames: ['loanId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_holds_unit',
      target: 'Unit',
      columnNames: ['unitId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_holds_user',
      target: 'User',
      columnNames: ['createdByUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `loan_events`: one state change of a loan, with who, when and why. */
export interface LoanEventRow {
  id: number;
  loanId: number;
  at: Date;
  actorUserId: number | null;
  fromState: LoanState | null;
  toState: LoanState;
  reason: string | null;
}

export const LoanEventEntity = new EntitySchema<LoanEventRow>({
  name: 'LoanEvent',
  tableName: 'loan_events',
  columns: {
    id: idColumn,
    loanId: refColumn('loan_id'),
    at: instantColumn('at'),
    actorUserId: refColumn('actor_user_id', true),
    fromState: { type: 'varchar', length: 16, name: 'from_state', nullable: true },
    toState: { type: 'varchar', length: 16, name: 'to_state' },
    reason: { type: 'text', nullable: true },
  },
  indices: [{ name: 'ix_loan_events_loan', columns: ['loanId', 'id'] }],
  foreignKeys: [
    {
      name: 'fk_loan_events_actor',
      target: 'User',
      columnNames: ['actorUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_loan_events_loan',
      target: 'Loan',
      columnNames: ['loanId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});
