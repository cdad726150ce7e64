import Holidays, { HolidaysTypes } from 'date-holidays';

/**
 * A calendar date as `YYYY-MM-DD`. It has no zone of its own: it means the calendar day in the
 * zone of the site it belongs to (a depot date in the depot's zone, a hospital date in the
 * hospital's zone). All functions of this package take and return dates in this form.
 */
export type IsoDate = string;

/**
 * A holiday calendar code: an ISO 3166-1 alpha-2 country (`US`, `DE`) or a country with an
 * ISO 3166-2 subdivision (`DE-BY`) when a site follows regional holidays as well.
 */
export type CalendarCode = string;

/** A public holiday of one calendar on one date. */
export interface PublicHoliday {
  /** The holiday's date in the country's own calendar. */
  date: IsoDate;
  /** The holiday's name, in English where the holiday data has it. */
  name: string;
  /** Whether this day is a substitute (observed) day for a holiday that falls on a weekend. */
  substitute: boolean;
}

const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;
const MS_PER_DAY = 86_400_000;

/**
 * Turns a calendar date into a day number (days since 1970-01-01). Calendar arithmetic runs on
 * these plain integers rather than on zoned date-times: a calendar date has no zone, so a
 * daylight-saving change can never make "one day later" 23 or 25 hours long, and the hot loops of
 * the availability search stay cheap.
 */
function toDayNumber(date: IsoDate): number {
  const match = typeof date === 'string' ? ISO_DATE.exec(date) : null;
  const day = match
    ? Date.UTC(Number(match[1]), Number(match[2]) - 1, Number(match[3])) / MS_PER_DAY
    : Number.NaN;
  // The round trip rejects dates such as 2027-02-30 that Date.UTC would quietly roll over.
  if (!Number.isInteger(day) || fromDayNumber(day) !== date) {
    throw new RangeError(`Not a calendar date (YYYY-MM-DD): ${JSON.stringify(date)}`);
  }
  return day;
}

function fromDayNumber(day: number): IsoDate {
  return new Date(day * MS_PER_DAY).toISOString().slice(0, 10);
}

/**
 * Checks that a string is a real `YYYY-MM-DD` calendar date and returns it.
 * @throws RangeError when it is not (e.g. `2027-02-30` or `2027-2-3`).
 */
export function assertIsoDate(date: IsoDate): IsoDate {
  toDayNumber(date);
  return date;
}

/** Returns the date `days` calendar days after `date` (before it when negative). */
export function addCalendarDays(date: IsoDate, days: number): IsoDate {
  assertWholeNumber(days, 'days');
  return fromDayNumber(toDayNumber(date) + days);
}

/** Returns the number of calendar days from `from` to `to` (negative when `to` is earlier). */
export function calendarDaysBetween(from: IsoDate, to: IsoDate): number {
  return toDayNumber(to) - toDayNumber(from);
}

/** Returns the ISO weekday of a date: 1 = Monday ... 7 = Sunday. */
export function isoWeekday(date: IsoDate): number {
  return weekdayOf(toDayNumber(date));
}

function weekdayOf(day: number): number {
  // Day 0 (1970-01-01) was a Thursday, ISO weekday 4.
  return ((((day + 3) % 7) + 7) % 7) + 1;
}

/**
 * Whether the date falls on a Saturday or Sunday. The product treats Saturday and Sunday as the
 * weekend in every country (a stated simplification: countries with a Friday/Saturday weekend
 * would need a per-country weekend, which is not modelled yet).
 */
export function isWeekend(date: IsoDate): boolean {
  return isoWeekday(date) >= 6;
}

/** Holiday data objects, one per calendar code; building one parses the country's rules. */
const calendars = new Map<CalendarCode, Holidays>();
/** Public holidays per calendar code and year: `${code}:${year}` → date → holiday. */
const holidayCache = new Map<string, ReadonlyMap<IsoDate, PublicHoliday>>();

function holidayData(code: CalendarCode): Holidays {
  const cached = calendars.get(code);
  if (cached) return cached;
  const [country, subdivision, ...rest] = code.split('-');
  const probe = new Holidays();
  const known =
    rest.length === 0 &&
    /^[A-Z]{2}$/.test(country ?? '') &&
    country! in probe.getCountries() &&
    (subdivision === undefined || subdivision in (probe.getStates(country!) ?? {}));
  // date-holidays returns an empty list for an unknown code; fail loudly instead, because an
  // empty holiday list would silently schedule shipments on holidays.
  if (!known) {
    throw new RangeError(`Unknown holiday calendar: ${JSON.stringify(code)}`);
  }
  const data =
    subdivision === undefined
      ? new Holidays(country!, { languages: ['en'] })
      : new Holidays(country!, subdivision, { languages: ['en'] });
  calendars.set(code, data);
  return data;
}

/**
 * Returns the public holidays of a calendar in one year, keyed by date (cached per calendar and
 * year). Only holidays of type `public` count: date-holidays lists observed (substitute) days as
 * `public` too, e.g. 2027-07-05 for Independence Day on a Sunday in the US, and bank holidays,
 * observances and optional days are not days off for carriers and hospitals in general.
 * @param code ISO country code, optionally with a subdivision (`DE-BY`).
 * @param year Four-digit year.
 * @throws RangeError for an unknown calendar code.
 */
export function publicHolidays(
  code: CalendarCode,
  year: number,
): ReadonlyMap<IsoDate, PublicHoliday> {
  const key = `${code}:${year}`;
  const cached = holidayCache.get(key);
  if (cached) return cached;
  const byDate = new Map<IsoDate, PublicHoliday>();
  const prefix = `${year}-`;
  // A substitute day can fall in the year before the holiday (2027-12-31 is observed for
  // 2028-01-01 and date-holidays lists it under 2027), so collect the neighbouring years too and
  // keep only the dates of the requested year.
  for (const y of [year - 1, year, year + 1]) {
    for (const holiday of rawPublicHolidays(code, y)) {
      // `date` is the local calendar date in the country's zone; multi-day entries cover
      // [start, end), so each covered day is a holiday (a partial day counts as a whole one).
      const first = holiday.date.slice(0, 10);
      const span = Math.max(
        1,
        Math.round((holiday.end.getTime() - holiday.start.getTime()) / 86_400_000),
      );
      for (let i = 0; i < span; i += 1) {
        const date = addCalendarDays(first, i);
        if (!date.startsWith(prefix) || byDate.has(date)) continue;
        byDate.set(date, { date, name: holiday.name, substitute: holiday.substitute === true });
      }
    }
  }
  holidayCache.set(key, byDate);
  return byDate;
}

/** date-holidays' public entries per `${code}:${year}`; each year is shared by three lookups. */
const rawCache = new Map<string, readonly HolidaysTypes.Holiday[]>();

function rawPublicHolidays(code: CalendarCode, year: number): readonly HolidaysTypes.Holiday[] {
  const key = `${code}:${year}`;
  let entries = rawCache.get(key);
  if (!entries) {
    entries = holidayData(code)
      .getHolidays(year, 'en')
      .filter((holiday) => holiday.type === 'public');
    rawCache.set(key, entries);
  }
  return entries;
}

/** Returns the public holiday on a date in a calendar, or `undefined` when there is none. */
export function publicHolidayOn(date: IsoDate, code: CalendarCode): PublicHoliday | undefined {
  return publicHolidays(code, Number(assertIsoDate(date).slice(0, 4))).get(date);
}

/** Whether the date is a public holiday (including observed days) in the calendar. */
export function isPublicHoliday(date: IsoDate, code: CalendarCode): boolean {
  return publicHolidayOn(date, code) !== undefined;
}

/** Whether the date is a business day in the calendar: not a weekend, not a public holiday. */
export function isBusinessDay(date: IsoDate, code: CalendarCode): boolean {
  return isBusinessDayNumber(toDayNumber(date), code);
}

function isBusinessDayNumber(day: number, code: CalendarCode): boolean {
  if (weekdayOf(day) >= 6) return false;
  const date = fromDayNumber(day);
  return !publicHolidays(code, Number(date.slice(0, 4))).has(date);
}

/** Steps from `date` in direction `step` until `n` business days have been counted. */
function stepBusinessDays(date: IsoDate, n: number, step: 1 | -1, code: CalendarCode): IsoDate {
  holidayData(code); // validates the calendar code even when n is 0
  let current = toDayNumber(date);
  let counted = 0;
  let idle = 0;
  while (counted < n) {
    current += step;
    if (isBusinessDayNumber(current, code)) {
      counted += 1;
      idle = 0;
    } else if (++idle > 366) {
      // Guards against a malformed calendar with no business days at all.
      throw new RangeError(`No business day within a year of ${date} in ${code}`);
    }
  }
  return fromDayNumber(current);
}

/**
 * Returns the date `n` business days after `date`. The start date itself is never counted (it
 * need not be a business day); each following business day counts one. So `n = 1` on a Friday
 * gives the next Monday unless that is a holiday, and `n = 0` returns `date` unchanged.
 * A negative `n` counts backwards like {@link subtractBusinessDays}.
 */
export function addBusinessDays(date: IsoDate, n: number, code: CalendarCode): IsoDate {
  assertWholeNumber(n, 'n');
  return stepBusinessDays(date, Math.abs(n), n < 0 ? -1 : 1, code);
}

/**
 * Returns the date `n` business days before `date`: the start date is not counted, each earlier
 * business day counts one, so for `n ≥ 1` the result is a business day and exactly `n` business
 * days lie in `[result, date)`. `n = 0` returns `date` unchanged.
 */
export function subtractBusinessDays(date: IsoDate, n: number, code: CalendarCode): IsoDate {
  assertWholeNumber(n, 'n');
  return stepBusinessDays(date, Math.abs(n), n < 0 ? 1 : -1, code);
}

/** Returns `date` when it is a business day, otherwise the next business day after it. */
export function rollForwardToBusinessDay(date: IsoDate, code: CalendarCode): IsoDate {
  return isBusinessDay(date, code) ? date : addBusinessDays(date, 1, code);
}

/** Returns `date` when it is a business day, otherwise the last business day before it. */
export function rollBackToBusinessDay(date: IsoDate, code: CalendarCode): IsoDate {
  return isBusinessDay(date, code) ? date : subtractBusinessDays(date, 1, code);
}

/**
 * Counts the business days `d` with `from ≤ d < to` (half-open, so counting from a delivery date
 * to the first case day counts the delivery day and not the case day). Returns 0 when `to ≤ from`.
 */
export function businessDaysBetween(from: IsoDate, to: IsoDate, code: CalendarCode): number {
  const end = toDayNumber(to);
  let count = 0;
  for (let day = toDayNumber(from); day < end; day += 1) {
    if (isBusinessDayNumber(day, code)) count += 1;
  }
  return count;
}

/** Returns the public holidays of a calendar that fall within `[from, to]` (inclusive). */
export function publicHolidaysBetween(
  from: IsoDate,
  to: IsoDate,
  code: CalendarCode,
): PublicHoliday[] {
  const result: PublicHoliday[] = [];
  const first = Number(assertIsoDate(from).slice(0, 4));
  const last = Number(assertIsoDate(to).slice(0, 4));
  for (let year = first; year <= last; year += 1) {
    for (const holiday of publicHolidays(code, year).values()) {
      if (holiday.date >= from && holiday.date <= to) result.push(holiday);
    }
  }
  return result.sort((a, b) => a.date.localeCompare(b.date));
}

/** The ISO 3166-1 country part of a calendar code (`DE-BY` → `DE`). */
export function countryOf(code: CalendarCode): string {
  return code.split('-')[0] ?? code;
}

function assertWholeNumber(n: number, name: string): void {
  if (!Number.isInteger(n)) throw new RangeError(`${name} must be a whole number, got ${n}`);
}
