/**
 * Helpers for this package's tests only (not exported from the index): invented proctors and
 * campuses, independent oracles written without the code under test, fast-check generators.
 */
import fc from 'fast-check';

import type { Credential, Proctor, VisitRequest, VisitSite } from './types';

/** Property-test run count: enough to reach the edges, small enough for a shared 2-core box. */
export const RUNS = 150;

/** Oracle: the date `days` calendar days after `date` (plain UTC milliseconds, no library). */
export function plusDays(date: string, days: number): string {
  return new Date(Date.parse(`${date}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);
}

/** Oracle: days from `from` to `to` inclusive. */
export function daysInclusive(from: string, to: string): number {
  return (Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000 + 1;
}

/** Oracle: every day from `from` to `to` inclusive. */
export function eachDay(from: string, to: string): string[] {
  const days: string[] = [];
  for (let d = from; d <= to; d = plusDays(d, 1)) days.push(d);
  return days;
}

// Invented campuses; the coordinates are those of the cities, nothing else is real.
/** A campus in Chicago, Illinois. */
export const CHICAGO: VisitSite = {
  lat: 41.88,
  lng: -87.63,
  zone: 'America/Chicago',
  country: 'US',
  subdivision: 'US-IL',
};

/**
 * A campus at the Aviation Formulary's JFK point (40°38′N 73°47′W) in New York State, so the
 * LAX–JFK worked example applies to a proctor at LAX.
 */
export const JFK_CAMPUS: VisitSite = {
  lat: 40 + 38 / 60,
  lng: -(73 + 47 / 60),
  zone: 'America/New_York',
  country: 'US',
  subdivision: 'US-NY',
};

/** The Aviation Formulary's LAX point (33°57′N 118°24′W). */
export const LAX = { lat: 33 + 57 / 60, lng: -(118 + 24 / 60) };

/** A campus in Munich, Bavaria. */
export const MUNICH: VisitSite = {
  lat: 48.14,
  lng: 11.58,
  zone: 'Europe/Berlin',
  country: 'DE',
  subdivision: 'DE-BY',
};

/** A weekday rule (Mon–Fri, 07:00) in a zone, starting 2025-01-06. */
export function weekdays(zone: string): string {
  return `DTSTART;TZID=${zone}:20250106T070000\nRRULE:FREQ=WEEKLY;BYDAY=MO,TU,WE,TH,FR`;
}

/** A rule for every day (07:00) in a zone, starting 2025-01-01. */
export function everyDay(zone: string): string {
  return `DTSTART;TZID=${zone}:20250101T070000\nRRULE:FREQ=DAILY`;
}

/** A licence credential. */
export function licence(jurisdiction: string, validFrom: string, validTo: string): Credential {
  return { kind: 'licence', jurisdiction, validFrom, validTo };
}

/**
 * An invented proctor living in Milwaukee (about 120 km from the Chicago campus), licensed in
 * Illinois through 2027, working weekdays, 38 cases on `model-a`, USD 2,000.00 a day and
 * USD 750.00 a travel day, never offered a visit.
 */
export function proctor(overrides: Partial<Proctor> = {}): Proctor {
  return {
    id: 'proctor-a',
    name: 'Dr Ada Example',
    home: { lat: 43.04, lng: -87.91, zone: 'America/Chicago', country: 'US' },
    travelRadiusKm: 1500,
    languages: ['en-US'],
    dayRate: { amount: 200_000, currency: 'USD' },
    travelDayRate: { amount: 75_000, currency: 'USD' },
    experience: { 'model-a': 38 },
    credentials: [licence('US-IL', '2025-01-01', '2027-12-31')],
    availability: { rules: [weekdays('America/Chicago')], exceptions: [], blackouts: [] },
    acceptedVisits: [],
    lastOfferedAt: null,
    ...overrides,
  };
}

/** A three-day visit (Tue 8 – Thu 10 June 2027) at the Chicago campus on `model-a`. */
export function request(overrides: Partial<VisitRequest> = {}): VisitRequest {
  return {
    site: CHICAGO,
    modelId: 'model-a',
    visit: { from: '2027-06-08', to: '2027-06-10' },
    cases: 3,
    ...overrides,
  };
}

/** Fixed "now" for the tests. */
export const NOW = '2027-06-01T12:00:00Z';

/** Homes for generated proctors: near and far from the campuses above, several zones. */
const HOMES = [
  { lat: 43.04, lng: -87.91, zone: 'America/Chicago', country: 'US' },
  { lat: 41.5, lng: -88.2, zone: 'America/Chicago', country: 'US' },
  { lat: 40.9, lng: -74.2, zone: 'America/New_York', country: 'US' },
  { lat: 39.1, lng: -84.51, zone: 'America/New_York', country: 'US' },
  { ...LAX, zone: 'America/Los_Angeles', country: 'US' },
  { lat: 52.52, lng: 13.4, zone: 'Europe/Berlin', country: 'DE' },
  { lat: 48.2, lng: 11.6, zone: 'Europe/Berlin', country: 'DE' },
];

/** Generated visit requests: one of three campuses, 1–6 days in June 2027, maybe a language. */
export const requestArb: fc.Arbitrary<VisitRequest> = fc
  .record({
    site: fc.constantFrom(CHICAGO, JFK_CAMPUS, MUNICH),
    start: fc.integer({ min: 0, max: 20 }),
    length: fc.integer({ min: 0, max: 5 }),
    language: fc.option(fc.constantFrom('en', 'en', 'de', 'DE-at', 'fr'), { nil: undefined }),
  })
  .map(({ site, start, length, language }) => {
    const from = plusDays('2027-06-01', start);
    return {
      site,
      modelId: 'model-a',
      visit: { from, to: plusDays(from, length) },
      cases: 2,
      language,
    };
  });

const WEEK = ['MO', 'TU', 'WE', 'TH', 'FR', 'SA', 'SU'];

/** A day from 1 Jan to about 20 Jul 2027 (visits are in June). */
const dateIn2027 = fc.integer({ min: 0, max: 200 }).map((n) => plusDays('2027-01-01', n));
/** A day around the visits (May to mid-July 2027), for exceptions, blackouts and bookings. */
const dateNearVisits = fc.integer({ min: 120, max: 195 }).map((n) => plusDays('2027-01-01', n));

/**
 * Generated proctors (ids are set by {@link proctorsArb}). Biased towards plausible proctors
 * (a licence for one of the campuses, most weekdays, enough cases) so that both eligible and
 * ineligible ones turn up often.
 */
export const proctorArb: fc.Arbitrary<Omit<Proctor, 'id'>> = fc
  .record({
    home: fc.constantFrom(...HOMES),
    travelRadiusKm: fc.constantFrom(100, 800, 3000, 10_000, 10_000),
    languages: fc.subarray(['en-US', 'de-DE', 'fr', 'es'], { minLength: 1 }),
    day: fc.integer({ min: 0, max: 500_000 }),
    travel: fc.integer({ min: 0, max: 200_000 }),
    currency: fc.constantFrom('USD', 'EUR'),
    cases: fc.integer({ min: 0, max: 120 }),
    credentials: fc.array(
      fc.record({
        kind: fc.constantFrom(
          'licence',
          'licence',
          'licence',
          'privileges',
          'certificate',
        ) as fc.Arbitrary<Credential['kind']>,
        jurisdiction: fc.constantFrom('US', 'US-IL', 'US-NY', 'DE', 'DE-BY', 'DE-BE'),
        validFrom: dateIn2027,
        length: fc.integer({ min: 0, max: 500 }),
      }),
      { maxLength: 4 },
    ),
    ruleDays: fc.oneof(fc.constant(WEEK), fc.subarray(WEEK, { minLength: 1 })),
    exceptionDates: fc.array(dateNearVisits, { maxLength: 2 }),
    blackouts: fc.array(fc.tuple(dateNearVisits, fc.integer({ min: 0, max: 3 })), { maxLength: 1 }),
    accepted: fc.array(fc.tuple(dateNearVisits, fc.integer({ min: 0, max: 4 })), { maxLength: 2 }),
    lastOffered: fc.option(fc.integer({ min: 0, max: 90 * 24 }), { nil: null }),
  })
  .map((g) => ({
    name: 'Generated proctor',
    home: g.home,
    travelRadiusKm: g.travelRadiusKm,
    languages: g.languages,
    dayRate: { amount: g.day, currency: g.currency },
    travelDayRate: { amount: g.travel, currency: g.currency },
    experience: { 'model-a': g.cases, 'model-b': 200 },
    credentials: g.credentials.map((c) => ({
      kind: c.kind,
      jurisdiction: c.jurisdiction,
      validFrom: c.validFrom,
      validTo: plusDays(c.validFrom, c.length),
    })),
    availability: {
      // DTSTART on the rule's first weekday (2027-01-04 is a Monday), as the validator requires.
      rules: [
        `DTSTART;TZID=${g.home.zone}:` +
          `${plusDays('2027-01-04', WEEK.indexOf(g.ruleDays[0] as string)).replace(/-/g, '')}T080000\n` +
          `RRULE:FREQ=WEEKLY;BYDAY=${g.ruleDays.join(',')}`,
      ],
      exceptions: g.exceptionDates.map((date) => ({ kind: 'date' as const, date })),
      blackouts: g.blackouts.map(([from, n]) => ({ from, to: plusDays(from, n) })),
    },
    acceptedVisits: g.accepted.map(([from, n]) => ({ from, to: plusDays(from, n) })),
    lastOfferedAt:
      g.lastOffered === null
        ? null
        : new Date(Date.parse(NOW) - g.lastOffered * 3_600_000).toISOString(),
  }));

/** 1–8 generated proctors with unique ids. */
export const proctorsArb: fc.Arbitrary<Proctor[]> = fc
  .array(proctorArb, { minLength: 1, maxLength: 8 })
  .map((list) => list.map((p, i) => ({ ...p, id: `p-${String(i).padStart(2, '0')}` })));
