import { DateTime } from 'luxon';

/** How long a buyer has to secure the deposit after approval unless configured otherwise. */
export const defaultDepositWindowMs = 72 * 3_600_000;

/** A loan unit's ship-by day, as the deadline needs it. */
export interface DeadlineUnit {
  /** `YYYY-MM-DD` in the depot's zone. */
  shipBy: string;
  /** IANA zone of the unit's depot. */
  depotTimeZone: string;
}

/**
 * The deadline to secure one unit's deposit: the approval time plus `windowMs`, but never later
 * than the start of the unit's ship-by day in its depot's zone (a unit does not ship before its
 * deposit is secured), and never before the approval itself (a same-day loan).
 *
 * Why the start of the ship-by day rather than the depot's cut-off time on that day: the
 * coordinator must know on the morning of the ship day whether to pack. A product default, not
 * a rule from any source.
 */
export function unitDepositDueBy(
  approvedAt: Date,
  shipBy: string,
  depotTimeZone: string,
  windowMs = defaultDepositWindowMs,
): Date {
  const window = new Date(approvedAt.getTime() + windowMs);
  const shipDay = DateTime.fromISO(shipBy, { zone: depotTimeZone }).startOf('day');
  if (!shipDay.isValid) return window;
  const latest = shipDay.toJSDate();
  const due = latest < window ? latest : window;
  return due < approvedAt ? approvedAt : due;
}

/**
 * The loan's deadline to secure its deposit: the earliest of its units' deadlines
 * ({@link unitDepositDueBy}). Computed once, at approval, and stored with the loan; the expiry
 * job, the deposit page and the approval e-mail all read the stored instant.
 */
export function depositDeadline(
  approvedAt: Date,
  units: readonly DeadlineUnit[],
  windowMs: number,
): Date {
  let due = new Date(approvedAt.getTime() + windowMs);
  for (const u of units) {
    const d = unitDepositDueBy(approvedAt, u.shipBy, u.depotTimeZone, windowMs);
    if (d < due) due = d;
  }
  return due;
}
