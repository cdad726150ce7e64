/*
 * Times relative to now ("5 minutes ago", "due in 2 days") with the browser's own
 * Intl.RelativeTimeFormat, so the eagerly loaded notification bell needs no date library.
 */

const MINUTE_MS = 60_000;
const HOUR_MS = 60 * MINUTE_MS;
const DAY_MS = 24 * HOUR_MS;

/**
 * `ms` ago in words, for anything under a month: "just now" under a minute (never "0 seconds
 * ago"), then whole minutes, hours and days ("yesterday" for one day: ECMA-402 `numeric: auto`).
 */
function recentAgo(ms: number, locale: string): string {
  const words = new Intl.RelativeTimeFormat(locale, { numeric: 'auto' });
  if (ms < MINUTE_MS) return 'just now';
  if (ms < HOUR_MS) return words.format(-Math.floor(ms / MINUTE_MS), 'minute');
  if (ms < DAY_MS) return words.format(-Math.floor(ms / HOUR_MS), 'hour');
  return words.format(-Math.floor(ms / DAY_MS), 'day');
}

/**
 * How long ago `at` was, in the largest whole unit: "just now" under a minute, then minutes,
 * hours, "yesterday"/days up to a week, else the date in `timeZone` ("Dec 1" this year,
 * "Dec 1, 2025" before).
 */
export function timeAgo(
  at: string,
  now: Date = new Date(),
  locale = 'en-US',
  timeZone?: string,
): string {
  const then = Date.parse(at);
  if (Number.isNaN(then)) return '';
  const ms = Math.max(0, now.getTime() - then);
  if (ms < 7 * DAY_MS) return recentAgo(ms, locale);
  const yearOf = (d: Date) =>
    new Intl.DateTimeFormat('en-US', { year: 'numeric', timeZone }).format(d);
  const date = new Date(then);
  return new Intl.DateTimeFormat(locale, {
    month: 'short',
    day: 'numeric',
    timeZone,
    ...(yearOf(date) === yearOf(now) ? {} : { year: 'numeric' }),
  }).format(date);
}

/**
 * How long ago `at` was at any distance, in the largest whole unit: "just now" under a minute
 * (never "0 seconds ago"), then minutes, hours, days, months (30-day steps) and years. For
 * columns that show the exact time beside it, where a date would say the same thing twice.
 */
export function timeSince(at: string, now: Date = new Date(), locale = 'en-US'): string {
  const then = Date.parse(at);
  if (Number.isNaN(then)) return '';
  const ms = Math.max(0, now.getTime() - then);
  const days = Math.floor(ms / DAY_MS);
  if (days < 30) return recentAgo(ms, locale);
  // "1 month ago" rather than "last month", which reads as the calendar month before this one.
  const counted = new Intl.RelativeTimeFormat(locale, { numeric: 'always' });
  if (days < 365) return counted.format(-Math.floor(days / 30), 'month');
  return counted.format(-Math.floor(days / 365), 'year');
}

/**
 * How far away a deadline is, counting whole units still left (never rounding up, so "due in 2
 * days" always means at least 48 hours): days from 48 hours on, then hours, then minutes.
 * Returns null once the deadline has passed.
 */
export function dueIn(dueAt: string, now: Date = new Date(), locale = 'en-US'): string | null {
  const due = Date.parse(dueAt);
  if (Number.isNaN(due)) return null;
  const ms = due - now.getTime();
  if (ms <= 0) return null;
  const words = new Intl.RelativeTimeFormat(locale, { numeric: 'always' });
  if (ms >= 2 * DAY_MS) return `due ${words.format(Math.floor(ms / DAY_MS), 'day')}`;
  if (ms >= HOUR_MS) return `due ${words.format(Math.floor(ms / HOUR_MS), 'hour')}`;
  return `due ${words.format(Math.max(1, Math.floor(ms / MINUTE_MS)), 'minute')}`;
}
