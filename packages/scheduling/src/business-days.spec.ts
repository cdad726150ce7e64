import fc from 'fast-check';

import {
  addBusinessDays,
  addCalendarDays,
  assertIsoDate,
  businessDaysBetween,
  isBusinessDay,
  isPublicHoliday,
  isWeekend,
  isoWeekday,
  publicHolidayOn,
  publicHolidays,
  rollBackToBusinessDay,
  rollForwardToBusinessDay,
  subtractBusinessDays,
} from './business-days';
import {
  RUNS,
  SITE_POOL,
  dateArb,
  oracleCountOpenClosed,
  oracleIsBusinessDay,
} from './test-support';

// 5 U.S.C. 6103, observed dates for 2027 (docs/references.md): Jun 19, Jul 4 and Dec 25 fall on
// a weekend and are observed on the nearest weekday; 2028-01-01 (Saturday) is observed on
// 2027-12-31.
const US_FEDERAL_OBSERVED_2027 = [
  '2027-01-01',
  '2027-01-18',
  '2027-02-15',
  '2027-05-31',
  '2027-06-18',
  '2027-07-05',
  '2027-09-06',
  '2027-10-11',
  '2027-11-11',
  '2027-11-25',
  '2027-12-24',
  '2027-12-31',
];

// Germany, nationwide public holidays 2027 (docs/references.md): Good Friday Mar 26, Easter
// Monday Mar 29, Ascension May 6, Whit Monday May 17, and holidays on weekends are not moved.
const DE_NATIONWIDE_2027 = [
  '2027-01-01',
  '2027-03-26',
  '2027-03-29',
  '2027-05-01',
  '2027-05-06',
  '2027-05-17',
  '2027-10-03',
  '2027-12-25',
  '2027-12-26',
];

describe('business-day calendar', () => {
  describe('US federal holidays 2027 (5 U.S.C. 6103, observed dates)', () => {
    it.each(US_FEDERAL_OBSERVED_2027)('%s is a public holiday and not a business day', (date) => {
      expect(isPublicHoliday(date, 'US')).toBe(true);
      expect(isBusinessDay(date, 'US')).toBe(false);
    });

    it('has exactly the twelve observed federal dates as weekday holidays', () => {
      // 5 U.S.C. 6103: the weekday holidays of 2027 are exactly the observed dates above.
      const weekdayHolidays = [...publicHolidays('US', 2027).keys()]
        .filter((date) => !isWeekend(date))
        .sort();
      expect(weekdayHolidays).toEqual(US_FEDERAL_OBSERVED_2027);
    });

    it('marks the observed days as substitutes', () => {
      // 5 U.S.C. 6103(b): a holiday on a Saturday is observed on the Friday before, on a Sunday
      // on the Monday after.
      expect(publicHolidayOn('2027-06-18', 'US')?.substitute).toBe(true);
      expect(publicHolidayOn('2027-07-05', 'US')?.substitute).toBe(true);
      expect(publicHolidayOn('2027-12-31', 'US')?.substitute).toBe(true);
      expect(publicHolidayOn('2027-11-25', 'US')?.substitute).toBe(false);
    });

    it('keeps the 2028 New Year substitute in 2027 and not in 2028', () => {
      // 5 U.S.C. 6103(b)(1): 2028-01-01 is a Saturday, observed Friday 2027-12-31.
      expect(isoWeekday('2028-01-01')).toBe(6);
      expect(publicHolidays('US', 2027).has('2027-12-31')).toBe(true);
      expect([...publicHolidays('US', 2028).keys()].every((d) => d.startsWith('2028-'))).toBe(true);
    });

    it('counts across the Independence Day substitute (hand-derived)', () => {
      // Fri 2027-07-02 + 1 business day: Sat, Sun, Mon Jul 5 (observed, 5 U.S.C. 6103) → Tue Jul 6.
      expect(addBusinessDays('2027-07-02', 1, 'US')).toBe('2027-07-06');
      // And back: Tue Jul 6 − 1 business day → Fri Jul 2.
      expect(subtractBusinessDays('2027-07-06', 1, 'US')).toBe('2027-07-02');
    });

    it('counts across the year end (hand-derived)', () => {
      // Thu 2027-12-30 + 1: Fri Dec 31 observed for New Year 2028, Sat, Sun → Mon 2028-01-03.
      expect(addBusinessDays('2027-12-30', 1, 'US')).toBe('2028-01-03');
      // Thu 2027-12-23 + 1: Fri Dec 24 observed for Christmas, weekend → Mon Dec 27.
      expect(addBusinessDays('2027-12-23', 1, 'US')).toBe('2027-12-27');
    });
  });

  describe('Germany nationwide 2027 (no substitute days)', () => {
    it.each(DE_NATIONWIDE_2027)('%s is a public holiday', (date) => {
      expect(isPublicHoliday(date, 'DE')).toBe(true);
      expect(isBusinessDay(date, 'DE')).toBe(false);
    });

    it('does not move weekend holidays to a weekday', () => {
      // docs/references.md: Germany does not move holidays that fall on a weekend.
      expect(isoWeekday('2027-10-03')).toBe(7); // German Unity Day on a Sunday
      expect(isBusinessDay('2027-10-04', 'DE')).toBe(true);
      expect(isBusinessDay('2027-05-03', 'DE')).toBe(true); // after May 1 (Saturday)
      expect(isBusinessDay('2027-12-27', 'DE')).toBe(true); // after Dec 25/26 (Sat/Sun)
    });

    it('counts across Easter 2027 (hand-derived)', () => {
      // Thu Mar 25 + 1: Fri Mar 26 Good Friday, weekend, Mon Mar 29 Easter Monday → Tue Mar 30.
      expect(addBusinessDays('2027-03-25', 1, 'DE')).toBe('2027-03-30');
      expect(subtractBusinessDays('2027-03-30', 1, 'DE')).toBe('2027-03-25');
      // The same days in the US calendar: Good Friday is no federal holiday (5 U.S.C. 6103).
      expect(addBusinessDays('2027-03-25', 1, 'US')).toBe('2027-03-26');
    });

    it('adds regional holidays with a subdivision code', () => {
      // From memory: Epiphany (6 January) is a public holiday in Bavaria, not nationwide.
      expect(isBusinessDay('2027-01-06', 'DE')).toBe(true);
      expect(isBusinessDay('2027-01-06', 'DE-BY')).toBe(false);
    });
  });

  describe('day arithmetic', () => {
    it('rolls to business days', () => {
      // Sat 2027-07-03: forward skips Sun and Mon Jul 5 (observed), back lands on Fri Jul 2.
      expect(rollForwardToBusinessDay('2027-07-03', 'US')).toBe('2027-07-06');
      expect(rollBackToBusinessDay('2027-07-03', 'US')).toBe('2027-07-02');
      expect(rollForwardToBusinessDay('2027-07-06', 'US')).toBe('2027-07-06');
    });

    it('counts business days in a half-open range', () => {
      // [Fri Jul 2, Wed Jul 7): Fri Jul 2 and Tue Jul 6 (Mon Jul 5 observed holiday).
      expect(businessDaysBetween('2027-07-02', '2027-07-07', 'US')).toBe(2);
      expect(businessDaysBetween('2027-07-07', '2027-07-02', 'US')).toBe(0);
    });

    it('returns the date unchanged for zero days', () => {
      expect(addBusinessDays('2027-07-04', 0, 'US')).toBe('2027-07-04');
      expect(subtractBusinessDays('2027-07-04', 0, 'US')).toBe('2027-07-04');
    });

    it('handles month ends and leap days', () => {
      // Gregorian calendar: 2028 is a leap year, 2027 is not.
      expect(addCalendarDays('2028-02-28', 1)).toBe('2028-02-29');
      expect(addCalendarDays('2027-02-28', 1)).toBe('2027-03-01');
      expect(isoWeekday('2027-01-01')).toBe(5); // a Friday
    });

    it('rejects malformed dates and unknown calendars', () => {
      expect(() => assertIsoDate('2027-02-29')).toThrow(RangeError);
      expect(() => assertIsoDate('2027-2-3')).toThrow(RangeError);
      expect(() => isBusinessDay('2027-13-01', 'US')).toThrow(RangeError);
      expect(() => isBusinessDay('2027-01-04', 'XX')).toThrow(/Unknown holiday calendar/);
      expect(() => isBusinessDay('2027-01-04', 'DE-ZZ')).toThrow(/Unknown holiday calendar/);
      expect(() => addBusinessDays('2027-01-04', 1.5, 'US')).toThrow(RangeError);
    });
  });

  describe('properties', () => {
    const countryArb = fc.constantFrom(...SITE_POOL.map((s) => s.country));

    it('agrees with an independent oracle on every date', () => {
      fc.assert(
        fc.property(dateArb, countryArb, (date, country) => {
          expect(isBusinessDay(date, country)).toBe(oracleIsBusinessDay(date, country));
        }),
        { numRuns: RUNS },
      );
    });

    it('adds exactly n business days and subtracts back', () => {
      fc.assert(
        fc.property(dateArb, fc.integer({ min: 0, max: 30 }), countryArb, (start, n, country) => {
          const end = addBusinessDays(start, n, country);
          expect(oracleCountOpenClosed(start, end, country)).toBe(n);
          if (n > 0) expect(oracleIsBusinessDay(end, country)).toBe(true);
          const from = rollForwardToBusinessDay(start, country);
          expect(subtractBusinessDays(addBusinessDays(from, n, country), n, country)).toBe(from);
        }),
        { numRuns: RUNS },
      );
    });
  });
});
