import fc from 'fast-check';
import ICAL from 'ical.js';
import { DateTime } from 'luxon';

import {
  AvailabilityRuleError,
  availabilityDays,
  availabilityPreview,
  ruleOccurrences,
  validateAvailabilityRule,
} from './recurrence';
import { RUNS, eachDay, plusDays } from './test-support';
import type { ProctorAvailability } from './types';

const NEW_YORK = 'America/New_York';
const BERLIN = 'Europe/Berlin';

function only(...rules: string[]): ProctorAvailability {
  return { rules, exceptions: [], blackouts: [] };
}

describe('RFC 5545 §3.8.5.3 recurrence examples', () => {
  // RFC 5545 §3.8.5.3, "Every other week on Monday, Wednesday, and Friday until December 24,
  // 1997, starting on Monday, September 1, 1997". The expected list is the one in
  // docs/references.md, which was written from memory and re-derived by hand (WKST=SU weeks);
  // it was compared with the RFC's listed dates as given there: Sep 1, 3, 5, 15, 17, 19, 29;
  // Oct 1, 3, 13, 15, 17, 27, 29, 31; Nov 10, 12, 14, 24, 26, 28; Dec 8, 10, 12, 22.
  const everyOtherWeek =
    'DTSTART;TZID=America/New_York:19970901T090000\n' +
    'RRULE:FREQ=WEEKLY;INTERVAL=2;UNTIL=19971224T000000Z;WKST=SU;BYDAY=MO,WE,FR';
  const expected = [
    ...[1, 3, 5, 15, 17, 19, 29].map((d) => `1997-09-${String(d).padStart(2, '0')}`),
    ...[1, 3, 13, 15, 17, 27, 29, 31].map((d) => `1997-10-${String(d).padStart(2, '0')}`),
    ...[10, 12, 14, 24, 26, 28].map((d) => `1997-11-${d}`),
    ...[8, 10, 12, 22].map((d) => `1997-12-${String(d).padStart(2, '0')}`),
  ];

  it('every other week on MO, WE, FR until 24 Dec 1997 gives the listed 25 dates', () => {
    // 17 weeks from Mon 1 Sep 1997 reach past the UNTIL bound (Sun 28 Dec).
    expect(availabilityPreview(only(everyOtherWeek), NEW_YORK, '1997-09-01', 17)).toEqual(expected);
  });

  it('keeps 9:00 local: EDT before 26 Oct 1997, EST after', () => {
    // docs/references.md: "9:00 local; EDT until Oct 26, EST after" (US rule of 1997 via IANA
    // tz). 9:00 EDT = 13:00Z, 9:00 EST = 14:00Z.
    const occurrences = ruleOccurrences(everyOtherWeek, NEW_YORK, {
      from: '1997-10-15',
      to: '1997-10-29',
    });
    expect(occurrences).toEqual([
      { date: '1997-10-15', start: '1997-10-15T13:00:00Z' },
      { date: '1997-10-17', start: '1997-10-17T13:00:00Z' },
      { date: '1997-10-27', start: '1997-10-27T14:00:00Z' },
      { date: '1997-10-29', start: '1997-10-29T14:00:00Z' },
    ]);
  });

  it('stops before Wed 24 Dec: 9:00 EST that day is 14:00Z, after UNTIL 00:00Z', () => {
    // RFC 5545 §3.3.10: UNTIL is inclusive and, with a TZID start, given in UTC.
    const december = ruleOccurrences(everyOtherWeek, NEW_YORK, {
      from: '1997-12-20',
      to: '1997-12-31',
    });
    expect(december.map((o) => o.date)).toEqual(['1997-12-22']);
  });

  it('"Weekly for 10 occurrences" from Tue 2 Sep 1997', () => {
    // RFC 5545 §3.8.5.3 (listed dates from memory; also plain Tuesdays): 1997 Sep 2, 9, 16, 23,
    // 30; Oct 7, 14, 21 (9:00 EDT); Oct 28; Nov 4 (9:00 EST).
    const rule = 'DTSTART;TZID=America/New_York:19970902T090000\nRRULE:FREQ=WEEKLY;COUNT=10';
    const all = ruleOccurrences(rule, NEW_YORK, { from: '1997-08-01', to: '1998-12-31' });
    expect(all.map((o) => o.date)).toEqual([
      '1997-09-02',
      '1997-09-09',
      '1997-09-16',
      '1997-09-23',
      '1997-09-30',
      '1997-10-07',
      '1997-10-14',
      '1997-10-21',
      '1997-10-28',
      '1997-11-04',
    ]);
    expect(all[7]?.start).toBe('1997-10-21T13:00:00Z');
    expect(all[8]?.start).toBe('1997-10-28T14:00:00Z');
  });

  it('"Monthly on the first Friday for 10 occurrences" from 5 Sep 1997', () => {
    // RFC 5545 §3.8.5.3 (listed dates from memory): 1997 Sep 5, Oct 3, Nov 7, Dec 5; 1998 Jan 2,
    // Feb 6, Mar 6, Apr 3, May 1, Jun 5. Each is also checked to be a month's first Friday with
    // the JavaScript Date (an independent calendar).
    const rule =
      'DTSTART;TZID=America/New_York:19970905T090000\nRRULE:FREQ=MONTHLY;COUNT=10;BYDAY=1FR';
    const dates = ruleOccurrences(rule, NEW_YORK, { from: '1997-09-01', to: '1999-01-01' }).map(
      (o) => o.date,
    );
    expect(dates).toEqual([
      '1997-09-05',
      '1997-10-03',
      '1997-11-07',
      '1997-12-05',
      '1998-01-02',
      '1998-02-06',
      '1998-03-06',
      '1998-04-03',
      '1998-05-01',
      '1998-06-05',
    ]);
    for (const d of dates) {
      const date = new Date(`${d}T00:00:00Z`);
      expect(date.getUTCDay()).toBe(5);
      expect(date.getUTCDate()).toBeLessThanOrEqual(7);
    }
  });
});

describe('daylight-saving changes in 2027 do not shift availability days', () => {
  // DST 2027 (docs/references.md, derived from 15 U.S.C. 260a and EU Directive 2000/84/EC via
  // IANA tz): New York springs forward at 2027-03-14 07:00Z, Berlin at 2027-03-28 01:00Z.

  it('New York: 01:59 EST is the last minute before 07:00Z, 03:00 EDT is 07:00Z', () => {
    const range = { from: '2027-03-13', to: '2027-03-15' };
    const before = ruleOccurrences(
      'DTSTART;TZID=America/New_York:20270301T015900\nRRULE:FREQ=DAILY',
      NEW_YORK,
      range,
    );
    const after = ruleOccurrences(
      'DTSTART;TZID=America/New_York:20270301T030000\nRRULE:FREQ=DAILY',
      NEW_YORK,
      range,
    );
    expect(before.map((o) => o.start)).toEqual([
      '2027-03-13T06:59:00Z',
      '2027-03-14T06:59:00Z',
      '2027-03-15T05:59:00Z',
    ]);
    expect(after.map((o) => o.start)).toEqual([
      '2027-03-13T08:00:00Z',
      '2027-03-14T07:00:00Z',
      '2027-03-15T07:00:00Z',
    ]);
    // The day of each occurrence is the local wall-clock day: no day is lost or doubled.
    expect(after.map((o) => o.date)).toEqual(['2027-03-13', '2027-03-14', '2027-03-15']);
  });

  it('New York: a skipped local time (02:30 on 14 Mar) still counts for 14 Mar', () => {
    // 02:30 does not exist on 2027-03-14 in New York; luxon moves it by the gap to 03:30 EDT.
    const occurrences = ruleOccurrences(
      'DTSTART;TZID=America/New_York:20270301T023000\nRRULE:FREQ=DAILY',
      NEW_YORK,
      { from: '2027-03-14', to: '2027-03-14' },
    );
    expect(occurrences).toEqual([{ date: '2027-03-14', start: '2027-03-14T07:30:00Z' }]);
  });

  it('Berlin: 01:59 CET is 00:59Z, 03:00 CEST is 01:00Z on 28 Mar', () => {
    const range = { from: '2027-03-28', to: '2027-03-28' };
    expect(
      ruleOccurrences(
        'DTSTART;TZID=Europe/Berlin:20270301T015900\nRRULE:FREQ=DAILY',
        BERLIN,
        range,
      ),
    ).toEqual([{ date: '2027-03-28', start: '2027-03-28T00:59:00Z' }]);
    expect(
      ruleOccurrences(
        'DTSTART;TZID=Europe/Berlin:20270301T030000\nRRULE:FREQ=DAILY',
        BERLIN,
        range,
      ),
    ).toEqual([{ date: '2027-03-28', start: '2027-03-28T01:00:00Z' }]);
  });

  it.each([
    [NEW_YORK, '2027-03-12', '2027-03-16'],
    [BERLIN, '2027-03-26', '2027-03-30'],
  ])('%s: a rule at 00:30 local gives every day of %s – %s exactly once', (zone, from, to) => {
    // The window holds the change (119 h between the local midnights of 5 days, not 120).
    const hours = DateTime.fromISO(`${plusDays(to, 1)}T00:00`, { zone })
      .diff(DateTime.fromISO(`${from}T00:00`, { zone }), 'hours')
      .as('hours');
    expect(hours).toBe(119);
    const rule = `DTSTART;TZID=${zone}:20270301T003000\nRRULE:FREQ=DAILY`;
    expect(availabilityPreview(only(rule), zone, from, 1).slice(0, 5)).toEqual(eachDay(from, to));
    const late = `DTSTART;TZID=${zone}:20270301T233000\nRRULE:FREQ=DAILY`;
    expect(ruleOccurrences(late, zone, { from, to }).map((o) => o.date)).toEqual(eachDay(from, to));
  });

  it('a rule kept in New York time shifts its Berlin day only between the two changes', () => {
    // 18:30 in New York is 00:30 next day in Berlin (6 h apart) except from 2027-03-14 07:00Z
    // to 2027-03-28 01:00Z, when New York is already on EDT and Berlin still on CET (5 h apart):
    // then 18:30 EDT = 22:30Z = 23:30 CET, the same day.
    const mondays = 'DTSTART;TZID=America/New_York:20270301T183000\nRRULE:FREQ=WEEKLY;BYDAY=MO';
    const days = ruleOccurrences(mondays, BERLIN, { from: '2027-03-01', to: '2027-04-06' });
    expect(days).toEqual([
      { date: '2027-03-02', start: '2027-03-01T23:30:00Z' },
      { date: '2027-03-09', start: '2027-03-08T23:30:00Z' },
      { date: '2027-03-15', start: '2027-03-15T22:30:00Z' },
      { date: '2027-03-22', start: '2027-03-22T22:30:00Z' },
      { date: '2027-03-30', start: '2027-03-29T22:30:00Z' },
      { date: '2027-04-06', start: '2027-04-05T22:30:00Z' },
    ]);
  });
});

describe('exceptions and blackouts', () => {
  const zone = 'America/Chicago';
  const base =
    'DTSTART;TZID=America/Chicago:20270104T070000\nRRULE:FREQ=WEEKLY;BYDAY=MO,TU,WE,TH,FR';

  it('takes out exception dates, exception rules and blackouts, and says why', () => {
    const days = availabilityDays(
      {
        rules: [base],
        exceptions: [
          { kind: 'date', date: '2027-06-08' },
          // Every other Thursday off, starting 10 June.
          {
            kind: 'rule',
            rule: 'DTSTART;TZID=America/Chicago:20270610T000000\nRRULE:FREQ=WEEKLY;INTERVAL=2',
          },
        ],
        blackouts: [{ from: '2027-06-17', to: '2027-06-18' }],
      },
      zone,
      { from: '2027-06-07', to: '2027-06-25' },
    );
    const status = Object.fromEntries(days.map((d) => [d.date, d.status]));
    expect(status).toMatchObject({
      '2027-06-07': 'available',
      '2027-06-08': 'exception',
      '2027-06-10': 'exception',
      '2027-06-12': 'not-in-pattern',
      '2027-06-17': 'blackout',
      '2027-06-18': 'blackout',
      '2027-06-24': 'exception',
      '2027-06-25': 'available',
    });
    expect(days).toHaveLength(19);
  });

  it('adds one-off extra days (RDATE-like); exception days and rules still take them out', () => {
    // RFC 5545 §3.8.5.1: RRULE and RDATE instances form the set, EXDATE and EXRULE remove from
    // it. 12 June 2027 is a Saturday (outside the weekday pattern).
    const days = availabilityDays(
      {
        rules: [base],
        exceptions: [
          { kind: 'extra', date: '2027-06-12' },
          { kind: 'extra', date: '2027-06-13' },
          { kind: 'date', date: '2027-06-13' },
          { kind: 'extra', date: '2027-06-19' },
        ],
        blackouts: [{ from: '2027-06-19', to: '2027-06-20' }],
      },
      zone,
      { from: '2027-06-11', to: '2027-06-20' },
    );
    const status = Object.fromEntries(days.map((d) => [d.date, d.status]));
    expect(status).toMatchObject({
      '2027-06-11': 'available',
      '2027-06-12': 'available',
      '2027-06-13': 'exception',
      '2027-06-19': 'blackout',
      '2027-06-20': 'blackout',
    });
    // An extra day outside the range changes nothing inside it.
    expect(days.filter((d) => d.status === 'available').map((d) => d.date)).toEqual([
      '2027-06-11',
      '2027-06-12',
      '2027-06-14',
      '2027-06-15',
      '2027-06-16',
      '2027-06-17',
      '2027-06-18',
    ]);
  });

  it('previews 8 weeks of available days', () => {
    const preview = availabilityPreview(
      { rules: [base], exceptions: [{ kind: 'date', date: '2027-07-05' }], blackouts: [] },
      zone,
      '2027-06-28',
      8,
    );
    // 8 weeks × 5 weekdays, minus the exception (a Monday).
    expect(preview).toHaveLength(39);
    expect(preview[0]).toBe('2027-06-28');
    expect(preview).not.toContain('2027-07-05');
    expect(preview.at(-1)).toBe('2027-08-20');
  });

  it('reads a floating DTSTART in the proctor zone and a date-only UNTIL as inclusive', () => {
    const rule = 'DTSTART:20270607T230000\nRRULE:FREQ=DAILY;UNTIL=20270609';
    expect(ruleOccurrences(rule, zone, { from: '2027-06-01', to: '2027-06-30' })).toEqual([
      { date: '2027-06-07', start: '2027-06-08T04:00:00Z' },
      { date: '2027-06-08', start: '2027-06-09T04:00:00Z' },
      { date: '2027-06-09', start: '2027-06-10T04:00:00Z' },
    ]);
  });

  it.each([
    ['DAILY', 'DTSTART;TZID=America/Chicago:20000103T070000\nRRULE:FREQ=DAILY;INTERVAL=3'],
    [
      'WEEKLY',
      'DTSTART;TZID=America/Chicago:20000103T070000\nRRULE:FREQ=WEEKLY;INTERVAL=5;BYDAY=MO,TH',
    ],
    ['MONTHLY', 'DTSTART;TZID=America/Chicago:20000131T070000\nRRULE:FREQ=MONTHLY;INTERVAL=5'],
  ])('expands a %s rule started in 2000 quickly and on the grid of its start', (_, rule) => {
    // Oracle: plain day arithmetic from the real start (3-day steps, every fifth week's Monday
    // and Thursday, the 31st of every fifth month when it exists). The expansion moves DTSTART
    // forward by whole periods instead of walking 27 years of them.
    const range = { from: '2027-06-01', to: '2027-12-31' };
    const expected = eachDay(range.from, range.to).filter((day) => {
      const days =
        (Date.parse(`${day}T00:00:00Z`) - Date.parse('2000-01-03T00:00:00Z')) / 86_400_000;
      const date = new Date(`${day}T00:00:00Z`);
      if (rule.includes('DAILY')) return days % 3 === 0;
      if (rule.includes('WEEKLY'))
        return Math.floor(days / 7) % 5 === 0 && [1, 4].includes(date.getUTCDay());
      const months = (date.getUTCFullYear() - 2000) * 12 + date.getUTCMonth();
      return months % 5 === 0 && date.getUTCDate() === 31;
    });
    const days = ruleOccurrences(rule, 'America/Chicago', range).map((o) => o.date);
    expect(days).toEqual(expected);
    expect(days.length).toBeGreaterThan(0);
    // Walking from 2000 took about 100 ms for a daily rule; moved forward it takes a few ms.
    // Median of 5 timed runs after the one above, so a cold start or a busy machine does not
    // decide the outcome.
    const times = [0, 1, 2, 3, 4].map(() => {
      const started = performance.now();
      ruleOccurrences(rule, 'America/Chicago', range);
      return performance.now() - started;
    });
    expect(times.sort((a, b) => a - b)[2]).toBeLessThan(30);
  });

  it('does not depend on the process time zone', () => {
    const availability = only(
      'DTSTART;TZID=Europe/Berlin:20270301T003000\nRRULE:FREQ=WEEKLY;BYDAY=MO,WE,SA',
      'DTSTART:20270307T233000\nRRULE:FREQ=WEEKLY;INTERVAL=2;BYDAY=SU',
    );
    const original = process.env.TZ;
    try {
      const results = ['UTC', 'Pacific/Kiritimati', 'America/Adak', 'Asia/Kathmandu'].map((tz) => {
        process.env.TZ = tz;
        return availabilityPreview(availability, BERLIN, '2027-03-01', 8);
      });
      for (const r of results) expect(r).toEqual(results[0]);
    } finally {
      if (original === undefined) delete process.env.TZ;
      else process.env.TZ = original;
    }
  });

  it('throws a named error for an unreadable rule and bad arguments', () => {
    expect(() => availabilityPreview(only('RRULE:FREQ=WEEKLY'), zone, '2027-06-01', 8)).toThrow(
      AvailabilityRuleError,
    );
    expect(() => availabilityPreview(only(base), zone, '2027-06-01', 0)).toThrow(RangeError);
    expect(() => availabilityPreview(only(base), 'Mars/Olympus', '2027-06-01', 8)).toThrow(
      RangeError,
    );
  });
});

describe('validateAvailabilityRule', () => {
  const start = 'DTSTART;TZID=Europe/Berlin:20270104T080000\n';

  it('accepts a weekly rule and reports what it read', () => {
    expect(validateAvailabilityRule(`${start}RRULE:FREQ=WEEKLY;BYDAY=MO,TU`, BERLIN)).toEqual({
      valid: true,
      rule: {
        zone: BERLIN,
        start: '2027-01-04T08:00:00',
        allDay: false,
        frequency: 'WEEKLY',
        rrule: 'FREQ=WEEKLY;BYDAY=MO,TU',
      },
    });
  });

  it('accepts lower case (RFC 5545 §2: names and values are case-insensitive), CRLF and folding', () => {
    const result = validateAvailabilityRule(
      'dtstart;value=date:20270129\r\nrrule:freq=monthly;byday=\r\n -1fr;count=3',
    );
    expect(result).toMatchObject({ valid: true, rule: { allDay: true, zone: null } });
  });

  it.each([
    ['', /empty/],
    ['RRULE:FREQ=WEEKLY', /needs a DTSTART/],
    [start, /needs an RRULE/],
    [`${start}RRULE:FREQ=WEEKLY;INTERVAL=-1`, /INTERVAL value "-1"/],
    [`${start}RRULE:FREQ=WEEKLY;INTERVAL=0`, /INTERVAL value "0"/],
    [`${start}RRULE:FREQ=WEEKLY;COUNT=abc`, /COUNT value "abc"/i],
    [`${start}RRULE:FREQ=WEEKLY;BYDAY=XX`, /not a weekday/],
    [`${start}RRULE:FREQ=FOO`, /not a frequency/],
    [`${start}RRULE:FREQ=HOURLY`, /HOURLY is not supported/],
    [`${start}RRULE:BYDAY=MO`, /needs FREQ/],
    [`${start}RRULE:FREQ=WEEKLY;FOO=1`, /FOO does not exist/],
    [`${start}RRULE:FREQ=WEEKLY;FREQ=DAILY`, /FREQ twice/],
    [`${start}RRULE:FREQ=WEEKLY;BYHOUR=9`, /days are the unit/],
    [`${start}RRULE:FREQ=MONTHLY;BYDAY=MO;BYSETPOS=1`, /BYSETPOS is not supported/],
    [`${start}RRULE:FREQ=WEEKLY;COUNT=2;UNTIL=20270301T000000Z`, /both COUNT and UNTIL/],
    [`${start}RRULE:FREQ=WEEKLY;UNTIL=2027`, /UNTIL "2027"/],
    [`${start}RRULE:FREQ=WEEKLY;BYDAY=1MO`, /needs FREQ=MONTHLY/],
    [`${start}RRULE:FREQ=MONTHLY;BYDAY=6MO`, /BYDAY position/],
    [`${start}RRULE:FREQ=WEEKLY;BYMONTHDAY=3`, /BYMONTHDAY is only supported with FREQ=MONTHLY/],
    [`${start}RRULE:FREQ=WEEKLY\nEXDATE:20270111T080000`, /Only DTSTART and RRULE/],
    ['DTSTART;TZID=Mars/Olympus:20270104T080000\nRRULE:FREQ=DAILY', /time zone "Mars\/Olympus"/],
    ['DTSTART;TZID=Europe/Berlin:20270104T080000Z\nRRULE:FREQ=DAILY', /both TZID and a UTC/],
    ['DTSTART:20270230T080000\nRRULE:FREQ=DAILY', /not a real calendar date/],
    ['DTSTART:20270104\nRRULE:FREQ=DAILY', /has no time/],
    // JavaScript's Date.UTC would read year 50 as 1950.
    ['DTSTART:00500104T080000\nRRULE:FREQ=DAILY', /year 50 is outside 1900–2200/],
    [`${start}RRULE:FREQ=DAILY;COUNT=1001`, /COUNT value "1001"/],
    // 2027-01-07 is a Thursday: RFC 5545 leaves a start outside the rule undefined.
    ['DTSTART:20270107T080000\nRRULE:FREQ=WEEKLY;BYDAY=MO', /not a day the rule produces/],
    ['DTSTART:20270104T080000\nRRULE:FREQ=MONTHLY;BYDAY=-1FR', /not a day the rule produces/],
  ])('refuses %j with a readable error', (text, message) => {
    const result = validateAvailabilityRule(text);
    expect(result.valid).toBe(false);
    if (!result.valid) expect(result.error).toMatch(message);
  });

  it.each([
    // 30 February never exists.
    ['DTSTART:20270104T080000\nRRULE:FREQ=MONTHLY;BYMONTH=2;BYMONTHDAY=30'],
    // Every 7 days from a Monday is always a Monday.
    ['DTSTART:20270104T080000\nRRULE:FREQ=DAILY;INTERVAL=7;BYDAY=TU'],
    // Every 12 months from January is always January.
    ['DTSTART:20270104T080000\nRRULE:FREQ=MONTHLY;INTERVAL=12;BYMONTH=3'],
  ])('refuses %j, which can never occur, at once', (text) => {
    // rrule would walk every period to the year 9999 looking for one (seconds).
    const started = performance.now();
    const result = validateAvailabilityRule(text);
    expect(result).toMatchObject({ valid: false, error: expect.stringMatching(/never occurs/) });
    expect(performance.now() - started).toBeLessThan(200);
  });

  it('with the proctor zone, refuses a DTSTART in another zone or in UTC', () => {
    expect(
      validateAvailabilityRule(
        'DTSTART;TZID=America/New_York:20270104T080000\nRRULE:FREQ=DAILY',
        BERLIN,
      ),
    ).toMatchObject({
      valid: false,
      error: expect.stringMatching(/proctor's zone is Europe\/Berlin/),
    });
    expect(
      validateAvailabilityRule('DTSTART:20270104T080000Z\nRRULE:FREQ=DAILY', BERLIN),
    ).toMatchObject({ valid: false, error: expect.stringMatching(/DTSTART is in UTC/) });
    // A floating start is read in the proctor's zone, so it is fine.
    expect(
      validateAvailabilityRule('DTSTART:20270104T080000\nRRULE:FREQ=DAILY', BERLIN).valid,
    ).toBe(true);
  });
});

describe('agreement with ical.js (an independent RFC 5545 implementation)', () => {
  const weekdayCodes = ['MO', 'TU', 'WE', 'TH', 'FR', 'SA', 'SU'];
  // DTSTART is made one of the rule's own days (plain Date arithmetic, Monday = 0), because
  // RFC 5545 leaves other starts undefined and our validator refuses them.
  const mondayBased = (date: string) => (new Date(`${date}T00:00:00Z`).getUTCDay() + 6) % 7;
  const nextWeekday = (date: string, weekday: number) =>
    plusDays(date, (weekday - mondayBased(date) + 7) % 7);
  const nthWeekday = (date: string, weekday: number, n: number) => {
    const first = `${date.slice(0, 8)}01`;
    if (n > 0) return plusDays(nextWeekday(first, weekday), 7 * (n - 1));
    const [y, m] = date.split('-').map(Number) as [number, number];
    const last = new Date(Date.UTC(y, m, 0)).toISOString().slice(0, 10);
    return plusDays(last, -((mondayBased(last) - weekday + 7) % 7));
  };
  const dayOfMonth = (date: string, day: number) => {
    // The first month from `date` on that has this day.
    for (let [y, m] = date.split('-').map(Number) as [number, number]; ; m += 1) {
      const candidate = new Date(Date.UTC(y, m - 1, day));
      if (candidate.getUTCDate() === day) return candidate.toISOString().slice(0, 10);
      if (m === 12) [y, m] = [y + 1, 0];
    }
  };
  const ruleArb = fc
    .record({
      freq: fc.constantFrom('DAILY', 'WEEKLY', 'MONTHLY'),
      interval: fc.integer({ min: 1, max: 4 }),
      byDay: fc.subarray(weekdayCodes),
      ordinal: fc.option(fc.constantFrom(1, 2, 3, -1), { nil: undefined }),
      monthDay: fc.option(fc.integer({ min: 1, max: 31 }), { nil: undefined }),
      // COUNT rarely, so that most windows far from the start still hold days.
      count: fc.option(fc.integer({ min: 1, max: 40 }), { nil: undefined, freq: 5 }),
      wkst: fc.option(fc.constantFrom(...weekdayCodes), { nil: undefined }),
      startOffset: fc.integer({ min: 0, max: 500 }),
      hour: fc.integer({ min: 0, max: 23 }),
    })
    .map((r) => {
      const parts = [`FREQ=${r.freq}`];
      if (r.interval > 1) parts.push(`INTERVAL=${r.interval}`);
      let start = plusDays('2026-01-01', r.startOffset);
      if (r.freq === 'MONTHLY' && r.monthDay !== undefined) {
        parts.push(`BYMONTHDAY=${r.monthDay}`);
        start = dayOfMonth(start, r.monthDay);
      } else if (r.byDay.length > 0) {
        const ordinal = r.freq === 'MONTHLY' ? r.ordinal : undefined;
        parts.push(`BYDAY=${r.byDay.map((d) => (ordinal ?? '') + d).join(',')}`);
        const weekday = weekdayCodes.indexOf(r.byDay[0] as string);
        start =
          ordinal === undefined ? nextWeekday(start, weekday) : nthWeekday(start, weekday, ordinal);
      }
      if (r.count !== undefined) parts.push(`COUNT=${r.count}`);
      if (r.wkst !== undefined) parts.push(`WKST=${r.wkst}`);
      const hh = String(r.hour).padStart(2, '0');
      return { rrule: parts.join(';'), dtstart: `${start}T${hh}:00:00` };
    });

  it('gives the same days over 8 weeks for generated DAILY, WEEKLY and MONTHLY rules', () => {
    fc.assert(
      fc.property(ruleArb, fc.integer({ min: -14, max: 1500 }), ({ rrule, dtstart }, offset) => {
        // Windows from just before the start to four years after it: our expansion moves
        // DTSTART forward by whole periods (see \`rebase\`), ical.js walks from the real start.
        const from = plusDays(dtstart.slice(0, 10), offset);
        const to = plusDays(from, 55);
        const text = `DTSTART:${dtstart.replace(/[-:]/g, '')}\nRRULE:${rrule}`;
        fc.pre(validateAvailabilityRule(text).valid);
        const ours = availabilityPreview(only(text), BERLIN, from, 8);

        // ical.js expands the same floating rule; we keep the days inside the window.
        const iterator = ICAL.Recur.fromString(rrule).iterator(
          ICAL.Time.fromDateTimeString(dtstart),
        );
        const theirs: string[] = [];
        for (let next = iterator.next(); next; next = iterator.next()) {
          const day = next.toString().slice(0, 10);
          if (day > to) break;
          if (day >= from) theirs.push(day);
        }
        expect(ours).toEqual(theirs);
      }),
      { numRuns: RUNS },
    );
  });
});

describe('remembered expansions', () => {
  // Expansions are cached per rule and window (a ranking reads the same patterns many times):
  // a caller that changes what it got must not change what the next caller gets.
  const rule = 'DTSTART;TZID=America/Chicago:20250106T070000\nRRULE:FREQ=WEEKLY;BYDAY=MO,WE,FR';
  const range = { from: '2027-06-07', to: '2027-06-13' };

  it('hands out copies, so a changed result does not leak into the next call', () => {
    const first = ruleOccurrences(rule, 'America/Chicago', range);
    expect(first.map((o) => o.date)).toEqual(['2027-06-07', '2027-06-09', '2027-06-11']);
    first[0]!.date = '1999-01-01';
    first.pop();
    const again = ruleOccurrences(rule, 'America/Chicago', range);
    expect(again.map((o) => o.date)).toEqual(['2027-06-07', '2027-06-09', '2027-06-11']);
  });

  it('keeps windows and zones apart', () => {
    const berlin = ruleOccurrences(rule, 'Europe/Berlin', range);
    const chicago = ruleOccurrences(rule, 'America/Chicago', range);
    // 07:00 in Chicago is 14:00 in Berlin: same days, different zone, separate entries.
    expect(berlin.map((o) => o.date)).toEqual(chicago.map((o) => o.date));
    expect(ruleOccurrences(rule, 'America/Chicago', { ...range, to: '2027-06-08' })).toHaveLength(
      1,
    );
  });
});
