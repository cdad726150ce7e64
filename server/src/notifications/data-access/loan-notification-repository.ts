import type { EntityManager } from 'typeorm';
import type { Loan, LoanState } from '@evalon/contracts';
import type { ReceivingHours } from '@evalon/messages';

/** Everything the loan e-mails and notifications need about one loan. */
export interface LoanNotificationData {
  /** The loan in the contract's shape, as the message templates take it. */
  loan: Loan;
  /** Street address of the hospital site, for the invite's LOCATION. */
  siteAddress: string;
  /** Receiving hours of the site, when its free text names a `HH:mm–HH:mm` span. */
  receivingHours?: ReceivingHours;
  /** Zone for lender people who have not chosen one: the first unit's depot zone. */
  lenderTimeZone: string;
  /** Deadline to secure the deposit, when the loans component stores one. */
  depositDueBy: Date | null;
  /** When the loan was (last) approved, from its event trail. */
  approvedAt: Date | null;
  /** The calendar invite as it stands. */
  invite: {
    /** SEQUENCE of the current revision (RFC 5545 §3.8.7.4). */
    sequence: number;
    /** Whether a REQUEST went out (the loan was confirmed), so a cancel must withdraw it. */
    sent: boolean;
  };
  /** For an expired loan: the state it expired from and when, from its event trail. */
  expiry: { from: 'requested' | 'approved'; at: Date } | null;
}

/** Loads {@link LoanNotificationData}; the loans component may supply its own. */
export interface LoanNotificationLoader {
  load(manager: EntityManager, loanId: number): Promise<LoanNotificationData | null>;
}

const hoursSpan = /([01]\d|2[0-3]):([0-5]\d)\s*[–—-]\s*([01]\d|2[0-3]):([0-5]\d)/;

/** The first `HH:mm–HH:mm` span in a site's free-text receiving hours, if any. */
export function parseReceivingHours(text: string | null): ReceivingHours | undefined {
  const m = text ? hoursSpan.exec(text) : null;
  if (!m) return undefined;
  const from = `${m[1]}:${m[2]}`;
  const to = `${m[3]}:${m[4]}`;
  return to > from ? { from, to } : undefined;
}

interface LoanQueryRow {
  id: number;
  reference: string;
  state: LoanState;
  hospitalId: number;
  hospitalName: string;
  siteId: number;
  siteName: string;
  siteTimeZone: string;
  addressLine: string;
  city: string;
  postalCode: string | null;
  region: string | null;
  country: string;
  receivingHours: string | null;
  lenderId: number;
  lenderName: string;
  useFrom: string;
  useTo: string;
  shipBy: string;
  deliverBy: string;
  returnShipBy: string;
  backAtDepot: string;
  readyAgain: string;
  depositAmount: number | string;
  depositCurrency: string;
  note: string | null;
  depositDueAt: Date | string | null;
  requestedBy: string;
  createdAt: Date;
}

interface UnitQueryRow {
  unitId: number;
  modelId: number;
  modelName: string;
  serialNumber: string;
  depotId: number;
  depotName: string;
  depotTimeZone: string;
  shipBy: string;
  deliverBy: string;
  useFrom: string;
  useTo: string;
  returnShipBy: string;
  backAtDepot: string;
  readyAgain: string;
  depositAmount: number | string;
}

// DATE columns are formatted in SQL so they arrive as the calendar days they are (a JS Date
// would put them at midnight in some zone).
const day = (column: string, alias: string) => `DATE_FORMAT(${column}, '%Y-%m-%d') AS ${alias}`;

/**
 * Reads a loan from the loans tables (`loans`, `loan_units`, `units`, `models`, `sites`,
 * `organisations`, `users`, `loan_events`) in the caller's transaction, so it sees the change the
 * loans component is making. Written against the loans migration 1764720060000; if the loans
 * component gains a loader of its own for the `Loan` contract, pass that instead.
 *
 * `depositDueBy` is the deadline stored at approval (`loans.deposit_due_at`); the invite SEQUENCE
 * is 0 (no flow changes a confirmed loan's dates yet).
 */
export const sqlLoanNotificationLoader: LoanNotificationLoader = {
  async load(m, loanId) {
    const [row]: LoanQueryRow[] = await m.query(
      `SELECT l.id, l.reference, l.state,
              l.hospital_id AS hospitalId, h.name AS hospitalName,
              l.site_id AS siteId, s.name AS siteName, l.site_time_zone AS siteTimeZone,
              s.address_line AS addressLine, s.city, s.postal_code AS postalCode, s.region,
              s.country, s.receiving_hours AS receivingHours,
              l.lender_id AS lenderId, lo.name AS lenderName,
              ${day('l.use_from', 'useFrom')}, ${day('l.use_to', 'useTo')},
              ${day('l.ship_by', 'shipBy')}, ${day('l.deliver_by', 'deliverBy')},
              ${day('l.return_ship_by', 'returnShipBy')}, ${day('l.back_at_depot', 'backAtDepot')},
              ${day('l.ready_again', 'readyAgain')},
              l.deposit_amount AS depositAmount, l.deposit_currency AS depositCurrency, l.note,
              l.deposit_due_at AS depositDueAt,
              u.name AS requestedBy, l.created_at AS createdAt
         FROM loans l
         JOIN organisations h ON h.id = l.hospital_id
         JOIN organisations lo ON lo.id = l.lender_id
         JOIN sites s ON s.id = l.site_id
         JOIN users u ON u.id = l.requested_by_user_id
        WHERE l.id = ?`,
      [loanId],
    );
    if (!row) return null;
    const units: UnitQueryRow[] = await m.query(
      `SELECT lu.unit_id AS unitId, lu.model_id AS modelId, md.name AS modelName,
              un.serial_number AS serialNumber, lu.depot_id AS depotId, d.name AS depotName,
              lu.depot_time_zone AS depotTimeZone,
              ${day('lu.ship_by', 'shipBy')}, ${day('lu.deliver_by', 'deliverBy')},
              ${day('lu.use_from', 'useFrom')}, ${day('lu.use_to', 'useTo')},
              ${day('lu.return_ship_by', 'returnShipBy')}, ${day('lu.back_at_depot', 'backAtDepot')},
              ${day('lu.ready_again', 'readyAgain')}, lu.deposit_amount AS depositAmount
         FROM loan_units lu
         JOIN units un ON un.id = lu.unit_id
         JOIN models md ON md.id = lu.model_id
         JOIN sites d ON d.id = lu.depot_id
        WHERE lu.loan_id = ?
        ORDER BY lu.unit_id`,
      [loanId],
    );
    const events: { fromState: LoanState | null; toState: LoanState; at: Date }[] = await m.query(
      `SELECT from_state AS fromState, to_state AS toState, at
         FROM loan_events WHERE loan_id = ? ORDER BY id`,
      [loanId],
    );
    const milestonesOf = (r: LoanQueryRow | UnitQueryRow) => ({
      shipBy: r.shipBy,
      deliverBy: r.deliverBy,
      useFrom: r.useFrom,
      useTo: r.useTo,
      returnShipBy: r.returnShipBy,
      backAtDepot: r.backAtDepot,
      readyAgain: r.readyAgain,
    });
    const loan: Loan = {
      id: Number(row.id),
      reference: row.reference,
      state: row.state,
      hospitalId: Number(row.hospitalId),
      hospitalName: row.hospitalName,
      siteId: Number(row.siteId),
      siteName: row.siteName,
      siteTimeZone: row.siteTimeZone,
      lenderId: Number(row.lenderId),
      lenderName: row.lenderName,
      useFrom: row.useFrom,
      useTo: row.useTo,
      milestones: milestonesOf(row),
      units: units.map((u) => ({
        unitId: Number(u.unitId),
        modelId: Number(u.modelId),
        modelName: u.modelName,
        serialNumber: u.serialNumber,
        depotId: Number(u.depotId),
        depotName: u.depotName,
        milestones: milestonesOf(u),
        deposit: { amount: Number(u.depositAmount), currency: row.depositCurrency },
      })),
      deposit: { amount: Number(row.depositAmount), currency: row.depositCurrency },
      note: row.note,
      requestedBy: row.requestedBy,
      createdAt: new Date(row.createdAt).toISOString(),
    };
    const expired = [...events].reverse().find((e) => e.toState === 'expired');
    const approval = [...events].reverse().find((e) => e.toState === 'approved');
    const wasApproved = approval !== undefined;
    return {
      loan,
      siteAddress: [
        row.addressLine,
        [row.postalCode, row.city].filter(Boolean).join(' '),
        row.region,
        row.country,
      ]
        .filter(Boolean)
        .join('\n'),
      receivingHours: parseReceivingHours(row.receivingHours),
      lenderTimeZone: units[0]?.depotTimeZone ?? row.siteTimeZone,
      depositDueBy: row.depositDueAt ? new Date(row.depositDueAt) : null,
      approvedAt: approval ? new Date(approval.at) : null,
      invite: { sequence: 0, sent: events.some((e) => e.toState === 'confirmed') },
      expiry:
        row.state === 'expired' || expired
          ? {
              from:
                expired?.fromState === 'requested' || expired?.fromState === 'approved'
                  ? expired.fromState
                  : wasApproved
                    ? 'approved'
                    : 'requested',
              at: expired ? new Date(expired.at) : new Date(),
            }
          : null,
    };
  },
};
