/**
 * Fleet utilisation: how a unit's days in a period were spent. Pure: the caller gives the loans'
 * footprints and maintenance holds as calendar dates (YYYY-MM-DD, the depot's calendar).
 */

/** What a unit is doing on a day; `idle` when nothing else applies. */
export type UnitDayState = 'at_hospital' | 'in_transit' | 'reprocessing' | 'maintenance' | 'idle';

/** Every state, in the order reports show them. */
export const unitDayStates: readonly UnitDayState[] = [
  'at_hospital',
  'in_transit',
  'reprocessing',
  'maintenance',
  'idle',
];

/** A stretch of days in one state, both ends included. */
export interface DaySegment {
  state: Exclude<UnitDayState, 'idle'>;
  from: string;
  to: string;
}

/** A loan's dates for one unit, as the loan footprint stores them. */
export interface LoanFootprintDates {
  shipBy: string;
  deliverBy: string;
  returnShipBy: string;
  backAtDepot: string;
  readyAgain: string;
}

const dayMs = 86_400_000;
/** Days since 1970-01-01 of a calendar date (UTC arithmetic: no zone, no daylight saving). */
export function dayIndex(date: string): number {
  const [y, m, d] = date.split('-').map(Number);
  return Math.round(Date.UTC(y, m - 1, d) / dayMs);
}
const dateOf = (index: number) => new Date(index * dayMs).toISOString().slice(0, 10);

/**
 * A loan's footprint as segments: shipped on `shipBy` and travelling until the day before
 * `deliverBy`; at the hospital from `deliverBy` until the day before `returnShipBy`; travelling
 * back from `returnShipBy` until the day before `backAtDepot`; reprocessed from `backAtDepot`
 * until the day before `readyAgain`. (Our footprint's own definition; a day belongs to one state.)
 */
export function footprintSegments(loan: LoanFootprintDates): DaySegment[] {
  const before = (date: string) => dateOf(dayIndex(date) - 1);
  return [
    { state: 'in_transit' as const, from: loan.shipBy, to: before(loan.deliverBy) },
    { state: 'at_hospital' as const, from: loan.deliverBy, to: before(loan.returnShipBy) },
    { state: 'in_transit' as const, from: loan.returnShipBy, to: before(loan.backAtDepot) },
    { state: 'reprocessing' as const, from: loan.backAtDepot, to: before(loan.readyAgain) },
  ].filter((s) => dayIndex(s.to) >= dayIndex(s.from));
}

/** Which state wins when two segments cover the same day: maintenance first, then the loan. */
const precedence: Record<Exclude<UnitDayState, 'idle'>, number> = {
  maintenance: 4,
  reprocessing: 3,
  in_transit: 2,
  at_hospital: 1,
};

/** Days per state and their shares of the period. */
export interface Utilisation {
  days: number;
  counts: Record<UnitDayState, number>;
  /** Share of the period's days, 0..1; the shares add up to 1. */
  shares: Record<UnitDayState, number>;
}

/** The state of each day of [from, to] (both included) for one unit's segments. */
export function unitDays(
  segments: readonly DaySegment[],
  from: string,
  to: string,
): UnitDayState[] {
  const start = dayIndex(from);
  const length = dayIndex(to) - start + 1;
  if (length <= 0) throw new RangeError(`The period ends (${to}) before it starts (${from}).`);
  const days: UnitDayState[] = new Array<UnitDayState>(length).fill('idle');
  for (const s of segments) {
    const a = Math.max(dayIndex(s.from) - start, 0);
    const b = Math.min(dayIndex(s.to) - start, length - 1);
    for (let i = a; i <= b; i++) {
      const current = days[i];
      if (current === 'idle' || precedence[s.state] > precedence[current]) days[i] = s.state;
    }
  }
  return days;
}

/** Counts and shares of a list of day states (one unit, or several units summed). */
export function utilisationOf(days: readonly UnitDayState[]): Utilisation {
  const counts = { at_hospital: 0, in_transit: 0, reprocessing: 0, maintenance: 0, idle: 0 };
  for (const d of days) counts[d]++;
  const n = days.length;
  const shares = Object.fromEntries(
    unitDayStates.map((s) => [s, n === 0 ? 0 : counts[s] / n]),
  ) as Record<UnitDayState, number>;
  return { days: n, counts, shares };
}

/**
 * Share of non-idle days per week of the period: weeks start on the period's first day and run
 * seven days (the last may be shorter), one value per week for the heat map.
 */
export function weeklyBusyShares(days: readonly UnitDayState[]): number[] {
  const weeks: number[] = [];
  for (let i = 0; i < days.length; i += 7) {
    const week = days.slice(i, i + 7);
    weeks.push(week.filter((d) => d !== 'idle').length / week.length);
  }
  return weeks;
}
