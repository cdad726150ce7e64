/**
 * Helpers for this package's tests only (not exported from the index): an independent business
 * day oracle and fast-check generators. The oracle deliberately does not reuse the calendar code
 * under test: weekdays come from the JavaScript `Date`, holidays from a fresh date-holidays
 * instance, and counting is a plain loop over calendar days.
 */
import Holidays from 'date-holidays';
import fc from 'fast-check';

import type { DepotSiteInput, FootprintInput, HospitalSiteInput } from './footprint';

const oracleHolidays = new Map<string, Set<string>>();
const oracleCalendars = new Map<string, Holidays>();

function oracleCalendar(country: string): Holidays {
  let calendar = oracleCalendars.get(country);
  if (!calendar) {
    calendar = new Holidays(country);
    oracleCalendars.set(country, calendar);
  }
  return calendar;
}

/** Public-holiday dates of a country in a year, straight from date-holidays. */
function oracleHolidaySet(country: string, year: number): Set<string> {
  const key = `${country}:${year}`;
  let set = oracleHolidays.get(key);
  if (!set) {
    set = new Set<string>();
    // Substitutes for 1 January of the next year are listed under the year before.
    for (const y of [year, year + 1]) {
      for (const h of oracleCalendar(country).getHolidays(y)) {
        if (h.type === 'public' && h.date.startsWith(`${year}-`)) set.add(h.date.slice(0, 10));
      }
    }
    oracleHolidays.set(key, set);
  }
  return set;
}

/** Oracle: whether a date is a business day (Mon–Fri and not a public holiday). */
export function oracleIsBusinessDay(date: string, country: string): boolean {
  const weekday = new Date(`${date}T00:00:00Z`).getUTCDay();
  return weekday !== 0 && weekday !== 6 && !oracleHolidaySet(country, +date.slice(0, 4)).has(date);
}

/** Oracle: the date `days` calendar days after `date`. */
export function oraclePlusDays(date: string, days: number): string {
  return new Date(Date.parse(`${date}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);
}

/** Oracle: counts business days `d` with `from < d ≤ to` (open start, closed end). */
export function oracleCountOpenClosed(from: string, to: string, country: string): number {
  let count = 0;
  for (let d = oraclePlusDays(from, 1); d <= to; d = oraclePlusDays(d, 1)) {
    if (oracleIsBusinessDay(d, country)) count += 1;
  }
  return count;
}

/** Oracle: counts business days `d` with `from ≤ d < to` (closed start, open end). */
export function oracleCountClosedOpen(from: string, to: string, country: string): number {
  let count = 0;
  for (let d = from; d < to; d = oraclePlusDays(d, 1)) {
    if (oracleIsBusinessDay(d, country)) count += 1;
  }
  return count;
}

/** Invented sites in several countries and zones (coordinates of large cities, no addresses). */
export const SITE_POOL: readonly HospitalSiteInput[] = [
  { lat: 42.36, lng: -71.06, country: 'US', timeZone: 'America/New_York' },
  { lat: 41.88, lng: -87.63, country: 'US', timeZone: 'America/Chicago' },
  { lat: 34.05, lng: -118.24, country: 'US', timeZone: 'America/Los_Angeles' },
  { lat: 50.11, lng: 8.68, country: 'DE', timeZone: 'Europe/Berlin' },
  { lat: 48.14, lng: 11.58, country: 'DE-BY', timeZone: 'Europe/Berlin' },
  { lat: 51.51, lng: -0.13, country: 'GB', timeZone: 'Europe/London' },
  { lat: 48.86, lng: 2.35, country: 'FR', timeZone: 'Europe/Paris' },
  { lat: 43.65, lng: -79.38, country: 'CA', timeZone: 'America/Toronto' },
  { lat: 35.68, lng: 139.69, country: 'JP', timeZone: 'Asia/Tokyo' },
  { lat: -33.87, lng: 151.21, country: 'AU', timeZone: 'Australia/Sydney' },
];

/** A site from the pool, sometimes moved to random coordinates (distance is all that changes). */
export const siteArb: fc.Arbitrary<HospitalSiteInput> = fc.oneof(
  fc.constantFrom(...SITE_POOL),
  fc
    .tuple(
      fc.constantFrom(...SITE_POOL),
      fc.double({ min: -80, max: 80, noNaN: true }),
      fc.double({ min: -179, max: 179, noNaN: true }),
    )
    .map(([site, lat, lng]) => ({ ...site, lat, lng })),
);

/** A depot: a site plus a cut-off time. */
export const depotArb: fc.Arbitrary<DepotSiteInput> = fc
  .tuple(siteArb, fc.integer({ min: 0, max: 23 }), fc.integer({ min: 0, max: 59 }))
  .map(([site, h, m]) => ({
    ...site,
    cutoffTime: `${String(h).padStart(2, '0')}:${String(m).padStart(2, '0')}`,
  }));

/** A date between 2026-01-01 and 2029-12-31 (years the holiday data covers). */
export const dateArb: fc.Arbitrary<string> = fc
  .integer({ min: 0, max: 4 * 365 })
  .map((offset) => oraclePlusDays('2026-01-01', offset));

/** A full footprint input with random sites, window and settings (no `now`). */
export const footprintInputArb: fc.Arbitrary<FootprintInput> = fc
  .record({
    useFrom: dateArb,
    length: fc.integer({ min: 0, max: 14 }),
    depot: depotArb,
    hospital: siteArb,
    firstLoanOfModel: fc.boolean(),
    leadDays: fc.integer({ min: 1, max: 4 }),
    firstLoanLeadDays: fc.integer({ min: 1, max: 5 }),
    customsDays: fc.integer({ min: 0, max: 3 }),
    decontaminationDays: fc.integer({ min: 0, max: 2 }),
    turnaroundDays: fc.integer({ min: 0, max: 3 }),
  })
  .map(({ useFrom, length, depot, hospital, firstLoanOfModel, ...settings }) => ({
    useFrom,
    useTo: oraclePlusDays(useFrom, length),
    depot,
    hospital,
    firstLoanOfModel,
    settings,
  }));

/** Property-test run count: enough to hit holidays and DST weeks, small enough for seconds. */
export const RUNS = 200;
