import { DateTime } from 'luxon';
import { chooseStrategy, type DepositStrategy } from '@evalon/deposits';

/** One unit's depot calendar days that bound the deposit: when it ships and is ready again. */
export interface UnitFootprintDays {
  /** `YYYY-MM-DD` in the depot's zone. */
  shipBy: string;
  /** `YYYY-MM-DD` in the depot's zone. */
  readyAgain: string;
  /** IANA zone of the unit's depot. */
  depotTimeZone: string;
}

/**
 * The loan's footprint as instants: from the start of the earliest ship-by day to the end of the
 * latest ready-again day, each read in its own depot's zone (a multi-depot loan can span zones).
 * The end is when the deposit can be settled, as `chooseStrategy` asks.
 */
export function footprintInstants(units: readonly UnitFootprintDays[]): { start: Date; end: Date } {
  if (units.length === 0) throw new Error('a loan without units has no footprint');
  let start = Infinity;
  let end = -Infinity;
  for (const u of units) {
    const ship = DateTime.fromISO(u.shipBy, { zone: u.depotTimeZone }).startOf('day');
    const ready = DateTime.fromISO(u.readyAgain, { zone: u.depotTimeZone })
      .plus({ days: 1 })
      .startOf('day');
    if (!ship.isValid || !ready.isValid) {
      throw new Error(`bad footprint days ${u.shipBy}..${u.readyAgain} in ${u.depotTimeZone}`);
    }
    start = Math.min(start, ship.toMillis());
    end = Math.max(end, ready.toMillis());
  }
  return { start: new Date(start), end: new Date(end) };
}

/**
 * How a card deposit is secured now: delegated to `chooseStrategy` of @evalon/deposits (a hold
 * only when the whole footprint ends inside the card authorisation window, else a charge).
 */
export function cardStrategy(units: readonly UnitFootprintDays[], now: Date): DepositStrategy {
  const { start, end } = footprintInstants(units);
  return chooseStrategy({ footprintStart: start, footprintEnd: end, now });
}

/** The deposit deadline rule, from @evalon/deposits (computed once there for every caller). */
export { depositDeadline } from '@evalon/deposits';
