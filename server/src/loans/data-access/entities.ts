import { EntitySchema } from 'typeorm';
import type { LoanState } from '@evalon/contracts';
import { bigintAsNumber, idColumn, instantColumn, refColumn } from '../../database/columns';

const dateColumn = (name: string) => ({ type: 'date' as const, name });

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
    note: { type: 'text', nullable: true },
    requestedByUserId: refColumn('requested_by_user_id'),
    createdAt: instantColumn('created_at'),
    updatedAt: instantColumn('updated_at'),
  },
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
});
