import { DepositError } from './errors';

const DAY_MS = 24 * 60 * 60 * 1000;

/**
 * How long a card authorisation for an online card payment stays valid: 7 days, per the payment
 * provider's public documentation (as copied into docs/references.md, "Money and
 * payments"; an expired hold becomes `canceled`). Some networks allow less for some transactions
 * (merchant-initiated on one network: 4 days 18 h); pass a shorter `windowMs` for those.
 */
export const CARD_AUTHORISATION_WINDOW_MS = 7 * DAY_MS;

/**
 * How a deposit is secured: an authorisation hold captured at settlement (manual capture), or a
 * charge now with a refund at settlement.
 */
export type DepositStrategy = 'authorise_hold' | 'charge_now_refund_later';

/** An instant: a `Date`, or an ISO 8601 string that carries its UTC offset (`Z` or `±hh:mm`). */
export type Instant = Date | string;

/** Input of {@link chooseStrategy}. */
export interface StrategyInput {
  /** Start of the loan's footprint (`shipBy`). */
  footprintStart: Instant;
  /**
   * End of the loan's footprint: the instant by which the deposit can be settled, i.e. the end of
   * the `readyAgain` day in the depot's time zone.
   */
  footprintEnd: Instant;
  /** When the deposit would be secured (the authorisation would be placed). */
  now: Instant;
  /** Validity of the authorisation; defaults to {@link CARD_AUTHORISATION_WINDOW_MS}. */
  windowMs?: number;
}

/** A date-time without an offset would be read in the machine's zone; refuse it. */
const ISO_WITH_OFFSET = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2})$/i;

function toEpochMs(value: Instant, label: string): number {
  let ms = NaN;
  if (value instanceof Date) {
    ms = value.getTime();
  } else if (typeof value === 'string' && ISO_WITH_OFFSET.test(value)) {
    ms = Date.parse(value);
  }
  if (Number.isNaN(ms)) {
    throw new DepositError(
      'invalid_instant',
      `${label} must be a valid Date or an ISO 8601 date-time with an offset, got ${String(value)}`,
    );
  }
  return ms;
}

/**
 * Chooses how to secure the deposit. An authorisation hold is used only when it would still be
 * valid at settlement: the whole span from `now` (when the hold is placed) to the footprint's end
 * (`readyAgain`) must be strictly shorter than the authorisation window. Otherwise the deposit is
 * charged now and refunded at settlement.
 *
 * Edge: a span of exactly the window (7 days) is charged now. At that instant the hold is
 * expiring, and settlement (posting inspection charges, capturing) takes time, so we keep to the
 * side where the deposit cannot lapse. Spans are elapsed time, so a daylight-saving change inside
 * the footprint neither adds nor removes an hour of validity.
 *
 * @param input Footprint, the time now, and optionally a shorter window.
 * @returns `'authorise_hold'` or `'charge_now_refund_later'`.
 * @throws {DepositError} `invalid_instant`, or `invalid_footprint` when the footprint ends before
 *   it starts or has already ended at `now`.
 */
export function chooseStrategy(input: StrategyInput): DepositStrategy {
  const start = toEpochMs(input.footprintStart, 'footprintStart');
  const end = toEpochMs(input.footprintEnd, 'footprintEnd');
  const now = toEpochMs(input.now, 'now');
  const windowMs = input.windowMs ?? CARD_AUTHORISATION_WINDOW_MS;
  if (!Number.isFinite(windowMs) || windowMs <= 0) {
    throw new DepositError('invalid_footprint', `windowMs must be positive, got ${windowMs}`);
  }
  if (end < start) {
    throw new DepositError(
      'invalid_footprint',
      `Footprint ends (${new Date(end).toISOString()}) before it starts (${new Date(start).toISOString()})`,
    );
  }
  if (end <= now) {
    throw new DepositError(
      'invalid_footprint',
      `Footprint already ended at ${new Date(end).toISOString()}; no deposit strategy applies`,
    );
  }
  return end - now < windowMs ? 'authorise_hold' : 'charge_now_refund_later';
}
