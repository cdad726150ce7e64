import ICAL from 'ical.js';
import {
  buildVisitInvite,
  visitAccepted,
  visitOffered,
  visitWithdrawn,
  type VisitSummary,
} from './visits';

const visit: VisitSummary = {
  id: 42,
  reference: 'PV-2027-000042',
  hospitalName: 'Invented Hospital',
  siteName: 'North Campus',
  siteAddress: '1 Invented Way\n02128 Boston\nUS',
  siteTimeZone: 'America/New_York',
  modelName: 'Model R2',
  from: '2027-03-15',
  to: '2027-03-16',
  cases: 3,
  proctorName: 'Dr Example',
  busyFrom: '2027-03-14',
  busyTo: '2027-03-17',
  travelDays: 2,
  fee: { amount: 680_000, currency: 'USD' },
};
const invite = {
  organizer: { name: 'Evalon visits', email: 'no-reply@evalon.example' },
  attendees: [
    { name: 'Dr Example', email: 'proctor@proctors.example' },
    { name: 'Buyer', email: 'buyer@hospital.example' },
  ],
  sequence: 0,
  uidDomain: 'evalon.example',
  now: '2027-02-01T12:00:00Z',
};

describe('buildVisitInvite', () => {
  it('writes an RFC 5546 REQUEST a general-purpose parser reads back (ical.js)', () => {
    const text = buildVisitInvite({
      ...invite,
      visit,
      method: 'REQUEST',
      publicUrl: 'https://evalon.example',
    });
    const calendar = new ICAL.Component(ICAL.parse(text));
    // RFC 5545 §3.6: VCALENDAR needs PRODID and VERSION:2.0.
    expect(calendar.getFirstPropertyValue('version')).toBe('2.0');
    expect(calendar.getFirstPropertyValue('prodid')).toBeTruthy();
    expect(calendar.getFirstPropertyValue('method')).toBe('REQUEST');
    const [event] = calendar.getAllSubcomponents('vevent');
    // RFC 5546 §3.2.2 (REQUEST): ORGANIZER, ATTENDEE (1+), DTSTAMP, DTSTART, SUMMARY, UID.
    for (const name of ['organizer', 'dtstamp', 'dtstart', 'summary', 'uid'])
      expect(event!.getFirstPropertyValue(name)).toBeTruthy();
    expect(event!.getAllProperties('attendee')).toHaveLength(2);
    expect(event!.getFirstPropertyValue('uid')).toBe('visit-42@evalon.example');
    // The proctor is away from the travel day before to the travel day after; an all-day DTEND
    // is exclusive (RFC 5545 §3.6.1), so it is the day after the last travel day.
    expect(String(event!.getFirstPropertyValue('dtstart'))).toBe('2027-03-14');
    expect(String(event!.getFirstPropertyValue('dtend'))).toBe('2027-03-18');
  });

  it('cancels the same event with a higher SEQUENCE (RFC 5546 §3.2.5)', () => {
    const text = buildVisitInvite({
      ...invite,
      sequence: 1,
      visit,
      method: 'CANCEL',
      publicUrl: 'https://evalon.example',
    });
    const calendar = new ICAL.Component(ICAL.parse(text));
    expect(calendar.getFirstPropertyValue('method')).toBe('CANCEL');
    const [event] = calendar.getAllSubcomponents('vevent');
    expect(event!.getFirstPropertyValue('status')).toBe('CANCELLED');
    expect(event!.getFirstPropertyValue('sequence')).toBe(1);
    expect(event!.getFirstPropertyValue('uid')).toBe('visit-42@evalon.example');
  });
});

describe('visit e-mails', () => {
  it('gives the proctor the deadline in their own zone, with the cautions', () => {
    const mail = visitOffered(
      { visit, publicUrl: 'https://evalon.example', deadline: '2027-02-03T12:00:00Z' },
      {
        name: 'Dr Example',
        email: 'proctor@proctors.example',
        timeZone: 'Europe/Berlin',
        locale: 'en-GB',
      },
    );
    // 12:00Z is 13:00 in Berlin in February (CET, UTC+1).
    expect(mail.text).toContain('13:00');
    expect(mail.text).toMatch(/does not certify/);
    expect(mail.subject).toContain('PV-2027-000042');
  });

  it('attaches the REQUEST invite to the acceptance', () => {
    const mail = visitAccepted(
      { visit, publicUrl: 'https://evalon.example', invite },
      { name: 'Buyer', email: 'buyer@hospital.example', timeZone: 'America/New_York' },
    );
    expect(mail.attachments?.[0]?.contentType).toBe('text/calendar; charset=utf-8; method=REQUEST');
    expect(mail.text).toContain('$6,800.00');
  });

  it('sends the withdrawing proctor a CANCEL for their calendar and the hospital the reason only', () => {
    const data = {
      visit,
      publicUrl: 'https://evalon.example',
      proctorName: 'Dr Example',
      reason: 'A family emergency keeps me home.',
      invite: { ...invite, attendees: [invite.attendees[0]!], sequence: 1 },
    };
    const toProctor = visitWithdrawn(
      { ...data, audience: 'proctor' },
      { name: 'Dr Example', email: 'proctor@proctors.example', timeZone: 'America/Chicago' },
    );
    // RFC 6047 §2.4: the MIME method parameter equals the METHOD inside.
    expect(toProctor.attachments?.[0]?.contentType).toBe(
      'text/calendar; charset=utf-8; method=CANCEL',
    );
    const calendar = new ICAL.Component(ICAL.parse(String(toProctor.attachments?.[0]?.content)));
    // RFC 5546 §3.2.5: CANCEL names the attendee who leaves, the same UID, a higher SEQUENCE.
    expect(calendar.getFirstPropertyValue('method')).toBe('CANCEL');
    const [event] = calendar.getAllSubcomponents('vevent');
    expect(event!.getAllProperties('attendee')).toHaveLength(1);
    expect(String(event!.getFirstPropertyValue('attendee'))).toContain('proctor@proctors.example');
    expect(event!.getFirstPropertyValue('uid')).toBe('visit-42@evalon.example');
    expect(event!.getFirstPropertyValue('sequence')).toBe(1);

    const toHospital = visitWithdrawn(
      { ...data, audience: 'hospital' },
      { name: 'Buyer', email: 'buyer@hospital.example', timeZone: 'America/New_York' },
    );
    expect(toHospital.attachments).toBeUndefined();
    expect(toHospital.subject).toBe('Visit PV-2027-000042: Dr Example withdrew');
    expect(toHospital.text).toContain('A family emergency keeps me home.');
    expect(toHospital.text).toContain('next proctor');
  });
});
