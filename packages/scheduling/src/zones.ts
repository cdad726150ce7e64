import { DateTime, IANAZone } from 'luxon';

import { IsoDate, assertIsoDate } from './business-days';

/** An instant: a `Date`, or an ISO 8601 string with `Z` or an explicit UTC offset. */
export type Instant = Date | string;

const HH_MM = /^([01]\d|2[0-3]):([0-5]\d)$/;
const WITH_OFFSET = /(Z|[+-]\d{2}(:?\d{2})?)$/i;

/**
 * Checks an IANA time-zone name (e.g. `Europe/Berlin`) and returns it.
 * @throws RangeError for an unknown zone.
 */
export function assertTimeZone(zone: string): string {
  if (knownZones.has(zone)) return zone;
  if (!IANAZone.isValidZone(zone)) throw new RangeError(`Unknown IANA time zone: ${zone}`);
  knownZones.add(zone);
  return zone;
}

/** Zones already checked: luxon's check builds an Intl formatter each time, which is slow. */
const knownZones = new Set<string>();

/**
 * Turns an instant into a luxon DateTime in UTC. Strings must carry `Z` or an offset, because a
 * local time without a zone would be read in whatever zone the server happens to run in.
 * @throws RangeError for an invalid instant.
 */
export function toInstant(instant: Instant): DateTime {
  const parsed =
    instant instanceof Date
      ? DateTime.fromJSDate(instant, { zone: 'utc' })
      : WITH_OFFSET.test(instant)
        ? DateTime.fromISO(instant, { zone: 'utc' })
        : null;
  if (!parsed || !parsed.isValid) {
    throw new RangeError(`Not an instant with a UTC offset: ${String(instant)}`);
  }
  return parsed;
}

/** Returns the calendar date (`YYYY-MM-DD`) of an instant in a site's IANA time zone. */
export function toSiteDate(instant: Instant, timeZone: string): IsoDate {
  return toInstant(instant).setZone(assertTimeZone(timeZone)).toISODate() as IsoDate;
}

/**
 * Returns the UTC instant (ISO string with `Z`) of a wall-clock time `HH:mm` on a date in a zone,
 * e.g. a depot's carrier cut-off on its ship date. Daylight-saving edge cases:
 * - a time that occurs twice (the hour repeated when clocks go back) resolves to the EARLIER
 *   instant, so a cut-off is never judged later than the depot meant;
 * - a time that does not exist (skipped when clocks go forward) is moved forward by the length
 *   of the gap (luxon's rule: 02:30 on a spring-forward day becomes 03:30 in the new offset).
 * @throws RangeError for a bad date, time or zone.
 */
export function wallTimeToInstant(date: IsoDate, time: string, timeZone: string): string {
  assertIsoDate(date);
  assertTimeZone(timeZone);
  const match = HH_MM.exec(time);
  if (!match) throw new RangeError(`Not a wall-clock time HH:mm: ${JSON.stringify(time)}`);
  const [year, month, day] = date.split('-').map(Number) as [number, number, number];
  const local = DateTime.fromObject(
    { year, month, day, hour: Number(match[1]), minute: Number(match[2]) },
    { zone: timeZone },
  );
  const candidates = local.getPossibleOffsets();
  const earliest = candidates.reduce((a, b) => (b.toMillis() < a.toMillis() ? b : a), local);
  return earliest.toUTC().toISO() as string;
}
