import { DateTime, IANAZone } from 'luxon';
import { z } from 'zod';

/** An instant: a `Date`, or an ISO 8601 string with `Z` or an explicit UTC offset. */
export type Instant = Date | string;

/** Who a message is for, and how they read dates and amounts. */
export interface Recipient {
  /** Display name, used in the greeting. */
  name: string;
  /** E-mail address. */
  email: string;
  /** IANA time zone the recipient reads instants in (e.g. `Europe/Berlin`). */
  timeZone: string;
  /** BCP 47 locale for dates and amounts; {@link DEFAULT_LOCALE} when omitted. */
  locale?: string;
}

/** Locale used when a recipient has none: the templates are written in English. */
export const DEFAULT_LOCALE = 'en-US';

const WITH_OFFSET = /(Z|[+-]\d{2}(:?\d{2})?)$/i;
const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/;
const emailAddress = z.email();

/**
 * Checks an e-mail address (zod's e-mail rule) and returns it.
 * @throws TypeError for a malformed address.
 */
export function assertEmail(email: string, label = 'email'): string {
  if (!emailAddress.safeParse(email).success) {
    throw new TypeError(`${label} is not an e-mail address: ${JSON.stringify(email)}`);
  }
  return email;
}

/**
 * Checks an IANA time-zone name and returns it.
 * @throws RangeError for an unknown zone.
 */
export function assertTimeZone(zone: string, label = 'timeZone'): string {
  if (typeof zone !== 'string' || !IANAZone.isValidZone(zone)) {
    throw new RangeError(`${label} is not an IANA time zone: ${JSON.stringify(zone)}`);
  }
  return zone;
}

/**
 * Checks a recipient and fills in the default locale.
 * @throws TypeError or RangeError naming the bad field.
 */
export function normaliseRecipient(recipient: Recipient): Required<Recipient> {
  assertEmail(recipient.email, 'recipient.email');
  assertTimeZone(recipient.timeZone, 'recipient.timeZone');
  // Intl.getCanonicalLocales throws RangeError for a malformed tag.
  const [locale] = Intl.getCanonicalLocales(recipient.locale ?? DEFAULT_LOCALE);
  return { name: recipient.name, email: recipient.email, timeZone: recipient.timeZone, locale };
}

/**
 * Reads an instant. Strings must carry `Z` or an offset: a local time without a zone would be
 * read in whatever zone the server runs in.
 * @throws RangeError for anything else.
 */
export function toInstant(instant: Instant): DateTime {
  const parsed =
    instant instanceof Date
      ? DateTime.fromJSDate(instant, { zone: 'utc' })
      : typeof instant === 'string' && WITH_OFFSET.test(instant)
        ? DateTime.fromISO(instant, { zone: 'utc' })
        : null;
  if (!parsed || !parsed.isValid) {
    throw new RangeError(`Not an instant with a UTC offset: ${String(instant)}`);
  }
  return parsed;
}

/**
 * Reads a calendar date `YYYY-MM-DD` as a day (midnight UTC stands for "that day"; no zone
 * conversion is ever applied to it).
 * @throws RangeError for a malformed or impossible date.
 */
export function toCalendarDate(date: string): DateTime {
  const parsed = ISO_DATE.test(date) ? DateTime.fromISO(date, { zone: 'utc' }) : null;
  if (!parsed || !parsed.isValid) throw new RangeError(`Not a calendar date: ${String(date)}`);
  return parsed;
}

/**
 * Formats an instant for a reader in their own zone and locale, with the zone's short name so
 * the reader sees which clock is meant: `Sunday, March 14, 2027 at 11:00 AM EDT` (en-US, New
 * York) or `Sunday, 14 March 2027 at 16:00 CET` (en-GB, Berlin). The short name comes from the
 * runtime's Intl data and depends on the locale (en-US writes Berlin's as `GMT+1`).
 *
 * @param style `long` (with weekday and month name) for bodies, `short` (`Mar 14, 2027, 11:00 AM
 *   EDT`) for subject lines.
 */
export function formatInstant(
  instant: Instant,
  timeZone: string,
  locale: string,
  style: 'long' | 'short' = 'long',
): string {
  const long = style === 'long';
  return toInstant(instant)
    .setZone(assertTimeZone(timeZone))
    .setLocale(locale)
    .toLocaleString({
      ...(long ? { weekday: 'long' } : {}),
      year: 'numeric',
      month: long ? 'long' : 'short',
      day: 'numeric',
      hour: 'numeric',
      minute: '2-digit',
      timeZoneName: 'short',
    });
}

/**
 * Formats a calendar date in a locale without moving it across zones:
 * `2027-03-15` → `Monday, March 15, 2027` (en-US, `long`, for e-mail bodies) or
 * `Mon, Mar 15, 2027` (`medium`, the web app's day format, for short texts such as in-app notices).
 */
export function formatCalendarDate(
  date: string,
  locale: string,
  style: 'long' | 'medium' = 'long',
): string {
  const long = style === 'long';
  return toCalendarDate(date)
    .setLocale(locale)
    .toLocaleString({
      weekday: long ? 'long' : 'short',
      year: 'numeric',
      month: long ? 'long' : 'short',
      day: 'numeric',
    });
}
