/**
 * GS1 six-digit dates (YYMMDD): the century of a two-digit year and day `00`.
 * @packageDocumentation
 */

/** A calendar date written `YYYY-MM-DD`. */
export type IsoDate = string;

/**
 * The four-digit year of a GS1 two-digit year, by the sliding window of GS1 General
 * Specifications §7.12 ("determination of century in dates"): with the current year's last two
 * digits subtracted, a difference of 51 to 99 means the previous century, −99 to −50 the next
 * one, anything else the current one. So in 2026 the window is 1977–2076. GS1's Barcode Syntax
 * Engine implements the same thresholds (lint_yymmd0.c: `YY − current ≥ 51` → previous,
 * `> −50` → current, else next).
 * @param yy The two-digit year, 0–99.
 * @param now The instant that counts as "now" (its UTC year is used).
 */
export function resolveGs1Year(yy: number, now: Date): number {
  const currentYear = now.getUTCFullYear();
  const current = currentYear % 100;
  const century = currentYear - current;
  const difference = yy - current;
  if (difference >= 51) return century - 100 + yy;
  if (difference <= -50) return century + 100 + yy;
  return century + yy;
}

/** Whether `year` is a leap year of the Gregorian calendar. */
export function isLeapYear(year: number): boolean {
  return year % 4 === 0 && (year % 100 !== 0 || year % 400 === 0);
}

/** The number of days of `month` (1–12) in `year`. */
export function daysInMonth(year: number, month: number): number {
  if (month === 2) return isLeapYear(year) ? 29 : 28;
  return [4, 6, 9, 11].includes(month) ? 30 : 31;
}

/** Why a six-digit GS1 date is no date, or the date it stands for. */
export type Gs1DateResult =
  | { readonly ok: true; readonly date: IsoDate; readonly dayUnspecified: boolean }
  | { readonly ok: false; readonly reason: string };

/**
 * Reads a GS1 YYMMDD date. Day `00` is written when only the year and month are given, and
 * means the last day of that month (GS1 General Specifications, date AIs; GS1's `yymmd0`
 * linter accepts it), so `280200` is 2028-02-29 and `210300` is 2021-03-31.
 * @param yymmdd Six characters as scanned.
 * @param now The instant that counts as "now" for the century (see {@link resolveGs1Year}).
 */
export function readGs1Date(yymmdd: string, now: Date): Gs1DateResult {
  if (!/^\d{6}$/.test(yymmdd)) return { ok: false, reason: 'it is not six digits' };
  const year = resolveGs1Year(Number(yymmdd.slice(0, 2)), now);
  const month = Number(yymmdd.slice(2, 4));
  const day = Number(yymmdd.slice(4, 6));
  if (month < 1 || month > 12) return { ok: false, reason: `there is no month ${month}` };
  const lastDay = daysInMonth(year, month);
  if (day > lastDay) {
    return { ok: false, reason: `${year}-${pad2(month)} has no day ${day}` };
  }
  const effectiveDay = day === 0 ? lastDay : day;
  return {
    ok: true,
    date: `${year}-${pad2(month)}-${pad2(effectiveDay)}`,
    dayUnspecified: day === 0,
  };
}

/**
 * Writes a calendar date as GS1 YYMMDD.
 * @throws RangeError when `date` is not a real `YYYY-MM-DD` date.
 */
export function toGs1Date(date: IsoDate): string {
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(date);
  if (!match) throw new RangeError(`Expected a date as YYYY-MM-DD, got "${date}"`);
  const [year, month, day] = [Number(match[1]), Number(match[2]), Number(match[3])];
  if (month < 1 || month > 12 || day < 1 || day > daysInMonth(year, month)) {
    throw new RangeError(`"${date}" is not a calendar date`);
  }
  return `${match[1].slice(2)}${match[2]}${match[3]}`;
}

function pad2(n: number): string {
  return String(n).padStart(2, '0');
}
