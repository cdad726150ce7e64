import { DateTime } from 'luxon';

import { toInstant, toSiteDate, wallTimeToInstant } from './zones';

const NEW_YORK = 'America/New_York';
const BERLIN = 'Europe/Berlin';

/** UTC offset in minutes of a zone at an instant (luxon with the IANA data of the runtime). */
function offsetAt(iso: string, zone: string): number {
  return DateTime.fromISO(iso, { zone: 'utc' }).setZone(zone).offset;
}

describe('daylight saving 2027', () => {
  // DST 2027 (derived from 15 U.S.C. 260a, IANA tz): New York changes at 2027-03-14 07:00Z and
  // 2027-11-07 06:00Z; Berlin (EU Directive 2000/84/EC) at 2027-03-28 01:00Z and 2027-10-31 01:00Z.
  it.each([
    [NEW_YORK, '2027-03-14T07:00:00Z', -300, -240],
    [NEW_YORK, '2027-11-07T06:00:00Z', -240, -300],
    [BERLIN, '2027-03-28T01:00:00Z', 60, 120],
    [BERLIN, '2027-10-31T01:00:00Z', 120, 60],
  ])('%s changes offset at %s', (zone, instant, before, after) => {
    const justBefore = DateTime.fromISO(instant).minus({ milliseconds: 1 }).toISO() as string;
    expect(offsetAt(justBefore, zone)).toBe(before);
    expect(offsetAt(instant, zone)).toBe(after);
  });

  describe('depot cut-off in the depot zone', () => {
    it.each([
      // 15 U.S.C. 260a via IANA tz: EST (−5) before 2027-03-14 07:00Z, EDT (−4) after.
      ['2027-03-12', '17:00', NEW_YORK, '2027-03-12T22:00:00.000Z'],
      ['2027-03-15', '17:00', NEW_YORK, '2027-03-15T21:00:00.000Z'],
      // On the change day: 01:59 EST is still before 07:00Z; 03:00 EDT is exactly 07:00Z.
      ['2027-03-14', '01:59', NEW_YORK, '2027-03-14T06:59:00.000Z'],
      ['2027-03-14', '03:00', NEW_YORK, '2027-03-14T07:00:00.000Z'],
      // EDT until 2027-11-07 06:00Z, EST after.
      ['2027-11-05', '17:00', NEW_YORK, '2027-11-05T21:00:00.000Z'],
      ['2027-11-08', '17:00', NEW_YORK, '2027-11-08T22:00:00.000Z'],
      ['2027-11-07', '00:59', NEW_YORK, '2027-11-07T04:59:00.000Z'],
      ['2027-11-07', '02:00', NEW_YORK, '2027-11-07T07:00:00.000Z'],
      // EU Directive 2000/84/EC via IANA tz: CET (+1) before 2027-03-28 01:00Z, CEST (+2) after.
      ['2027-03-25', '16:00', BERLIN, '2027-03-25T15:00:00.000Z'],
      ['2027-03-30', '16:00', BERLIN, '2027-03-30T14:00:00.000Z'],
      ['2027-03-28', '01:59', BERLIN, '2027-03-28T00:59:00.000Z'],
      ['2027-03-28', '03:00', BERLIN, '2027-03-28T01:00:00.000Z'],
      // CEST until 2027-10-31 01:00Z, CET after.
      ['2027-10-29', '16:00', BERLIN, '2027-10-29T14:00:00.000Z'],
      ['2027-11-01', '16:00', BERLIN, '2027-11-01T15:00:00.000Z'],
      ['2027-10-31', '03:00', BERLIN, '2027-10-31T02:00:00.000Z'],
    ])('%s %s in %s is %s', (date, time, zone, expected) => {
      expect(wallTimeToInstant(date, time, zone)).toBe(expected);
    });

    it('resolves a repeated wall time to the earlier instant', () => {
      // 01:30 happens twice in New York on 2027-11-07 (EDT 05:30Z, then EST 06:30Z) and 02:30
      // twice in Berlin on 2027-10-31 (CEST 00:30Z, then CET 01:30Z); our rule takes the first.
      expect(wallTimeToInstant('2027-11-07', '01:30', NEW_YORK)).toBe('2027-11-07T05:30:00.000Z');
      expect(wallTimeToInstant('2027-10-31', '02:30', BERLIN)).toBe('2027-10-31T00:30:00.000Z');
    });

    it('moves a skipped wall time forward by the gap', () => {
      // 02:30 does not exist in New York on 2027-03-14; luxon reads it as 03:30 EDT = 07:30Z.
      expect(wallTimeToInstant('2027-03-14', '02:30', NEW_YORK)).toBe('2027-03-14T07:30:00.000Z');
    });
  });

  it('takes the site date of an instant in its own zone', () => {
    // 2027-03-28T22:30Z is 00:30 CEST on the 29th in Berlin and 18:30 EDT on the 28th in New York.
    expect(toSiteDate('2027-03-28T22:30:00Z', BERLIN)).toBe('2027-03-29');
    expect(toSiteDate(new Date('2027-03-28T22:30:00Z'), NEW_YORK)).toBe('2027-03-28');
  });

  it('rejects instants without an offset and bad wall times', () => {
    expect(() => toInstant('2027-03-28T22:30:00')).toThrow(RangeError);
    expect(() => wallTimeToInstant('2027-03-28', '24:00', BERLIN)).toThrow(RangeError);
    expect(() => wallTimeToInstant('2027-03-28', '16:00', 'Mars/Olympus')).toThrow(RangeError);
  });
});
