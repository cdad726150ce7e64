/**
 * Invented proctors for the demo: eight people across the US and Germany with their home bases
 * (city-level points, no addresses), languages, rates, experience on the demo models, licences
 * and weekly patterns. Names and practices are made up; e-mails use `.example` domains.
 * One licence ends in the middle of next month (`validTo: 'mid-next-month'`), so the credential
 * warning and the "expiring" badge show.
 */

/** Days relative to the load day, or the 15th of next month. */
export type DemoDay = number | 'mid-next-month';

export interface DemoProctor {
  email: string;
  name: string;
  /** Practice (organisation of kind proctor_practice); created unless it exists. */
  practice: string;
  home: { latitude: number; longitude: number; timeZone: string; country: string };
  travelRadiusKm: number;
  languages: string[];
  /** Minor units. */
  dayRate: number;
  travelDayRate: number;
  currency: 'USD' | 'EUR';
  specialties: string[];
  bio: string;
  /** Declared supervised cases per demo model key. */
  experience: Record<string, number>;
  credentials: {
    kind: 'licence' | 'privileges' | 'certificate';
    title: string;
    jurisdiction: string;
    validFrom: string;
    validTo: string | 'mid-next-month';
  }[];
  /** RRULE lines (DTSTART is added in the proctor's zone). */
  rules: string[];
  /** Blackouts, in days from the load day. */
  blackouts?: { fromInDays: number; days: number }[];
}

export const demoProctors: DemoProctor[] = [
  {
    email: 'proctor@proctors.example',
    name: 'Helena Osterby',
    practice: 'Osterby Proctoring Practice',
    home: { latitude: 41.95, longitude: -87.9, timeZone: 'America/Chicago', country: 'US' },
    travelRadiusKm: 1800,
    languages: ['en-US', 'sv'],
    dayRate: 240_000,
    travelDayRate: 90_000,
    currency: 'USD',
    specialties: ['Urology', 'Robotic surgery'],
    bio: 'Urologist; has proctored first robotic cases since the platform came to the Midwest.',
    experience: { robot: 46, uretero: 22 },
    credentials: [
      {
        kind: 'licence',
        title: 'Illinois medical licence',
        jurisdiction: 'US-IL',
        validFrom: '2019-07-01',
        validTo: '2028-09-30',
      },
      {
        kind: 'licence',
        title: 'Massachusetts medical licence',
        jurisdiction: 'US-MA',
        validFrom: '2022-01-01',
        validTo: '2028-03-31',
      },
      {
        kind: 'certificate',
        title: 'Platform proctor certificate, R2',
        jurisdiction: 'US',
        validFrom: '2024-02-01',
        validTo: '2027-01-31',
      },
    ],
    rules: ['RRULE:FREQ=WEEKLY;BYDAY=MO,TU,WE,TH,FR'],
  },
  {
    email: 'c.albemarle@proctors.example',
    name: 'Curtis Albemarle-Nguyen',
    practice: 'Harbourline Surgical Proctors',
    home: { latitude: 42.25, longitude: -71.2, timeZone: 'America/New_York', country: 'US' },
    travelRadiusKm: 600,
    languages: ['en-US', 'vi'],
    dayRate: 210_000,
    travelDayRate: 70_000,
    currency: 'USD',
    specialties: ['Urology'],
    bio: 'Endourologist; supervises first flexible ureteroscopy and robotic cases in New England.',
    experience: { robot: 31, uretero: 40 },
    credentials: [
      {
        kind: 'licence',
        title: 'Massachusetts medical licence',
        jurisdiction: 'US-MA',
        validFrom: '2018-05-01',
        validTo: 'mid-next-month',
      },
    ],
    rules: ['RRULE:FREQ=WEEKLY;BYDAY=MO,TU,WE,FR'],
  },
  {
    email: 'm.quintanar@proctors.example',
    name: 'Marisol Quintanar-Ek',
    practice: 'Harbourline Surgical Proctors',
    home: { latitude: 40.85, longitude: -73.9, timeZone: 'America/New_York', country: 'US' },
    travelRadiusKm: 900,
    languages: ['en-US', 'es'],
    dayRate: 260_000,
    travelDayRate: 85_000,
    currency: 'USD',
    specialties: ['Urology', 'Gynaecology'],
    bio: 'Robotic surgeon; proctors first cases in the Northeast, in English and Spanish.',
    experience: { robot: 64, uretero: 28 },
    credentials: [
      {
        kind: 'licence',
        title: 'New York medical licence',
        jurisdiction: 'US-NY',
        validFrom: '2016-09-01',
        validTo: '2028-08-31',
      },
      {
        kind: 'licence',
        title: 'Massachusetts medical licence',
        jurisdiction: 'US-MA',
        validFrom: '2021-03-01',
        validTo: '2029-02-28',
      },
      {
        kind: 'licence',
        title: 'New Jersey medical licence',
        jurisdiction: 'US-NJ',
        validFrom: '2020-06-01',
        validTo: '2027-06-30',
      },
    ],
    rules: ['RRULE:FREQ=WEEKLY;BYDAY=MO,TU,WE,TH'],
  },
  {
    email: 'd.arkwright@proctors.example',
    name: 'Desmond Arkwright-Yeo',
    practice: 'Front Range Proctoring',
    home: { latitude: 39.74, longitude: -104.99, timeZone: 'America/Denver', country: 'US' },
    travelRadiusKm: 2000,
    languages: ['en-US'],
    dayRate: 200_000,
    travelDayRate: 60_000,
    currency: 'USD',
    specialties: ['Urology'],
    bio: 'Travels for first robotic cases every other week.',
    experience: { robot: 25 },
    credentials: [
      {
        kind: 'licence',
        title: 'Colorado medical licence',
        jurisdiction: 'US-CO',
        validFrom: '2017-01-01',
        validTo: '2028-12-31',
      },
      {
        kind: 'licence',
        title: 'Illinois medical licence',
        jurisdiction: 'US-IL',
        validFrom: '2023-01-01',
        validTo: '2028-12-31',
      },
    ],
    rules: ['RRULE:FREQ=WEEKLY;INTERVAL=2;BYDAY=MO,TU,WE,TH,FR'],
  },
  {
    email: 'p.halvorsen@proctors.example',
    name: 'Priyanka Halvorsen',
    practice: 'Cascadia Clinical Proctors',
    home: { latitude: 47.6, longitude: -122.3, timeZone: 'America/Los_Angeles', country: 'US' },
    travelRadiusKm: 5000,
    languages: ['en-US', 'hi'],
    dayRate: 230_000,
    travelDayRate: 95_000,
    currency: 'USD',
    specialties: ['Urology', 'Stone disease'],
    bio: 'Stone specialist; supervises first ureteroscopy and laser cases anywhere in the US.',
    experience: { uretero: 58, robot: 20, laser: 44 },
    credentials: [
      {
        kind: 'licence',
        title: 'Washington medical licence',
        jurisdiction: 'US-WA',
        validFrom: '2015-04-01',
        validTo: '2029-03-31',
      },
      {
        kind: 'licence',
        title: 'Illinois medical licence',
        jurisdiction: 'US-IL',
        validFrom: '2022-04-01',
        validTo: '2028-03-31',
      },
      {
        kind: 'licence',
        title: 'Massachusetts medical licence',
        jurisdiction: 'US-MA',
        validFrom: '2022-04-01',
        validTo: '2028-03-31',
      },
    ],
    rules: ['RRULE:FREQ=WEEKLY;BYDAY=TU,WE,TH'],
  },
  {
    email: 'k.wirbeleit@proctors.example',
    name: 'Konstanze Wirbeleit',
    practice: 'Neckartal Proktorat',
    home: { latitude: 48.78, longitude: 9.18, timeZone: 'Europe/Berlin', country: 'DE' },
    travelRadiusKm: 400,
    languages: ['de-DE', 'en'],
    dayRate: 190_000,
    travelDayRate: 60_000,
    currency: 'EUR',
    specialties: ['Urologie'],
    bio: 'Urologin; begleitet die ersten robotischen Eingriffe in Süddeutschland.',
    experience: { robot: 52, uretero: 21 },
    credentials: [
      {
        kind: 'licence',
        title: 'Approbation als Ärztin',
        jurisdiction: 'DE',
        validFrom: '2009-10-01',
        validTo: '2099-12-31',
      },
    ],
    rules: ['RRULE:FREQ=WEEKLY;BYDAY=MO,TU,WE,TH,FR'],
  },
  {
    email: 'm.oyelaran-berg@proctors.example',
    name: 'Matthias Oyelaran-Berg',
    practice: 'Neckartal Proktorat',
    home: { latitude: 48.14, longitude: 11.58, timeZone: 'Europe/Berlin', country: 'DE' },
    travelRadiusKm: 600,
    languages: ['de-DE', 'en', 'yo'],
    dayRate: 175_000,
    travelDayRate: 55_000,
    currency: 'EUR',
    specialties: ['Urologie', 'Endourologie'],
    bio: 'Endourologe; Dienstag bis Donnerstag für Erstanwendungen unterwegs.',
    experience: { robot: 23, uretero: 35 },
    credentials: [
      {
        kind: 'licence',
        title: 'Approbation als Arzt',
        jurisdiction: 'DE',
        validFrom: '2012-04-01',
        validTo: '2099-12-31',
      },
    ],
    rules: ['RRULE:FREQ=WEEKLY;BYDAY=TU,WE,TH'],
    blackouts: [{ fromInDays: 14, days: 7 }],
  },
  {
    email: 'i.varga@proctors.example',
    name: 'Ilse Varga-Dunmore',
    practice: 'Spreebogen Clinical Proctoring',
    home: { latitude: 52.52, longitude: 13.4, timeZone: 'Europe/Berlin', country: 'DE' },
    travelRadiusKm: 900,
    languages: ['de-DE', 'en', 'hu'],
    dayRate: 205_000,
    travelDayRate: 65_000,
    currency: 'EUR',
    specialties: ['Urologie'],
    bio: 'Urologin aus Berlin; reist mit Vortag und Folgetag an und ab.',
    experience: { robot: 40, uretero: 26 },
    credentials: [
      {
        kind: 'licence',
        title: 'Approbation als Ärztin',
        jurisdiction: 'DE',
        validFrom: '2011-02-01',
        validTo: '2099-12-31',
      },
      {
        kind: 'licence',
        title: 'Berufsberechtigung Österreich',
        jurisdiction: 'AT',
        validFrom: '2019-01-01',
        validTo: '2029-12-31',
      },
    ],
    rules: ['RRULE:FREQ=WEEKLY;BYDAY=MO,TU,WE,TH'],
  },
];

/** What a demo visit ends as. */
export type DemoVisitOutcome =
  'offered' | 'accepted' | 'unfilled' | 'cancelled' | 'completed' | 'signed_off';

export interface DemoVisit {
  requester: string;
  campus: string;
  model: string;
  /** First case day, in days from the load day (negative: in the past), moved to a weekday. */
  startInDays: number;
  days: number;
  cases: number;
  language?: string;
  note?: string;
  /** Candidates in order, by e-mail. */
  proctors: string[];
  /** Declines before the outcome, by e-mail, with reasons. */
  declines?: { proctor: string; reason: string }[];
  outcome: DemoVisitOutcome;
  /** Trainee (clinician e-mail) and cases recorded for completed and signed-off visits. */
  trainee?: string;
  recordedCases?: number;
  reason?: string;
}

export const demoVisits: DemoVisit[] = [
  {
    requester: 'buyer@velmora.example',
    campus: 'Velmora East Campus',
    model: 'robot',
    startInDays: 24,
    days: 2,
    cases: 3,
    note: 'First three robotic prostatectomies; OR 6.',
    proctors: ['m.quintanar@proctors.example', 'proctor@proctors.example'],
    outcome: 'accepted',
  },
  {
    requester: 'clinician@velmora.example',
    campus: 'Velmora Lakefront Campus',
    model: 'uretero',
    startInDays: 38,
    days: 1,
    cases: 3,
    proctors: ['proctor@proctors.example', 'p.halvorsen@proctors.example'],
    outcome: 'offered',
  },
  {
    requester: 'buyer@velmora.example',
    campus: 'Velmora Lakefront Campus',
    model: 'robot',
    startInDays: 59,
    days: 2,
    cases: 4,
    proctors: ['d.arkwright@proctors.example'],
    declines: [
      { proctor: 'd.arkwright@proctors.example', reason: 'Already travelling that week.' },
    ],
    outcome: 'unfilled',
  },
  {
    requester: 'buyer@velmora.example',
    campus: 'Velmora East Campus',
    model: 'uretero',
    startInDays: 12,
    days: 1,
    cases: 2,
    proctors: ['c.albemarle@proctors.example'],
    outcome: 'cancelled',
    reason: 'Cases moved to the following month.',
  },
  {
    requester: 'buyer@orlenbach.example',
    campus: 'Orlenbach Hauptstandort',
    model: 'robot',
    startInDays: -20,
    days: 2,
    cases: 3,
    language: 'de',
    proctors: ['m.oyelaran-berg@proctors.example', 'k.wirbeleit@proctors.example'],
    declines: [
      { proctor: 'm.oyelaran-berg@proctors.example', reason: 'Operationstag im eigenen Haus.' },
    ],
    outcome: 'signed_off',
    trainee: 'clinician@orlenbach.example',
    recordedCases: 3,
  },
  {
    requester: 'buyer@velmora.example',
    campus: 'Velmora East Campus',
    model: 'robot',
    startInDays: -9,
    days: 1,
    cases: 2,
    proctors: ['m.quintanar@proctors.example'],
    outcome: 'completed',
    trainee: 'or.nurse@velmora.example',
    recordedCases: 2,
  },
  {
    requester: 'buyer@orlenbach.example',
    campus: 'Orlenbach Hauptstandort',
    model: 'uretero',
    startInDays: 45,
    days: 2,
    cases: 3,
    language: 'de',
    proctors: ['i.varga@proctors.example'],
    outcome: 'accepted',
  },
];
