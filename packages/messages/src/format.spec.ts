import { formatCalendarDate } from './format';

describe('formatCalendarDate', () => {
  // 2027-03-15 is a Monday: US clocks change on the second Sunday of March (15 U.S.C. 260a),
  // 2027-03-14 (reference list in docs/references.md).
  it('writes a day in full for e-mail bodies and in the web app’s short form for notices', () => {
    expect(formatCalendarDate('2027-03-15', 'en-US')).toBe('Monday, March 15, 2027');
    expect(formatCalendarDate('2027-03-15', 'en-US', 'medium')).toBe('Mon, Mar 15, 2027');
  });

  it('agrees with the runtime’s Intl.DateTimeFormat (ECMA-402) on every day of a year', () => {
    // The reference is the platform's own formatter at UTC, so the day is never shifted.
    const reference = new Intl.DateTimeFormat('en-US', {
      weekday: 'short',
      year: 'numeric',
      month: 'short',
      day: 'numeric',
      timeZone: 'UTC',
    });
    for (let d = Date.UTC(2027, 0, 1); d < Date.UTC(2028, 0, 1); d += 86_400_000) {
      const iso = new Date(d).toISOString().slice(0, 10);
      expect(formatCalendarDate(iso, 'en-US', 'medium')).toBe(reference.format(new Date(d)));
    }
  });

  it('refuses a day that does not exist', () => {
    expect(() => formatCalendarDate('2027-02-29', 'en-US', 'medium')).toThrow(RangeError);
  });
});
