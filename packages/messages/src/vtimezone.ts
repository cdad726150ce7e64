import { DateTime, IANAZone } from 'luxon';

/** One offset change of a zone: the instant it happens and the offsets around it. */
interface OffsetChange {
  /** The first instant (UTC milliseconds) of the new offset. */
  atMs: number;
  /** UTC offset in minutes before the change. */
  fromMinutes: number;
  /** UTC offset in minutes from the change on. */
  toMinutes: number;
  /** Whether the new offset is daylight-saving time. */
  daylight: boolean;
}

const MINUTE_MS = 60_000;
const DAY_MS = 86_400_000;

/**
 * Formats a UTC offset in minutes as RFC 5545 §3.3.14 UTC-OFFSET (`-0500`, `+0100`, `+0545`).
 */
export function formatUtcOffset(minutes: number): string {
  const sign = minutes < 0 ? '-' : '+';
  const abs = Math.abs(minutes);
  const hh = String(Math.floor(abs / 60)).padStart(2, '0');
  const mm = String(abs % 60).padStart(2, '0');
  return `${sign}${hh}${mm}`;
}

function offsetAt(zone: IANAZone, ms: number): number {
  return zone.offset(ms);
}

/**
 * Finds every offset change of `zoneName` in `[fromMs, toMs)`. Zones change offset at most a few
 * times a year and never twice within a day, so a daily scan followed by a binary search to the
 * minute finds each change exactly (all current tz database transitions fall on whole minutes).
 */
function offsetChanges(zoneName: string, windowFromMs: number, toMs: number): OffsetChange[] {
  const zone = IANAZone.create(zoneName);
  const changes: OffsetChange[] = [];
  // Whole minutes keep the bisection below on the minute grid, so it always makes progress.
  const fromMs = Math.floor(windowFromMs / MINUTE_MS) * MINUTE_MS;
  let previousMs = fromMs;
  let previousOffset = offsetAt(zone, fromMs);
  for (let ms = fromMs + DAY_MS; ms <= toMs + DAY_MS; ms += DAY_MS) {
    const offset = offsetAt(zone, ms);
    if (offset !== previousOffset) {
      // Invariant: offset at `low` is the old one, at `high` the new one.
      let low = previousMs;
      let high = ms;
      while (high - low > MINUTE_MS) {
        const mid = low + Math.floor((high - low) / 2 / MINUTE_MS) * MINUTE_MS;
        if (offsetAt(zone, mid) === previousOffset) low = mid;
        else high = mid;
      }
      if (high < toMs) {
        changes.push({
          atMs: high,
          fromMinutes: previousOffset,
          toMinutes: offset,
          daylight: DateTime.fromMillis(high, { zone }).isInDST,
        });
      }
      previousOffset = offset;
    }
    previousMs = ms;
  }
  return changes;
}

/** Local wall-clock time of an instant in a fixed offset, as RFC 5545 DATE-TIME without `Z`. */
function localStamp(ms: number, offsetMinutes: number): string {
  return DateTime.fromMillis(ms + offsetMinutes * MINUTE_MS, { zone: 'utc' }).toFormat(
    "yyyyLLdd'T'HHmmss",
  );
}

function observance(
  daylight: boolean,
  startMs: number,
  fromMinutes: number,
  toMinutes: number,
  name: string | null,
): string[] {
  const kind = daylight ? 'DAYLIGHT' : 'STANDARD';
  return [
    `BEGIN:${kind}`,
    // RFC 5545 §3.6.5: an observance's DTSTART is local time in the offset in use BEFORE it
    // (its TZOFFSETFROM), e.g. 02:00 for New York's spring change at 07:00Z.
    `DTSTART:${localStamp(startMs, fromMinutes)}`,
    `TZOFFSETFROM:${formatUtcOffset(fromMinutes)}`,
    `TZOFFSETTO:${formatUtcOffset(toMinutes)}`,
    ...(name ? [`TZNAME:${name}`] : []),
    `END:${kind}`,
  ];
}

/** Short zone name (`EDT`, `CET`) when the runtime's Intl data has a real one, else `null`. */
function shortName(zoneName: string, ms: number): string | null {
  const name = DateTime.fromMillis(ms, { zone: zoneName }).setLocale('en-US').offsetNameShort;
  // Intl falls back to "GMT+1"-style labels when it knows no abbreviation; TZNAME is optional
  // (RFC 5545 §3.8.3.2), so a made-up label is left out rather than written.
  return name && /^[A-Z]{2,6}$/.test(name) ? name : null;
}

/**
 * Builds an RFC 5545 §3.6.5 VTIMEZONE for an IANA zone, covering `[from, to)` with explicit
 * (non-recurring) observances computed from the runtime's tz database through luxon.
 *
 * Why non-recurring: the tz database is the source of truth and its rules change (a country
 * abolishes DST); writing the actual transitions of the years the invite touches is exact for
 * those years and needs no RRULE reasoning. The first observance states the offset in force at
 * `from`, so every local time in the window resolves.
 *
 * @param zoneName IANA zone name, e.g. `America/New_York`.
 * @param from Start of the window (an instant).
 * @param to End of the window (an instant), after `from`.
 * @returns The VTIMEZONE component, lines joined with CRLF, no trailing line break.
 * @throws RangeError for an unknown zone or an empty window.
 */
export function buildVTimezone(zoneName: string, from: Date, to: Date): string {
  if (!IANAZone.isValidZone(zoneName)) throw new RangeError(`Unknown IANA time zone: ${zoneName}`);
  const fromMs = from.getTime();
  const toMs = to.getTime();
  if (!(toMs > fromMs)) throw new RangeError('The VTIMEZONE window must end after it starts');
  const zone = IANAZone.create(zoneName);
  const initialOffset = offsetAt(zone, fromMs);
  const lines = [
    'BEGIN:VTIMEZONE',
    `TZID:${zoneName}`,
    ...observance(
      DateTime.fromMillis(fromMs, { zone }).isInDST,
      fromMs,
      initialOffset,
      initialOffset,
      shortName(zoneName, fromMs),
    ),
  ];
  for (const change of offsetChanges(zoneName, fromMs, toMs)) {
    lines.push(
      ...observance(
        change.daylight,
        change.atMs,
        change.fromMinutes,
        change.toMinutes,
        shortName(zoneName, change.atMs),
      ),
    );
  }
  lines.push('END:VTIMEZONE');
  return lines.join('\r\n');
}
