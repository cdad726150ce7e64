import { dueIn, timeAgo, timeSince } from './relative-time';

// Expected words are what the ECMA-402 Intl.RelativeTimeFormat API prints for en-US (the
// standard's `numeric: 'auto'` turns −1 day into "yesterday"); the unit choice is ours.
describe('timeAgo', () => {
  const now = new Date('2026-12-02T12:00:00.000Z');

  it('uses the largest whole unit up to a week', () => {
    expect(timeAgo('2026-12-02T11:59:30.000Z', now)).toBe('just now');
    expect(timeAgo('2026-12-02T11:55:00.000Z', now)).toBe('5 minutes ago');
    expect(timeAgo('2026-12-02T09:30:00.000Z', now)).toBe('2 hours ago');
    expect(timeAgo('2026-12-01T10:00:00.000Z', now)).toBe('yesterday');
    expect(timeAgo('2026-11-28T12:00:00.000Z', now)).toBe('4 days ago');
  });

  it('never counts seconds: the same instant, the first minute and a clock a little ahead', () => {
    // Intl.RelativeTimeFormat would print "in 0 seconds" / "now" / "0 seconds ago" for these; the
    // one-minute "just now" threshold is ours (common practice in notification lists).
    for (const at of [
      '2026-12-02T12:00:00.000Z',
      '2026-12-02T11:59:00.001Z',
      '2026-12-02T12:00:05.000Z',
    ]) {
      expect(timeAgo(at, now)).toBe('just now');
    }
    expect(timeAgo('2026-12-02T11:59:00.000Z', now)).toBe('1 minute ago');
  });

  it('gives the date for older times, with the year only when it differs', () => {
    expect(timeAgo('2026-11-02T12:00:00.000Z', now)).toBe('Nov 2');
    expect(timeAgo('2025-11-02T12:00:00.000Z', now)).toBe('Nov 2, 2025');
  });

  it('says nothing for an unreadable time', () => {
    expect(timeAgo('not a time', now)).toBe('');
  });
});

describe('dueIn', () => {
  const now = new Date('2026-12-02T12:00:00.000Z');

  it('counts whole days from 48 hours, never rounding up', () => {
    expect(dueIn('2026-12-04T12:00:00.000Z', now)).toBe('due in 2 days');
    // 71 h 59 min left: still 2 whole days, not 3.
    expect(dueIn('2026-12-05T11:59:00.000Z', now)).toBe('due in 2 days');
  });

  it('counts hours below 48 hours and minutes below one hour', () => {
    expect(dueIn('2026-12-04T11:00:00.000Z', now)).toBe('due in 47 hours');
    expect(dueIn('2026-12-02T13:00:00.000Z', now)).toBe('due in 1 hour');
    expect(dueIn('2026-12-02T12:45:00.000Z', now)).toBe('due in 45 minutes');
    expect(dueIn('2026-12-02T12:00:20.000Z', now)).toBe('due in 1 minute');
  });

  it('is null once the deadline has passed', () => {
    expect(dueIn('2026-12-02T12:00:00.000Z', now)).toBeNull();
    expect(dueIn('2026-12-01T12:00:00.000Z', now)).toBeNull();
  });
});

// ECMA-402 Intl.RelativeTimeFormat en-US words; the "just now" threshold and the 30-day month are
// ours (common practice for "last seen" columns that show the exact time beside them).
describe('timeSince', () => {
  const now = new Date('2026-12-04T10:15:00.000Z');

  it('says "just now" for the first minute and for a clock a little ahead, never seconds', () => {
    expect(timeSince('2026-12-04T10:15:00.000Z', now)).toBe('just now');
    expect(timeSince('2026-12-04T10:14:01.000Z', now)).toBe('just now');
    expect(timeSince('2026-12-04T10:15:04.000Z', now)).toBe('just now');
  });

  it('counts whole minutes, hours, days, months and years', () => {
    expect(timeSince('2026-12-04T10:14:00.000Z', now)).toBe('1 minute ago');
    expect(timeSince('2026-12-04T07:15:00.000Z', now)).toBe('3 hours ago');
    expect(timeSince('2026-12-03T10:15:00.000Z', now)).toBe('yesterday');
    // 40 days before: Oct 25 → one whole 30-day month.
    expect(timeSince('2026-10-25T10:15:00.000Z', now)).toBe('1 month ago');
    expect(timeSince('2026-06-04T10:15:00.000Z', now)).toBe('6 months ago');
    expect(timeSince('2024-12-04T10:15:00.000Z', now)).toBe('2 years ago');
    expect(timeSince('not a date', now)).toBe('');
  });
});
