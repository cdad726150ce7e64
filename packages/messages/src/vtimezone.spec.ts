import ICAL from 'ical.js';

import { buildVTimezone, formatUtcOffset } from './vtimezone';

// Transition instants are the reference values of docs/references.md ("Daylight saving time 2027", derived from
// 15 U.S.C. 260a and EU Directive 2000/84/EC, IANA tz). The VTIMEZONE text is read back with
// ical.js, a general-purpose parser.

const YEAR_2027 = [new Date('2027-01-01T00:00:00Z'), new Date('2028-01-01T00:00:00Z')] as const;

interface Observance {
  kind: string;
  dtstart: string;
  from: string;
  to: string;
}

function observances(text: string): Observance[] {
  const component = new ICAL.Component(ICAL.parse(`BEGIN:VCALENDAR\r\n${text}\r\nEND:VCALENDAR`));
  const vtimezone = component.getFirstSubcomponent('vtimezone');
  if (!vtimezone) throw new Error('no VTIMEZONE');
  return vtimezone.getAllSubcomponents().map((o) => ({
    kind: o.name,
    dtstart: String(o.getFirstPropertyValue('dtstart')),
    from: String(o.getFirstProperty('tzoffsetfrom')?.toICALString()).split(':')[1],
    to: String(o.getFirstProperty('tzoffsetto')?.toICALString()).split(':')[1],
  }));
}

describe('buildVTimezone', () => {
  it('New York 2027: EDT from 2027-03-14 07:00Z, EST from 2027-11-07 06:00Z (15 U.S.C. 260a, IANA tz, derived)', () => {
    // DTSTART of an observance is local time in the offset before it (RFC 5545 §3.6.5, from
    // memory): 07:00Z − 5 h = 02:00; 06:00Z − 4 h = 02:00.
    expect(observances(buildVTimezone('America/New_York', ...YEAR_2027))).toEqual([
      // The offset in force at the window start (2027-01-01 00:00Z is 19:00 local the day before).
      { kind: 'standard', dtstart: '2026-12-31T19:00:00', from: '-0500', to: '-0500' },
      { kind: 'daylight', dtstart: '2027-03-14T02:00:00', from: '-0500', to: '-0400' },
      { kind: 'standard', dtstart: '2027-11-07T02:00:00', from: '-0400', to: '-0500' },
    ]);
  });

  it('Berlin 2027: CEST from 2027-03-28 01:00Z, CET from 2027-10-31 01:00Z (EU Directive 2000/84/EC, derived)', () => {
    // 01:00Z + 1 h = 02:00 local; 01:00Z + 2 h = 03:00 local.
    expect(observances(buildVTimezone('Europe/Berlin', ...YEAR_2027))).toEqual([
      { kind: 'standard', dtstart: '2027-01-01T01:00:00', from: '+0100', to: '+0100' },
      { kind: 'daylight', dtstart: '2027-03-28T02:00:00', from: '+0100', to: '+0200' },
      { kind: 'standard', dtstart: '2027-10-31T03:00:00', from: '+0200', to: '+0100' },
    ]);
  });

  it('lets ical.js convert local times on both sides of the New York change', () => {
    const text = buildVTimezone('America/New_York', ...YEAR_2027);
    const vtimezone = new ICAL.Component(
      ICAL.parse(`BEGIN:VCALENDAR\r\n${text}\r\nEND:VCALENDAR`),
    ).getFirstSubcomponent('vtimezone');
    if (!vtimezone) throw new Error('no VTIMEZONE');
    const zone = new ICAL.Timezone(vtimezone);
    const inZone = (local: string) => {
      const time = ICAL.Time.fromDateTimeString(local);
      time.zone = zone;
      return time.convertToZone(ICAL.Timezone.utcTimezone).toString();
    };
    expect(inZone('2027-03-14T01:59:00')).toBe('2027-03-14T06:59:00Z'); // EST, UTC−5
    expect(inZone('2027-03-14T03:00:00')).toBe('2027-03-14T07:00:00Z'); // EDT, UTC−4
  });

  it('writes one observance for a zone without daylight saving in the window', () => {
    const text = buildVTimezone('Asia/Kolkata', ...YEAR_2027);
    expect(observances(text)).toEqual([
      { kind: 'standard', dtstart: '2027-01-01T05:30:00', from: '+0530', to: '+0530' },
    ]);
  });

  it('refuses an unknown zone and an empty window', () => {
    expect(() => buildVTimezone('Mars/Olympus', ...YEAR_2027)).toThrow(RangeError);
    expect(() => buildVTimezone('Europe/Berlin', YEAR_2027[1], YEAR_2027[0])).toThrow(RangeError);
  });
});

describe('formatUtcOffset (RFC 5545 §3.3.14 UTC-OFFSET, from memory)', () => {
  it('writes sign, hours and minutes', () => {
    expect(formatUtcOffset(-300)).toBe('-0500');
    expect(formatUtcOffset(60)).toBe('+0100');
    expect(formatUtcOffset(0)).toBe('+0000');
    expect(formatUtcOffset(345)).toBe('+0545'); // Asia/Kathmandu (IANA tz, from memory)
    expect(formatUtcOffset(-570)).toBe('-0930'); // Pacific/Marquesas (IANA tz, from memory)
  });
});
