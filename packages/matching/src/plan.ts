/**
 * Travel days, footprint and fee estimate of one proctor for one visit.
 */
import { type Money, assertInteger, currencyExponent } from '@evalon/deposits';
import {
  type LatLng,
  addCalendarDays,
  assertIsoDate,
  calendarDaysBetween,
  greatCircleDistanceKm,
} from '@evalon/scheduling';

import type { DateRange } from './types';

/** A proctor's trip to a campus for one visit. */
export interface TravelPlan {
  /** Great-circle distance home → campus in km (IUGG mean radius), rounded to 0.1 km. */
  distanceKm: number;
  /** 2 (the day before and the day after the visit) beyond the threshold, else 0. */
  travelDays: number;
  /** Visit days in the campus calendar (both ends included). */
  visitDays: number;
  /** Visit days plus travel days, as calendar days in the campus zone. */
  footprint: DateRange;
}

/**
 * Plans the trip: distance by `greatCircleDistanceKm` of `@evalon/scheduling`, rounded to 0.1 km;
 * when that rounded distance exceeds `travelDayThresholdKm`, one travel day before and one after
 * the visit. Days are calendar days in the campus zone, so a daylight-saving change inside the
 * visit never makes a day count as 23 or 25 hours.
 * @throws RangeError for bad coordinates, dates or threshold.
 */
export function planTravel(
  home: LatLng,
  campus: LatLng,
  visit: DateRange,
  travelDayThresholdKm: number,
): TravelPlan {
  if (!Number.isFinite(travelDayThresholdKm) || travelDayThresholdKm < 0) {
    throw new RangeError(
      `travelDayThresholdKm must be a finite number ≥ 0, got ${travelDayThresholdKm}`,
    );
  }
  assertIsoDate(visit.from);
  assertIsoDate(visit.to);
  const visitDays = calendarDaysBetween(visit.from, visit.to) + 1;
  if (visitDays < 1)
    throw new RangeError(`The visit ends ${visit.to} before it starts ${visit.from}`);
  // Decisions use the distance as shown (0.1 km), so the screen never contradicts the rule.
  const distanceKm = Math.round(greatCircleDistanceKm(home, campus) * 10) / 10;
  const travels = distanceKm > travelDayThresholdKm;
  return {
    distanceKm,
    travelDays: travels ? 2 : 0,
    visitDays,
    footprint: travels
      ? { from: addCalendarDays(visit.from, -1), to: addCalendarDays(visit.to, 1) }
      : { from: visit.from, to: visit.to },
  };
}

/** A proctor's rates. */
export interface ProctorRates {
  /** Fee per visit day (integer minor units). */
  dayRate: Money;
  /** Fee per travel day, in the same currency. */
  travelDayRate: Money;
}

/**
 * Fee estimate = day rate × visit days + travel-day rate × travel days, in integer minor units
 * and the rates' currency. An estimate: contracts and the proctor's invoice prevail.
 * @throws DepositError (from `@evalon/deposits`) for a non-integer, negative or unsafe amount or
 *   an unknown currency; RangeError when the two rates differ in currency or a day count is not
 *   a whole number ≥ 0.
 */
export function estimateFee(rates: ProctorRates, visitDays: number, travelDays: number): Money {
  const { dayRate, travelDayRate } = rates;
  assertInteger(dayRate.amount, 'dayRate.amount', { nonNegative: true });
  assertInteger(travelDayRate.amount, 'travelDayRate.amount', { nonNegative: true });
  currencyExponent(dayRate.currency);
  if (dayRate.currency !== travelDayRate.currency) {
    throw new RangeError(
      `dayRate is in ${dayRate.currency} but travelDayRate in ${travelDayRate.currency}`,
    );
  }
  for (const [label, days] of [
    ['visitDays', visitDays],
    ['travelDays', travelDays],
  ] as const) {
    if (!Number.isInteger(days) || days < 0) {
      throw new RangeError(`${label} must be a whole number ≥ 0, got ${days}`);
    }
  }
  const amount = dayRate.amount * visitDays + travelDayRate.amount * travelDays;
  assertInteger(amount, 'fee estimate');
  return { amount, currency: dayRate.currency };
}
