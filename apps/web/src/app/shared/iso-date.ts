import { DateTime } from 'luxon';

/**
 * Calendar dates as the API speaks them: `YYYY-MM-DD`, a day in some site's calendar with no
 * time of day. Pickers hand out `Date` objects at local midnight; these helpers convert between
 * the two with the local calendar fields only, so no time-zone offset can move a day.
 */

/** A calendar date `YYYY-MM-DD`. */
export type IsoDate = string;

const isoPattern = /^(\d{4})-(\d{2})-(\d{2})$/;

/** Whether `value` is a real calendar date written `YYYY-MM-DD`. */
export function isIsoDate(value: unknown): value is IsoDate {
  if (typeof value !== 'string') return false;
  const match = isoPattern.exec(value);
  if (!match) return false;
  return DateTime.fromISO(value).isValid;
}

/** The calendar day a picker's `Date` shows (its local year, month and day). */
export function toIsoDate(date: Date): IsoDate {
  const y = String(date.getFullYear()).padStart(4, '0');
  const m = String(date.getMonth() + 1).padStart(2, '0');
  const d = String(date.getDate()).padStart(2, '0');
  return `${y}-${m}-${d}`;
}

/** A local-midnight `Date` showing the calendar day `iso`, for pickers. */
export function fromIsoDate(iso: IsoDate): Date {
  const [y, m, d] = iso.split('-').map(Number) as [number, number, number];
  const date = new Date(y, m - 1, d);
  // `new Date(y, ...)` maps years 0–99 to 1900–1999; set the year explicitly.
  date.setFullYear(y);
  return date;
}

/** Today's date in the IANA time zone `zone` (e.g. at a campus), else in the browser's. */
export function todayIn(zone?: string | null, now: Date = new Date()): IsoDate {
  const at = DateTime.fromJSDate(now).setZone(zone || 'local');
  return (at.isValid ? at : DateTime.fromJSDate(now)).toISODate()!;
}

/** `iso` moved by `days` calendar days. */
export function addDays(iso: IsoDate, days: number): IsoDate {
  return DateTime.fromISO(iso, { zone: 'utc' }).plus({ days }).toISODate()!;
}

/** Calendar days from `from` to `to` (negative when `to` is earlier). */
export function daysBetween(from: IsoDate, to: IsoDate): number {
  const a = DateTime.fromISO(from, { zone: 'utc' });
  const b = DateTime.fromISO(to, { zone: 'utc' });
  return Math.round(b.diff(a, 'days').days);
}

/** Days of a use window with both ends counted (`2027-03-01..2027-03-03` is 3). */
export function windowLength(from: IsoDate, to: IsoDate): number {
  return daysBetween(from, to) + 1;
}

/** How a day is written: `long` "Monday, December 14, 2026", `medium` "Mon, Dec 14, 2026", `short` "Dec 14". */
export type DayStyle = 'long' | 'medium' | 'short';

const dayFormats: Record<DayStyle, Intl.DateTimeFormatOptions> = {
  long: { weekday: 'long', year: 'numeric', month: 'long', day: 'numeric' },
  medium: { weekday: 'short', year: 'numeric', month: 'short', day: 'numeric' },
  short: { month: 'short', day: 'numeric' },
};

/** A calendar date for people; the day is shown as written, never shifted by a zone. */
export function formatDay(iso: IsoDate, style: DayStyle = 'medium', locale = 'en-US'): string {
  const day = DateTime.fromISO(iso, { zone: 'utc', locale });
  return day.isValid ? day.toLocaleString(dayFormats[style]) : iso;
}

/** A use window for people: "Dec 14 – Dec 16, 2026", or one day when both ends agree. */
export function formatWindow(from: IsoDate, to: IsoDate, locale = 'en-US'): string {
  if (from === to) return formatDay(from, 'medium', locale);
  const a = DateTime.fromISO(from, { zone: 'utc', locale });
  const b = DateTime.fromISO(to, { zone: 'utc', locale });
  if (!a.isValid || !b.isValid) return `${from} – ${to}`;
  const sameYear = a.year === b.year;
  const start = a.toLocaleString(
    sameYear
      ? { month: 'short', day: 'numeric' }
      : { year: 'numeric', month: 'short', day: 'numeric' },
  );
  return `${start} – ${b.toLocaleString({ year: 'numeric', month: 'short', day: 'numeric' })}`;
}

/**
 * A use window in as few characters as the locale allows ("Jan 4 – 5, 2027", "Dec 30, 2026 –
 * Jan 2, 2027"), for tables; the days are shown as written, never shifted by a zone.
 */
export function formatWindowCompact(from: IsoDate, to: IsoDate, locale = 'en-US'): string {
  const a = DateTime.fromISO(from, { zone: 'utc' });
  const b = DateTime.fromISO(to, { zone: 'utc' });
  if (!a.isValid || !b.isValid || b < a) return formatWindow(from, to, locale);
  const format = new Intl.DateTimeFormat(locale, {
    month: 'short',
    day: 'numeric',
    year: 'numeric',
    timeZone: 'UTC',
  });
  // ICU puts thin spaces around the range dash; plain spaces match the rest of the app's text.
  return format.formatRange(a.toJSDate(), b.toJSDate()).replace(/\u2009/g, ' ');
}

/**
 * An instant (ISO 8601 with offset) in the time zone `zone`, for history lists:
 * "Dec 1, 2026, 6:56 PM EST".
 */
export function formatInstant(at: string, zone: string, locale = 'en-US'): string {
  const dt = DateTime.fromISO(at, { zone, locale });
  if (!dt.isValid) return at;
  return dt.toLocaleString({
    year: 'numeric',
    month: 'short',
    day: 'numeric',
    hour: 'numeric',
    minute: '2-digit',
    timeZoneName: 'short',
  });
}

/**
 * A time zone named for people: "America/New_York (Eastern Standard Time)". The long name is the
 * one in force on `on` (so summer dates say daylight time).
 */
export function describeZone(zone: string, on?: IsoDate, locale = 'en-US'): string {
  const at = on ? DateTime.fromISO(on, { zone, locale }) : DateTime.now().setZone(zone);
  const name = at.isValid ? at.setLocale(locale).offsetNameLong : null;
  return name ? `${zone} (${name})` : zone;
}
