import ICAL from 'ical.js';

import { ATTENDEES, MILESTONES, ORGANIZER, SITE_ADDRESS, makeLoan } from './__fixtures__/loan';
import { buildLoanInvite, type LoanInviteInput, loanEventUids, nextSequence } from './ics';

// The outside check: every invite is read back with ical.js, a general-purpose iCalendar parser
// that this project did not write. Requirements are quoted from docs/references.md
// ("Time, calendars, holidays"); where a check rests on an RFC clause not listed there, the
// clause is named and marked "from memory".

const NOW = '2027-02-10T12:00:00Z';

function input(overrides: Partial<LoanInviteInput> = {}): LoanInviteInput {
  return {
    loan: makeLoan(),
    siteAddress: SITE_ADDRESS,
    organizer: ORGANIZER,
    attendees: ATTENDEES,
    sequence: 0,
    method: 'REQUEST',
    publicUrl: 'https://evalon.example',
    now: NOW,
    ...overrides,
  };
}

function parse(ics: string): ICAL.Component {
  return new ICAL.Component(ICAL.parse(ics));
}

function events(calendar: ICAL.Component): ICAL.Component[] {
  return calendar.getAllSubcomponents('vevent');
}

function byUid(calendar: ICAL.Component, uid: string): ICAL.Component {
  const found = events(calendar).find((e) => e.getFirstPropertyValue('uid') === uid);
  if (!found) throw new Error(`no VEVENT with UID ${uid}`);
  return found;
}

function dateValue(event: ICAL.Component, name: string): ICAL.Time {
  return event.getFirstPropertyValue(name) as ICAL.Time;
}

describe('buildLoanInvite: RFC 5545 / RFC 5546 requirements, read back with ical.js', () => {
  const ics = buildLoanInvite(input({ sequence: 3 }));
  const calendar = parse(ics);

  it('is a VCALENDAR with PRODID and VERSION:2.0 (RFC 5545 §3.6 calprops; listed under §3.6.1 in docs/references.md)', () => {
    expect(calendar.name).toBe('vcalendar');
    expect(calendar.getAllProperties('prodid')).toHaveLength(1);
    expect(calendar.getFirstPropertyValue('prodid')).toContain('Evalon');
    expect(calendar.getAllProperties('version')).toHaveLength(1);
    expect(calendar.getFirstPropertyValue('version')).toBe('2.0');
  });

  it('carries METHOD:REQUEST (RFC 5546 §3.2.2)', () => {
    expect(calendar.getFirstPropertyValue('method')).toBe('REQUEST');
  });

  it('has two VEVENTs: the arrival day and the use window', () => {
    expect(events(calendar).map((e) => e.getFirstPropertyValue('uid'))).toEqual([
      'loan-42-delivery@evalon.example',
      'loan-42-use@evalon.example',
    ]);
  });

  it('gives each VEVENT exactly one UID and one DTSTAMP (RFC 5545 §3.6.1)', () => {
    for (const event of events(calendar)) {
      expect(event.getAllProperties('uid')).toHaveLength(1);
      expect(event.getAllProperties('dtstamp')).toHaveLength(1);
    }
  });

  it('never has both DTEND and DURATION in a VEVENT (RFC 5545 §3.6.1)', () => {
    for (const event of events(calendar)) {
      const both = event.hasProperty('dtend') && event.hasProperty('duration');
      expect(both).toBe(false);
      // And the one used here is DTEND.
      expect(event.hasProperty('dtend')).toBe(true);
    }
  });

  it('has ORGANIZER, ≥1 ATTENDEE, DTSTAMP, DTSTART, SUMMARY, UID in every VEVENT (RFC 5546 §3.2.2)', () => {
    for (const event of events(calendar)) {
      expect(event.getAllProperties('organizer')).toHaveLength(1);
      expect(event.getAllProperties('attendee').length).toBeGreaterThanOrEqual(1);
      for (const name of ['dtstamp', 'dtstart', 'summary', 'uid']) {
        expect(event.getAllProperties(name)).toHaveLength(1);
      }
      expect(String(event.getFirstPropertyValue('summary'))).toContain('EV-2027-000042');
    }
  });

  it('writes SEQUENCE when it is above 0 (RFC 5546 §3.2.2)', () => {
    for (const event of events(calendar)) {
      expect(event.getFirstPropertyValue('sequence')).toBe(3);
    }
  });

  it('writes SEQUENCE:0 on a first invite (RFC 5545 §3.8.7.4: 0 is the default, from memory)', () => {
    for (const event of events(parse(buildLoanInvite(input({ sequence: 0 }))))) {
      expect(event.getFirstPropertyValue('sequence')).toBe(0);
    }
  });

  it('stamps DTSTAMP with `now` in UTC (RFC 5545 §3.8.7.2: UTC form, from memory)', () => {
    for (const event of events(calendar)) {
      const stamp = dateValue(event, 'dtstamp');
      expect(stamp.zone?.tzid).toBe('UTC');
      expect(stamp.toJSDate().toISOString()).toBe('2027-02-10T12:00:00.000Z');
    }
  });

  it('ends the all-day use window the day after the last case day (RFC 5545 §3.6.1: DTEND exclusive)', () => {
    const use = byUid(calendar, 'loan-42-use@evalon.example');
    const start = dateValue(use, 'dtstart');
    const end = dateValue(use, 'dtend');
    expect(start.isDate).toBe(true);
    expect(end.isDate).toBe(true);
    expect(start.toString()).toBe(MILESTONES.useFrom); // 2027-03-15
    expect(MILESTONES.useTo).toBe('2027-03-19');
    expect(end.toString()).toBe('2027-03-20');
  });

  it('crosses month and year ends when the last case day is the last day of one (Gregorian calendar)', () => {
    const cases: Array<[string, string, string]> = [
      ['2027-03-29', '2027-03-31', '2027-04-01'],
      ['2027-12-27', '2027-12-31', '2028-01-01'],
      ['2028-02-25', '2028-02-29', '2028-03-01'], // 2028 is a leap year (divisible by 4, not by 100)
    ];
    for (const [useFrom, useTo, dayAfter] of cases) {
      const loan = makeLoan({ milestones: { ...MILESTONES, useFrom, useTo } });
      const use = byUid(parse(buildLoanInvite(input({ loan }))), 'loan-42-use@evalon.example');
      expect(dateValue(use, 'dtend').toString()).toBe(dayAfter);
    }
  });

  it('makes the arrival an all-day event on the arrives-by day when no receiving hours are given', () => {
    const delivery = byUid(calendar, 'loan-42-delivery@evalon.example');
    expect(dateValue(delivery, 'dtstart').isDate).toBe(true);
    expect(dateValue(delivery, 'dtstart').toString()).toBe('2027-03-11');
    expect(dateValue(delivery, 'dtend').toString()).toBe('2027-03-12');
    // All-day values need no VTIMEZONE: DATE values carry no zone (RFC 5545 §3.3.4, from memory).
    expect(calendar.getAllSubcomponents('vtimezone')).toHaveLength(0);
  });

  it('describes units, site and link, and puts the site address in LOCATION', () => {
    for (const event of events(calendar)) {
      const description = String(event.getFirstPropertyValue('description'));
      expect(description).toContain('Calder arm robotic platform, serial CA-0007');
      expect(description).toContain('Tessel flexible ureteroscope, serial TF-0119');
      expect(description).toContain('Quillfield Teaching Hospital, East Campus');
      expect(description).toContain('https://evalon.example/loans/42');
      expect(description).toContain('First case day: 2027-03-15');
      expect(description).toContain('it does not certify');
      // TEXT escaping of "," and ";" is undone by the parser (RFC 5545 §3.3.11).
      expect(event.getFirstPropertyValue('location')).toBe(`East Campus\n${SITE_ADDRESS}`);
      expect(event.getFirstPropertyValue('url')).toBe('https://evalon.example/loans/42');
    }
  });

  it('sets ROLE, PARTSTAT and RSVP on each ATTENDEE (RFC 5545 §3.2.16, §3.2.12, §3.2.17)', () => {
    const attendees = byUid(calendar, 'loan-42-use@evalon.example').getAllProperties('attendee');
    const seen = attendees.map((a) => ({
      value: String(a.getFirstValue()).toLowerCase(),
      cn: a.getParameter('cn'),
      role: a.getParameter('role'),
      partstat: a.getParameter('partstat'),
      rsvp: a.getParameter('rsvp'),
    }));
    expect(seen).toEqual([
      {
        value: 'mailto:dana.orrin@quillfield.example',
        cn: 'Dana Orrin',
        role: 'REQ-PARTICIPANT',
        partstat: 'NEEDS-ACTION',
        rsvp: 'TRUE',
      },
      {
        value: 'mailto:ravi.tamsin@brightlathe.example',
        cn: 'Ravi Tamsin',
        role: 'OPT-PARTICIPANT',
        partstat: 'NEEDS-ACTION',
        rsvp: 'FALSE',
      },
      {
        value: 'mailto:ines.varga@quillfield.example',
        cn: 'Dr. Ines Varga',
        role: 'NON-PARTICIPANT',
        partstat: 'NEEDS-ACTION',
        rsvp: 'FALSE',
      },
    ]);
    const organizer = byUid(calendar, 'loan-42-use@evalon.example').getFirstProperty('organizer');
    expect(String(organizer?.getFirstValue()).toLowerCase()).toBe('mailto:loans@evalon.example');
  });

  it('keeps double quotes in names intact through parameter encoding (RFC 6868)', () => {
    const attendees = [{ name: 'Ana "Doc" Lind', email: 'ana@quillfield.example' }];
    const event = events(parse(buildLoanInvite(input({ attendees }))))[0];
    expect(event.getFirstProperty('attendee')?.getParameter('cn')).toBe('Ana "Doc" Lind');
  });

  it('uses CRLF line ends and folds lines at 75 octets (RFC 5545 §3.1, from memory)', () => {
    const withLongText = buildLoanInvite(
      input({
        loan: makeLoan({
          siteName: 'East Campus — Ambulatory Surgery Pavilion, Level 3 (Zoë wing)',
        }),
      }),
    );
    expect(withLongText.split('\r\n').join('')).not.toContain('\n');
    for (const line of withLongText.split('\r\n')) {
      expect(Buffer.byteLength(line, 'utf8')).toBeLessThanOrEqual(75);
    }
    // Unfolded by the parser, the long text survives whole.
    const event = events(parse(withLongText))[0];
    expect(event.getFirstPropertyValue('location')).toContain('Level 3 (Zoë wing)');
  });
});

describe('buildLoanInvite: stable UIDs', () => {
  it('gives the same UIDs to two builds of the same loan, even with new dates and SEQUENCE', () => {
    const first = parse(buildLoanInvite(input()));
    const moved = makeLoan({
      milestones: { ...MILESTONES, useFrom: '2027-04-05', useTo: '2027-04-09' },
    });
    const second = parse(
      buildLoanInvite(input({ loan: moved, sequence: 1, now: '2027-02-20T09:30:00Z' })),
    );
    const uids = (c: ICAL.Component) => events(c).map((e) => e.getFirstPropertyValue('uid'));
    expect(uids(second)).toEqual(uids(first));
    // ...while the content did change.
    const use = byUid(second, 'loan-42-use@evalon.example');
    expect(dateValue(use, 'dtstart').toString()).toBe('2027-04-05');
  });

  it('gives other loans other UIDs', () => {
    const other = parse(buildLoanInvite(input({ loan: makeLoan({ id: 43 }) })));
    expect(events(other).map((e) => e.getFirstPropertyValue('uid'))).toEqual([
      'loan-43-delivery@evalon.example',
      'loan-43-use@evalon.example',
    ]);
  });

  it('takes the UID domain from publicUrl unless one is given', () => {
    expect(loanEventUids(42, 'evalon.example')).toEqual({
      delivery: 'loan-42-delivery@evalon.example',
      use: 'loan-42-use@evalon.example',
    });
    const custom = parse(
      buildLoanInvite(
        input({ publicUrl: 'https://app.evalon.example/', uidDomain: 'evalon.example' }),
      ),
    );
    expect(events(custom)[0].getFirstPropertyValue('uid')).toBe('loan-42-delivery@evalon.example');
    const derived = parse(buildLoanInvite(input({ publicUrl: 'https://app.evalon.example/' })));
    expect(events(derived)[0].getFirstPropertyValue('uid')).toBe(
      'loan-42-delivery@app.evalon.example',
    );
  });
});

describe('buildLoanInvite: timed arrival in the site zone', () => {
  afterEach(() => {
    for (const zone of ['America/New_York', 'Europe/Berlin']) {
      if (ICAL.TimezoneService.has(zone)) ICAL.TimezoneService.remove(zone);
    }
  });

  function timedStart(
    zone: string,
    deliverBy: string,
    from: string,
  ): { utc: string; tzid: string } {
    const loan = makeLoan({ siteTimeZone: zone, milestones: { ...MILESTONES, deliverBy } });
    const calendar = parse(buildLoanInvite(input({ loan, receivingHours: { from, to: '15:00' } })));
    // RFC 5545 §3.2.19 (from memory): every TZID used needs its VTIMEZONE in the same object.
    const zones = calendar.getAllSubcomponents('vtimezone');
    expect(zones.map((z) => z.getFirstPropertyValue('tzid'))).toEqual([zone]);
    // Let ical.js resolve TZID through OUR VTIMEZONE only (nothing else is registered).
    ICAL.TimezoneService.register(zones[0]);
    const delivery = byUid(calendar, 'loan-42-delivery@evalon.example');
    const start = dateValue(delivery, 'dtstart');
    expect(start.isDate).toBe(false);
    return {
      utc: start.toJSDate().toISOString(),
      tzid: String(delivery.getFirstProperty('dtstart')?.getParameter('tzid')),
    };
  }

  it('New York 08:00 after the 2027-03-14 07:00Z change is 12:00Z (EDT, UTC−4; 15 U.S.C. 260a, IANA tz, derived)', () => {
    expect(timedStart('America/New_York', '2027-03-15', '08:00')).toEqual({
      utc: '2027-03-15T12:00:00.000Z',
      tzid: 'America/New_York',
    });
  });

  it('New York 08:00 before the change is 13:00Z (EST, UTC−5; derived)', () => {
    expect(timedStart('America/New_York', '2027-03-12', '08:00').utc).toBe(
      '2027-03-12T13:00:00.000Z',
    );
  });

  it('Berlin 08:00 either side of the 2027-03-28 01:00Z change (EU Directive 2000/84/EC, IANA tz, derived)', () => {
    // Friday 26 March: CET, UTC+1 → 07:00Z. Monday 29 March: CEST, UTC+2 → 06:00Z.
    expect(timedStart('Europe/Berlin', '2027-03-26', '08:00').utc).toBe('2027-03-26T07:00:00.000Z');
    expect(timedStart('Europe/Berlin', '2027-03-29', '08:00').utc).toBe('2027-03-29T06:00:00.000Z');
  });

  it('refuses receiving hours that do not make a window', () => {
    expect(() =>
      buildLoanInvite(input({ receivingHours: { from: '15:00', to: '08:00' } })),
    ).toThrow(RangeError);
    expect(() => buildLoanInvite(input({ receivingHours: { from: '8am', to: '15:00' } }))).toThrow(
      RangeError,
    );
  });
});

describe('buildLoanInvite: METHOD:CANCEL', () => {
  const calendar = parse(buildLoanInvite(input({ method: 'CANCEL', sequence: 2 })));

  it('cancels both events with the same UIDs, STATUS:CANCELLED and SEQUENCE (RFC 5546 §3.2.5, from memory)', () => {
    expect(calendar.getFirstPropertyValue('method')).toBe('CANCEL');
    expect(events(calendar).map((e) => e.getFirstPropertyValue('uid'))).toEqual([
      'loan-42-delivery@evalon.example',
      'loan-42-use@evalon.example',
    ]);
    for (const event of events(calendar)) {
      expect(event.getFirstPropertyValue('status')).toBe('CANCELLED');
      expect(event.getFirstPropertyValue('sequence')).toBe(2);
      expect(event.getAllProperties('organizer')).toHaveLength(1);
      expect(event.getAllProperties('attendee').length).toBeGreaterThanOrEqual(1);
      expect(event.getAllProperties('dtstamp')).toHaveLength(1);
      // Nobody is asked to reply to a cancellation.
      for (const attendee of event.getAllProperties('attendee')) {
        expect(attendee.getParameter('rsvp')).toBe('FALSE');
      }
    }
  });

  it('marks the events of a REQUEST as CONFIRMED', () => {
    for (const event of events(parse(buildLoanInvite(input())))) {
      expect(event.getFirstPropertyValue('status')).toBe('CONFIRMED');
    }
  });
});

describe('buildLoanInvite: input checks', () => {
  it('refuses an invite without attendees (RFC 5546 §3.2.2 needs at least one ATTENDEE)', () => {
    expect(() => buildLoanInvite(input({ attendees: [] }))).toThrow(/at least one attendee/);
  });

  it('refuses a negative or fractional SEQUENCE', () => {
    expect(() => buildLoanInvite(input({ sequence: -1 }))).toThrow(RangeError);
    expect(() => buildLoanInvite(input({ sequence: 1.5 }))).toThrow(RangeError);
  });

  it('refuses malformed addresses, zones, URLs and loans', () => {
    expect(() =>
      buildLoanInvite(input({ organizer: { name: 'X', email: 'not-an-address' } })),
    ).toThrow(/organizer.email/);
    expect(() =>
      buildLoanInvite(
        input({ attendees: [{ name: 'X', email: 'x@y.example\r\nBCC:z@z.example' }] }),
      ),
    ).toThrow(/attendees\[0\].email/);
    expect(() =>
      buildLoanInvite(input({ loan: makeLoan({ siteTimeZone: 'Mars/Olympus' }) })),
    ).toThrow(RangeError);
    expect(() => buildLoanInvite(input({ publicUrl: 'javascript:alert(1)' }))).toThrow(TypeError);
    expect(() =>
      buildLoanInvite(
        input({ loan: makeLoan({ milestones: { ...MILESTONES, useTo: '2027-02-30' } }) }),
      ),
    ).toThrow();
  });
});

describe('nextSequence', () => {
  it('keeps SEQUENCE when nothing changed', () => {
    expect(nextSequence(MILESTONES, { ...MILESTONES }, 4)).toBe(4);
  });

  it('keeps SEQUENCE when only depot dates changed (they are not in the invite)', () => {
    const moved = {
      ...MILESTONES,
      shipBy: '2027-03-05',
      backAtDepot: '2027-03-26',
      readyAgain: '2027-03-30',
    };
    expect(nextSequence(MILESTONES, moved, 1)).toBe(1);
  });

  it('raises SEQUENCE by one when DTSTART/DTEND dates change (RFC 5545 §3.8.7.4, from memory)', () => {
    expect(nextSequence(MILESTONES, { ...MILESTONES, deliverBy: '2027-03-10' }, 0)).toBe(1);
    expect(nextSequence(MILESTONES, { ...MILESTONES, useFrom: '2027-03-16' }, 1)).toBe(2);
    expect(nextSequence(MILESTONES, { ...MILESTONES, useTo: '2027-03-18' }, 2)).toBe(3);
    // Several dates at once still raise it by one: one new revision.
    expect(
      nextSequence(MILESTONES, { ...MILESTONES, useFrom: '2027-04-05', useTo: '2027-04-09' }, 2),
    ).toBe(3);
  });

  it('raises SEQUENCE when "ships back by" changes (shown in the invite)', () => {
    expect(nextSequence(MILESTONES, { ...MILESTONES, returnShipBy: '2027-03-23' }, 0)).toBe(1);
  });

  it('refuses a negative or fractional previous SEQUENCE', () => {
    expect(() => nextSequence(MILESTONES, MILESTONES, -1)).toThrow(RangeError);
    expect(() => nextSequence(MILESTONES, MILESTONES, 0.5)).toThrow(RangeError);
  });
});
