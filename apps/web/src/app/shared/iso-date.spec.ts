import {
  addDays,
  daysBetween,
  describeZone,
  formatDay,
  formatInstant,
  formatWindow,
  formatWindowCompact,
  fromIsoDate,
  isIsoDate,
  toIsoDate,
  todayIn,
  windowLength,
} from './iso-date';

describe('ISO calendar dates', () => {
  it('turns a picker date into the day it shows and back, whatever the time of day', () => {
    expect(toIsoDate(new Date(2027, 2, 28))).toBe('2027-03-28');
    expect(toIsoDate(new Date(2027, 2, 28, 23, 59))).toBe('2027-03-28');
    expect(toIsoDate(fromIsoDate('2027-11-07'))).toBe('2027-11-07');
    expect(toIsoDate(fromIsoDate('0099-01-01'))).toBe('0099-01-01');
  });

  it('recognises real calendar dates only', () => {
    expect(isIsoDate('2028-02-29')).toBe(true);
    expect(isIsoDate('2027-02-29')).toBe(false);
    expect(isIsoDate('2027-2-3')).toBe(false);
    expect(isIsoDate(20270203)).toBe(false);
  });

  it('counts and moves calendar days across month, year and DST boundaries', () => {
    // 2027-03-14 is the US change to daylight time (docs/references.md, 15 U.S.C. 260a): the day
    // count must not lose or gain a day over it.
    expect(addDays('2027-03-13', 2)).toBe('2027-03-15');
    expect(addDays('2026-12-30', 3)).toBe('2027-01-02');
    expect(daysBetween('2027-03-01', '2027-03-31')).toBe(30);
    expect(daysBetween('2027-01-05', '2027-01-01')).toBe(-4);
    expect(windowLength('2027-03-01', '2027-03-03')).toBe(3);
  });

  it('takes today from the zone asked for', () => {
    // 2027-01-01 03:00 UTC is still New Year's Eve in New York (UTC−5) but New Year's Day in Berlin.
    const now = new Date(Date.UTC(2027, 0, 1, 3, 0));
    expect(todayIn('America/New_York', now)).toBe('2026-12-31');
    expect(todayIn('Europe/Berlin', now)).toBe('2027-01-01');
  });

  it('writes days, windows, instants and zones for people', () => {
    expect(formatDay('2026-12-14')).toBe('Mon, Dec 14, 2026');
    expect(formatDay('2026-12-14', 'long')).toBe('Monday, December 14, 2026');
    expect(formatDay('2026-12-14', 'short')).toBe('Dec 14');
    expect(formatWindow('2026-12-14', '2026-12-16')).toBe('Dec 14 – Dec 16, 2026');
    expect(formatWindow('2026-12-30', '2027-01-02')).toBe('Dec 30, 2026 – Jan 2, 2027');
    expect(formatWindow('2026-12-14', '2026-12-14')).toBe('Mon, Dec 14, 2026');
    // Intl.DateTimeFormat#formatRange leaves out the parts both ends share (ECMA-402).
    expect(formatWindowCompact('2027-01-04', '2027-01-05')).toBe('Jan 4 – 5, 2027');
    expect(formatWindowCompact('2027-01-28', '2027-02-03')).toBe('Jan 28 – Feb 3, 2027');
    expect(formatWindowCompact('2026-12-30', '2027-01-02')).toBe('Dec 30, 2026 – Jan 2, 2027');
    expect(formatWindowCompact('2027-01-04', '2027-01-04')).toBe('Jan 4, 2027');
    expect(formatInstant('2026-12-01T23:56:44.216Z', 'America/New_York')).toBe(
      'Dec 1, 2026, 6:56 PM EST',
    );
    expect(describeZone('America/New_York', '2027-07-01')).toBe(
      'America/New_York (Eastern Daylight Time)',
    );
    expect(describeZone('Europe/Berlin', '2027-01-15')).toBe(
      'Europe/Berlin (Central European Standard Time)',
    );
  });
});
