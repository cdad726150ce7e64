import { assertIsoDate, calendarDaysBetween } from './business-days';
import {
  DateInterval,
  FootprintInput,
  LoanFootprint,
  computeFootprint,
  createFootprintPlanner,
} from './footprint';

/** The default search horizon of {@link earliestFeasibleWindow}, in calendar days. */
export const DEFAULT_HORIZON_DAYS = 180;

function assertInterval(interval: DateInterval): void {
  assertIsoDate(interval.start);
  assertIsoDate(interval.end);
  if (interval.end < interval.start) {
    throw new RangeError(`Interval ends ${interval.end} before it starts ${interval.start}`);
  }
}

/**
 * Whether two closed date intervals share at least one day. Touching intervals overlap
 * (`[1, 3]` and `[3, 5]` share day 3) because a hold blocks its first and last day entirely.
 * `YYYY-MM-DD` strings compare like the dates they name.
 */
export function intervalsOverlap(a: DateInterval, b: DateInterval): boolean {
  assertInterval(a);
  assertInterval(b);
  return a.start <= b.end && b.start <= a.end;
}

/** Result of {@link checkFeasibility}. */
export interface FeasibilityCheck<H extends DateInterval = DateInterval> {
  /** Whether the footprint fits: no conflicting hold and the ship-by cut-off not passed. */
  feasible: boolean;
  /** Whether the cut-off on `shipBy` has passed (copied from the footprint). */
  shipByPassed: boolean;
  /** The holds that overlap the footprint's hold, in the order given. */
  conflicts: H[];
}

/**
 * Checks a footprint against a unit's other holds (each a closed interval in the depot's
 * calendar) and says why it does not fit.
 */
export function checkFeasibility<H extends DateInterval>(
  footprint: LoanFootprint,
  holds: readonly H[],
): FeasibilityCheck<H> {
  const conflicts = holds.filter((hold) => intervalsOverlap(footprint.hold, hold));
  return {
    feasible: conflicts.length === 0 && !footprint.shipByPassed,
    shipByPassed: footprint.shipByPassed,
    conflicts,
  };
}

/**
 * Whether a footprint fits a unit: its hold `[shipBy, readyAgain]` overlaps none of `holds` and
 * its ship-by cut-off has not passed.
 */
export function isFeasible(footprint: LoanFootprint, holds: readonly DateInterval[]): boolean {
  return checkFeasibility(footprint, holds).feasible;
}

/** A use window found by the availability search. */
export interface FeasibleWindow {
  /** First case day of the window found. */
  useFrom: string;
  /** Last case day of the window found (same length as the requested window). */
  useTo: string;
  /** Calendar days between the requested and the found `useFrom` (0 = as requested). */
  shiftDays: number;
  /** Footprint of the window found. */
  footprint: LoanFootprint;
}

function assertHorizon(horizonDays: number): void {
  if (!Number.isInteger(horizonDays) || horizonDays < 0) {
    throw new RangeError(`horizonDays must be a whole number ≥ 0, got ${horizonDays}`);
  }
}

/**
 * Finds the earliest feasible use window for one unit: the requested window, else the same
 * window moved later one calendar day at a time (its length in days kept), trying starts
 * `useFrom + 0 … useFrom + horizonDays`. A window is feasible when its footprint overlaps no hold
 * and, when `input.now` is given, its ship-by cut-off has not passed.
 *
 * Why day by day: milestones depend on two calendars, so moving the window by one day can move
 * `shipBy` by zero or several days; checking every start is simple and obviously complete. It
 * stays cheap because each start costs only the business-day steps of the milestones; the
 * cut-off instant (time-zone work) is computed only for starts whose hold is free.
 * @returns The earliest feasible window, or `null` when none starts within the horizon.
 */
export function earliestFeasibleWindow(
  input: FootprintInput,
  holds: readonly DateInterval[],
  horizonDays: number = DEFAULT_HORIZON_DAYS,
): FeasibleWindow | null {
  assertHorizon(horizonDays);
  holds.forEach(assertInterval);
  const planner = createFootprintPlanner(input);
  for (let shift = 0; shift <= horizonDays; shift += 1) {
    const m = planner.milestones(shift);
    const hold = { start: m.shipBy, end: m.readyAgain };
    if (holds.some((h) => intervalsOverlap(hold, h))) continue;
    const footprint = planner.footprint(shift);
    if (isFeasible(footprint, holds)) {
      return { useFrom: m.useFrom, useTo: m.useTo, shiftDays: shift, footprint };
    }
  }
  return null;
}

/** One unit of a multi-unit loan: its footprint input and the unit's other holds. */
export interface UnitRequest<H extends DateInterval = DateInterval> {
  /** Footprint input for this unit (its own depot; the loan's use window and hospital). */
  input: FootprintInput;
  /** The unit's existing holds. */
  holds: readonly H[];
}

/** Result of {@link allFeasible}. */
export interface AllFeasibleResult<H extends DateInterval = DateInterval> {
  /** Whether every unit fits; a loan of several units is all-or-nothing. */
  feasible: boolean;
  /** Per unit, in the order given: its footprint and feasibility. */
  units: (FeasibilityCheck<H> & { footprint: LoanFootprint })[];
}

/**
 * Checks all units of one loan (docs/design/product.md §2: loans of several units are all-or-nothing): the
 * loan is feasible only when every unit's footprint fits that unit's holds. Every unit is
 * checked, so the caller can show which ones block.
 */
export function allFeasible<H extends DateInterval>(
  requests: readonly UnitRequest<H>[],
): AllFeasibleResult<H> {
  if (requests.length === 0) throw new RangeError('A loan needs at least one unit');
  const units = requests.map((request) => {
    const footprint = computeFootprint(request.input);
    return { footprint, ...checkFeasibility(footprint, request.holds) };
  });
  return { feasible: units.every((unit) => unit.feasible), units };
}

/** A use window in which every unit of a loan fits. */
export interface FeasibleWindowForAll {
  /** First case day of the window found. */
  useFrom: string;
  /** Last case day of the window found. */
  useTo: string;
  /** Calendar days between the requested and the found `useFrom`. */
  shiftDays: number;
  /** Footprint per unit, in the order of the requests. */
  footprints: LoanFootprint[];
}

/**
 * Like {@link earliestFeasibleWindow} for a multi-unit loan: the earliest shift of the shared use
 * window at which ALL units fit at once.
 * @throws RangeError when the requests do not share one use window.
 */
export function earliestFeasibleWindowForAll(
  requests: readonly UnitRequest[],
  horizonDays: number = DEFAULT_HORIZON_DAYS,
): FeasibleWindowForAll | null {
  assertHorizon(horizonDays);
  const [first] = requests;
  if (!first) throw new RangeError('A loan needs at least one unit');
  const sameWindow = requests.every(
    (r) => r.input.useFrom === first.input.useFrom && r.input.useTo === first.input.useTo,
  );
  if (!sameWindow) throw new RangeError('All units of a loan share one use window');
  requests.forEach((r) => r.holds.forEach(assertInterval));
  const planners = requests.map((r) => createFootprintPlanner(r.input));
  for (let shift = 0; shift <= horizonDays; shift += 1) {
    // Cheap hold check on every unit first; the full footprints only when all holds are free.
    const holdsFree = planners.every((planner, i) => {
      const m = planner.milestones(shift);
      const hold = { start: m.shipBy, end: m.readyAgain };
      return !requests[i]!.holds.some((h) => intervalsOverlap(hold, h));
    });
    if (!holdsFree) continue;
    const footprints = planners.map((planner) => planner.footprint(shift));
    if (footprints.every((fp, i) => isFeasible(fp, requests[i]!.holds))) {
      const { useFrom, useTo } = footprints[0]!.milestones;
      return { useFrom, useTo, shiftDays: shift, footprints };
    }
  }
  return null;
}

/** Length of a use window in days, both ends counted (a one-day window has length 1). */
export function windowLengthDays(useFrom: string, useTo: string): number {
  return calendarDaysBetween(useFrom, useTo) + 1;
}
